#!/usr/bin/env bash
# `murk mesh` reports every surface of a case, converts a generated mesh to STL
# and VTK, and reads the STL back with the same panel count.
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
"$murk" mesh "$src/cases/examples/robot_capsule.toml" > "$dir/case.txt"
grep -q "== robot" "$dir/case.txt" || { cat "$dir/case.txt"; echo "no hull report"; exit 1; }
grep -qi "ball" "$dir/case.txt" || { cat "$dir/case.txt"; echo "no object report"; exit 1; }
# A closed tetrahedron written by hand (outward orientation), converted and read back.
cat > "$dir/tet.stl" <<'STL'
solid tet
facet normal 0 0 -1
 outer loop
  vertex 0 0 0
  vertex 0 1 0
  vertex 1 0 0
 endloop
endfacet
facet normal 0 -1 0
 outer loop
  vertex 0 0 0
  vertex 1 0 0
  vertex 0 0 1
 endloop
endfacet
facet normal -1 0 0
 outer loop
  vertex 0 0 0
  vertex 0 0 1
  vertex 0 1 0
 endloop
endfacet
facet normal 1 1 1
 outer loop
  vertex 1 0 0
  vertex 0 1 0
  vertex 0 0 1
 endloop
endfacet
endsolid tet
STL
"$murk" mesh "$dir/tet.stl" --convert "$dir/tet.vtk" > "$dir/tet.txt"
cat "$dir/tet.txt"
grep -q "4" "$dir/tet.txt"
grep -q "POLYGONS 4" "$dir/tet.vtk" || { echo "VTK file does not hold 4 polygons"; exit 1; }
"$murk" mesh "$dir/tet.stl" --convert "$dir/tet2.stl" > /dev/null
"$murk" mesh "$dir/tet2.stl" > "$dir/tet2.txt"
diff <(grep -o "[0-9]* panels, [0-9]* vertices" "$dir/tet.txt") <(grep -o "[0-9]* panels, [0-9]* vertices" "$dir/tet2.txt")
