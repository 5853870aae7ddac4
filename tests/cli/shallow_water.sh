#!/usr/bin/env bash
# Shallow water (cases/README.md, [water]): fish_prey.toml between its surface and a
# bottom, insulating and then a sediment, solved; murk solve prints the images and
# the tolerance, the result file carries them as root attributes and murk inspect
# shows them. Bad [water] keys get one line and exit 2. Usage: shallow_water.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
base="$src/cases/examples/fish_prey.toml"

sed 's/^surface_z = "6 cm".*/surface_z = "6 cm"\nbottom_z = "-4 cm"\nimage_tolerance = 1e-5/' "$base" > "$dir/shallow.toml"
if "$murk" solve "$dir/shallow.toml" -o "$dir/shallow.h5" > "$dir/solve.log" 2>&1; then
  grep -q '^water bounds: surface and bottom, [0-9]* images, truncation tolerance 1e-05 over ' "$dir/solve.log" \
    || fail "solve does not print the images: $(grep 'water bounds' "$dir/solve.log")"
  /usr/bin/python3 -c '
import sys, h5py
f = h5py.File(sys.argv[1], "r")
assert f.attrs["water_planes"] == 2, f.attrs["water_planes"]
assert f.attrs["water_images"] > 2, f.attrs["water_images"]
assert f.attrs["water_image_tolerance"] == 1e-5
assert f.attrs["water_image_reach_m"] >= 0.15
' "$dir/shallow.h5" || fail "root attributes of the water bounds"
  "$murk" inspect "$dir/shallow.h5" > "$dir/inspect.txt" 2>&1
  grep -q '^  water bounds:   surface and bottom, [0-9]* images, truncation tolerance 1e-05' "$dir/inspect.txt" \
    || fail "inspect does not show the images"
else
  fail "shallow water solve: $(tail -2 "$dir/solve.log")"
fi

sed 's/^surface_z = "6 cm".*/surface_z = "6 cm"\nbottom_z = "-4 cm"\nbottom_conductivity = "20 uS\/cm"/' "$base" > "$dir/sediment.toml"
"$murk" solve "$dir/sediment.toml" -o "$dir/sediment.h5" > "$dir/sediment.log" 2>&1 \
  && grep -q '^water bounds: surface and bottom, [0-9]* images, truncation tolerance 1e-06' "$dir/sediment.log" \
  || fail "sediment solve: $(tail -2 "$dir/sediment.log")"

# expect_bad NAME TEXT CASE_SED: exit 2, one stderr line with the text, no result file.
expect_bad() {
  sed "$3" "$base" > "$dir/bad.toml"
  "$murk" solve "$dir/bad.toml" -o "$dir/bad.h5" > /dev/null 2> "$dir/stderr"
  local status=$? lines; lines=$(wc -l < "$dir/stderr")
  if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -qF -- "$2" "$dir/stderr" || [ -e "$dir/bad.h5" ]; then
    fail "$1: status $status, $lines lines: $(cat "$dir/stderr")"
  else
    echo "ok   $1: $(cat "$dir/stderr")"
  fi
}
expect_bad "surface below the bottom" "water.bottom_z: the bottom" 's/^surface_z = "6 cm".*/surface_z = "6 cm"\nbottom_z = "7 cm"/'
expect_bad "zero bottom conductivity" "water.bottom_conductivity: must be positive" \
  's/^surface_z = "6 cm".*/surface_z = "6 cm"\nbottom_z = "-4 cm"\nbottom_conductivity = "0 S\/m"/'
expect_bad "bottom cutting the fish" "below the bottom" 's/^surface_z = "6 cm".*/surface_z = "6 cm"\nbottom_z = "-0.5 cm"/'

[ "$failures" -eq 0 ] && echo "shallow water: all checks passed"
exit $(( failures > 0 ))
