#!/usr/bin/env bash
# The result files of `murk run` and `murk solve` are valid netCDF-4 files: xarray opens every
# group of them with both its engines (h5netcdf and netCDF4), ncdump reads their headers, and
# cases/RESULT_LAYOUT.md names everything they hold. Results: the demo (fish_detection), the
# demo with two objects and method "auto", a robot sweep, a sweep without a body
# (canonical_falloff), an emitter waveform with frequency and permittivity axes
# (biphasic_pulse: /signal and the synthesis datasets), a complex sweep with amplitude and phase
# channels (capacitive_prey), a bottom_distance axis (robot_bottom), and murk solve on a fish
# (real numbers), a membrane at 100 Hz (complex numbers) and a point emitter (probes). The checks themselves are in
# check_netcdf_readers.py and check_layout_documented.py.
# Needs Debian's python3-xarray, python3-h5netcdf, python3-netcdf4 and netcdf-bin (tools/test.sh).
# Usage: netcdf_readers.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees xarray, h5netcdf and netCDF4
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }

for need in xarray h5netcdf netCDF4; do
  "$py" -c "import $need" 2> /dev/null || { echo "python module $need is missing: run bash tools/test.sh, which installs it"; exit 1; }
done
command -v ncdump > /dev/null || { echo "ncdump is missing (Debian netcdf-bin): run bash tools/test.sh, which installs it"; exit 1; }

examples="$src/cases/examples"
# The demo again with an axis of alternative objects (prey or stone) and method "auto": its flags
# and the /sweep/dipole_check group, which no shipped example has.
sed -e 's/^object = "prey"/alternatives = ["prey", "stone"]\nmethod = "auto"/' \
    -e 's/^\[sweep\]/[[object]]\nname = "stone"\nshape = "sphere"\nradius = "3 mm"\nposition = ["3 cm", "2 cm", "0 cm"]\nconductivity = "insulator"\n\n[sweep]/' \
    "$examples/fish_detection.toml" > "$dir/two_objects.toml"
grep -q '^alternatives = \["prey", "stone"\]' "$dir/two_objects.toml" || { echo "could not write the two-object case"; exit 1; }
for case in "$examples/fish_detection" "$examples/robot_detection" "$examples/canonical_falloff" "$dir/two_objects" \
            "$examples/biphasic_pulse" "$examples/capacitive_prey" "$examples/robot_bottom"; do
  "$murk" run "$case.toml" -o "$dir/run_$(basename "$case").h5" --quiet --threads 1 2> "$dir/err.txt" \
    || { cat "$dir/err.txt"; echo "murk run $case failed"; exit 1; }
done
"$py" -c 'import sys, h5py
f = h5py.File(sys.argv[1], "r")
assert "dipole_check" in f["sweep"] and f["sweep/alternative"].attrs["flag_meanings"] == "prey stone"' "$dir/run_two_objects.h5" \
  || fail "the two-object case has no /sweep/dipole_check or no alternative flags"
for case in fish_prey membrane_sphere point_emitter; do
  "$murk" solve "$examples/$case.toml" -o "$dir/solve_$case.h5" --quiet 2> "$dir/err.txt" \
    || { cat "$dir/err.txt"; echo "murk solve $case failed"; exit 1; }
done

for file in "$dir"/*.h5; do
  "$py" "$src/tests/cli/check_netcdf_readers.py" "$file" || fail "$(basename "$file"): netCDF readers"
  # ncdump (netCDF-C's own tool) reads the header: dimensions, variables and attributes of every group.
  if ncdump -h "$file" > "$dir/header.txt" 2> "$dir/err.txt"; then
    echo "ok   ncdump -h $(basename "$file"): $(grep -c '^ *group:' "$dir/header.txt") groups"
  else
    fail "ncdump -h $(basename "$file"): $(cat "$dir/err.txt")"
  fi
done
# The complex case: ncdump shows the named type and complex variables of it.
ncdump -h "$dir/solve_membrane_sphere.h5" > "$dir/header.txt" 2>&1
grep -q "compound complex" "$dir/header.txt" && grep -Eq "^\s*complex outer_potential\(panel\)" "$dir/header.txt" \
  && echo "ok   ncdump shows complex data as the named type complex" || fail "ncdump does not show the complex type and data"

"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir"/*.h5 || fail "cases/RESULT_LAYOUT.md"

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "netCDF readers: ok"
