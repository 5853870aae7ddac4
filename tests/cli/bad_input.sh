#!/usr/bin/env bash
# Bad input gets one clear line on stderr naming the place, and exit status 2;
# no output file appears. Usage: bad_input.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0

# expect_bad NAME EXPECTED_TEXT COMMAND...: exit 2, one stderr line containing the text, no result file.
expect_bad() {
  local name="$1" text="$2"; shift 2
  "$@" > "$dir/stdout" 2> "$dir/stderr"
  local status=$?
  local lines; lines=$(wc -l < "$dir/stderr")
  if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -qF -- "$text" "$dir/stderr" || [ -e "$dir/out.h5" ]; then
    echo "FAIL $name: status $status, $lines stderr lines, expected text '$text':"; cat "$dir/stderr"
    failures=$((failures + 1))
  else
    echo "ok   $name: $(cat "$dir/stderr")"
  fi
}

base="$src/cases/examples/fish_prey.toml"
write_case() { sed "$1" "$base" > "$dir/$2"; }

expect_bad "missing case file" "no_such.toml" "$murk" solve "$dir/no_such.toml" -o "$dir/out.h5"
write_case 's/^conductivity = "100 uS\/cm"/conductivity = "100 mA"/' wrong_unit.toml
expect_bad "wrong dimension" "water.conductivity" "$murk" solve "$dir/wrong_unit.toml" -o "$dir/out.h5"
write_case 's/^conductivity = "100 uS\/cm"/conductivity = "100"/' no_unit.toml
expect_bad "number without unit" "water.conductivity" "$murk" solve "$dir/no_unit.toml" -o "$dir/out.h5"
write_case 's/^length = "15 cm"/length = "15 cm"\ncolour = "blue"/' unknown_key.toml
expect_bad "unknown key" "colour" "$murk" solve "$dir/unknown_key.toml" -o "$dir/out.h5"
write_case 's/^radius = "3 mm"/radius = "-3 mm"/' negative.toml
expect_bad "negative radius" "radius" "$murk" solve "$dir/negative.toml" -o "$dir/out.h5"
write_case 's/^position = \["3 cm", "3.05 cm", "0 cm"\]/position = ["3 cm", "0.5 cm", "0 cm"]/' overlap.toml
expect_bad "object touching the body" "prey" "$murk" solve "$dir/overlap.toml" -o "$dir/out.h5"
write_case 's/^title = .*/title = 5/' bad_toml.toml
expect_bad "wrong type" "title" "$murk" solve "$dir/bad_toml.toml" -o "$dir/out.h5"
printf 'title = "x"\n[water\n' > "$dir/syntax.toml"
expect_bad "TOML syntax error" "syntax.toml:2" "$murk" solve "$dir/syntax.toml" -o "$dir/out.h5"
expect_bad "output folder missing" "no_such_dir" "$murk" solve "$base" -o "$dir/no_such_dir/out.h5"
printf 'solid x\nfacet normal 0 0 1\n outer loop\n vertex 0 0 0\n vertex 1 0 0\n endloop\nendfacet\nendsolid\n' > "$dir/broken.stl"
expect_bad "broken STL" "broken.stl" "$murk" mesh "$dir/broken.stl"
zone='s/^panel_size = "6 mm".*/panel_size = "6 mm"\n[[mesh.zone]]\ncentre = ["3 cm", "7.5 mm", "0 cm"]\nradius = "RADIUS"\npanel_size = "SIZE"/'
write_case "$(echo "$zone" | sed 's/RADIUS/5 mm/; s/SIZE/-1 mm/')" zone_negative.toml
expect_bad "zone size not positive" "mesh.zone[1].panel_size" "$murk" solve "$dir/zone_negative.toml" -o "$dir/out.h5"
write_case "$(echo "$zone" | sed 's/RADIUS/5 kg/; s/SIZE/1 mm/')" zone_unit.toml
expect_bad "zone radius not a length" "mesh.zone[1].radius" "$murk" solve "$dir/zone_unit.toml" -o "$dir/out.h5"
write_case "$(echo "$zone" | sed 's/RADIUS/5 mm/; s/SIZE/8 mm/')" zone_coarse.toml
expect_bad "zone coarser than the body" "mesh.zone[1].panel_size: 8 mm is larger" "$murk" solve "$dir/zone_coarse.toml" -o "$dir/out.h5"
write_case "$(echo "$zone" | sed 's/RADIUS/5 mm/; s/SIZE/1 mm/; s/"7.5 mm"/"4 cm"/')" zone_off.toml
expect_bad "zone off the body" "mesh.zone[1].centre: the zone does not reach" "$murk" mesh "$dir/zone_off.toml"
# Patch electrodes cut into the robot's hull (membrane_sphere.toml's "left" patch, first at
# ["-1.5 cm", "1 cm", "0 cm"] on a capsule of radius 1 cm, moved; the radius given is both patches'):
# off the hull, over all of it, over its neighbour.
patch_case() { sed "s/^at = \[\"-1.5 cm\", \"1 cm\", \"0 cm\"\].*/at = $1/; s/^radius = \"6 mm\"/radius = \"$2\"/" \
  "$src/cases/examples/membrane_sphere.toml" > "$dir/$3"; }
patch_case '["-1.5 cm", "5 cm", "0 cm"]' "6 mm" patch_off.toml
expect_bad "patch off the hull" "patch electrode 'left' covers no part of the hull" "$murk" solve "$dir/patch_off.toml" -o "$dir/out.h5"
patch_case '["0 cm", "0 cm", "0 cm"]' "20 cm" patch_all.toml
expect_bad "patch over the whole hull" "patch electrode 'left' covers the whole hull" "$murk" solve "$dir/patch_all.toml" -o "$dir/out.h5"
patch_case '["0.5 cm", "1 cm", "0 cm"]' "6 mm" patch_overlap.toml
expect_bad "patches that overlap" "overlaps patch electrode 'left'" "$murk" solve "$dir/patch_overlap.toml" -o "$dir/out.h5"
# Result files that are damaged or cut short, given to every command that reads one.
"$murk" solve "$base" -o "$dir/whole.h5" --quiet 2> /dev/null
head -c 20000 "$dir/whole.h5" > "$dir/cut.h5"
expect_bad "a result cut short, to murk inspect" "cut.h5: is damaged or cut short" "$murk" inspect "$dir/cut.h5"
expect_bad "a result cut short, to murk merge" "cut.h5: is damaged or cut short" "$murk" merge "$dir/cut.h5" -o "$dir/m.h5"
printf 'not a journal' > "$dir/j.h5.partial"
expect_bad "a damaged journal, to murk run --resume" "is not a journal" "$murk" run "$src/cases/examples/fish_map.toml" -o "$dir/j.h5" --resume
expect_bad "unknown subcommand" "subcommand" "$murk" frobnicate
expect_bad "unknown option" "--colour" "$murk" solve "$base" -o "$dir/out.h5" --colour

[ "$failures" -eq 0 ] || { echo "$failures bad-input cases misbehaved"; exit 1; }
