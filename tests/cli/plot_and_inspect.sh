#!/usr/bin/env bash
# The read side of result files: tools/plot_results.py draws its figures and `murk inspect`
# prints its summary, on synthetic `murk run` files whose contents the test planted
# (tests/cli/make_synthetic_result.py, written with h5py to cases/RESULT_LAYOUT.md) and on a
# real `murk solve` result. Bad files get one line on stderr and exit status 2.
# Usage: plot_and_inspect.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees h5py, numpy and matplotlib
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
ok() { echo "ok   $*"; }

for kind in sweep grid robot; do
  "$py" "$src/tests/cli/make_synthetic_result.py" "$dir/$kind.h5" --kind "$kind" > /dev/null \
    || { echo "cannot make the synthetic $kind file"; exit 1; }
done
"$murk" solve "$src/cases/examples/fish_prey.toml" -o "$dir/solve.h5" --quiet || { echo "murk solve failed"; exit 1; }

# ---------------------------------------------------------------- plot_results.py

# check_png FILE WIDTH HEIGHT: a PNG of that many pixels (read from its IHDR header, not by
# matplotlib), more than 20 kB, and more than a handful of colours (not a blank canvas).
check_png() {
  local file="$1" width="$2" height="$3"
  [ -f "$file" ] || { fail "$(basename "$file") was not written"; return; }
  "$py" - "$file" "$width" "$height" <<'EOF' && ok "$(basename "$file"): ${width}x${height} pixels" || fail "$(basename "$file")"
import os, struct, sys, zlib
path, width, height = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
data = open(path, "rb").read()
assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
w, h = struct.unpack(">II", data[16:24])        # IHDR: the first chunk (PNG specification, 11.2.2)
assert (w, h) == (width, height), f"{w}x{h} pixels, expected {width}x{height}"
assert os.path.getsize(path) > 20000, f"only {os.path.getsize(path)} bytes"
import matplotlib.image
pixels = matplotlib.image.imread(path)
colours = len({tuple(p) for p in pixels.reshape(-1, pixels.shape[-1])[::7]})
assert colours > 50, f"only {colours} colours: a near-blank image"
EOF
}

# Figure sizes are those plot_results.py sets (inches) at its 100 dots per inch.
plot() { "$py" "$src/tools/plot_results.py" "$@"; }
mkdir -p "$dir/png"
plot "$dir/sweep.h5" -o "$dir/png" > "$dir/plot_sweep.txt" 2>&1 || fail "plot_results.py on the sweep file: $(cat "$dir/plot_sweep.txt")"
check_png "$dir/png/sweep_detection_map.png" 800 650
check_png "$dir/png/sweep_electric_image_1.png" 1200 500
check_png "$dir/png/sweep_electric_image_2.png" 1200 500
check_png "$dir/png/sweep_falloff.png" 800 600
check_png "$dir/png/sweep_body_view.png" 1000 650
grep -q "^skipped grid map: " "$dir/plot_sweep.txt" && ok "grid map skipped for a distance sweep" || fail "no note for the skipped grid map"
grep -qx "$dir/png/sweep_falloff.png" "$dir/plot_sweep.txt" && ok "paths printed" || fail "the falloff path is not printed"

plot "$dir/grid.h5" -o "$dir/png" > "$dir/plot_grid.txt" 2>&1 || fail "plot_results.py on the grid file: $(cat "$dir/plot_grid.txt")"
check_png "$dir/png/grid_grid_map.png" 950 560
grep -q "^skipped falloff: " "$dir/plot_grid.txt" && ok "falloff skipped without a distance axis" || fail "no note for the skipped falloff"

plot "$dir/robot.h5" -o "$dir/png" > "$dir/plot_robot.txt" 2>&1 || fail "plot_results.py on the robot file: $(cat "$dir/plot_robot.txt")"
check_png "$dir/png/robot_electric_image_1.png" 800 500
grep -q "^skipped body view: the sensors are channels" "$dir/plot_robot.txt" && ok "no body view of a robot's channels" \
  || fail "no note for the skipped body view of the robot"

plot "$dir/solve.h5" -o "$dir/png" > "$dir/plot_solve.txt" 2>&1 || fail "plot_results.py on the solve file: $(cat "$dir/plot_solve.txt")"
check_png "$dir/png/solve_electric_image_1.png" 1200 500
check_png "$dir/png/solve_body_view.png" 1000 650

rm -f "$dir/png/sweep_electric_image_"*
plot "$dir/sweep.h5" -o "$dir/png" --points distance=3,size=1 > /dev/null 2>&1
check_png "$dir/png/sweep_electric_image_1.png" 1200 500
[ ! -e "$dir/png/sweep_electric_image_2.png" ] && ok "--points draws only the point asked for" || fail "--points drew more than one image"

# ---------------------------------------------------------------- murk inspect

"$murk" inspect "$dir/sweep.h5" > "$dir/inspect.txt" 2> "$dir/inspect.err"
[ $? -eq 0 ] || fail "murk inspect on the sweep file: $(cat "$dir/inspect.err")"
# expect_line REGEX: one line of the summary matches (extended regex, whole line).
expect_line() { grep -Eqx -- "$1" "$dir/inspect.txt" && ok "inspect: $1" || fail "inspect has no line matching: $1"; }
expect_line '  title: +Synthetic prey sweep'
expect_line '  frequency: +0 Hz \(direct current\)'
expect_line '  distance \(mm\) +10 +2 \.\. 40'
expect_line '  conductivity \(S/m\) +3 +0 \(insulator\), 0\.05, inf \(conductor\)'
expect_line 'points: +90 in all: 84 computed, 3 masked, 3 missing \(not computed\)'
expect_line 'masked points: +3 beyond plane'    # MASKED in make_synthetic_result.py, reason 3
# The planted rows (PLANTED in make_synthetic_result.py): detection range, exponent, fit range,
# R^2 (curvature makes it just below 1), within 0.5 of -4.
r2='0\.99[0-9]{2}'
expect_line "  0 \(insulator\) +1 +not detectable within the sweep \(< 2\.0 mm\) +-4\.10 +8\.0 \.\. 40\.0 mm +$r2 +yes"
expect_line "  0 \(insulator\) +2 +6\.5 mm +-3\.95 +8\.0 \.\. 40\.0 mm +$r2 +yes"
expect_line "  0 \(insulator\) +4 +11\.0 mm +-3\.30 +8\.0 \.\. 40\.0 mm +$r2 +no"
expect_line "  0\.05 +1 +3\.5 mm +-4\.20 +8\.0 \.\. 40\.0 mm +$r2 +yes"
expect_line "  0\.05 +2 +7\.0 mm +-4\.05 +8\.0 \.\. 40\.0 mm +$r2 +yes"
expect_line "  0\.05 +4 +12\.0 mm +-3\.60 +8\.0 \.\. 40\.0 mm +$r2 +yes"
expect_line "  inf \(conductor\) +1 +4\.0 mm +-4\.62 +8\.0 \.\. 40\.0 mm +$r2 +no"
expect_line "  inf \(conductor\) +2 +8\.0 mm +-4\.00 +8\.0 \.\. 40\.0 mm +$r2 +yes"
# The interrupted row: computed up to 15 mm, detectable there, fitted over 8 .. 15 mm.
expect_line "  inf \(conductor\) +4 +beyond the sweep \(> 15\.0 mm\) +-3\.85 +8\.0 \.\. 15\.0 mm +(0\.9[0-9]{3}|1\.0000) +yes"

"$murk" inspect "$dir/grid.h5" > "$dir/inspect.txt" 2>&1 || fail "murk inspect on the grid file"
expect_line 'no distance axis: no detection ranges and no falloff fit'
"$murk" inspect "$dir/robot.h5" > "$dir/inspect.txt" 2>&1 || fail "murk inspect on the robot file"
expect_line 'sensors: +6 channels: front_left,front_right,mid_left,mid_right,rear_left,rear_right'
expect_line '  frequency: +1 kHz'

# A real murk solve file: the peak panel of the electric image is the one h5py finds.
"$murk" inspect "$dir/solve.h5" > "$dir/inspect.txt" 2>&1 || fail "murk inspect on the solve file"
peak="$("$py" -c 'import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
print(int(np.argmax(np.abs(f["difference/fish/transdermal_voltage"][()]))), f["mesh/fish/triangles"].shape[0])' "$dir/solve.h5")"
set -- $peak
expect_line "  fish +$2 +change of transdermal voltage: peak [0-9.]+ nV at panel $1 \(.*\) mm"

# ---------------------------------------------------------------- bad files

# expect_bad NAME TEXT COMMAND...: exit status 2 and one stderr line containing TEXT.
expect_bad() {
  local name="$1" text="$2"; shift 2
  "$@" > /dev/null 2> "$dir/stderr"
  local status=$? lines; lines=$(wc -l < "$dir/stderr")
  if [ "$status" -eq 2 ] && [ "$lines" -eq 1 ] && grep -qF -- "$text" "$dir/stderr"; then
    ok "$name: $(cat "$dir/stderr")"
  else
    fail "$name: status $status, $lines stderr lines, expected '$text':"; cat "$dir/stderr"
  fi
}
# corrupt NAME PYTHON: a copy of sweep.h5 changed by the h5py statements (f is the open file).
corrupt() {
  cp "$dir/sweep.h5" "$dir/$1.h5"
  "$py" -c "import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], 'r+')
$2" "$dir/$1.h5"
}
printf 'not hdf5\n' > "$dir/text.h5"
"$py" -c 'import h5py, sys; h5py.File(sys.argv[1], "w").create_dataset("x", data=[1])' "$dir/foreign.h5"
corrupt no_status 'del f["sweep/status"]'
corrupt bad_code 'f["detection/status"][0, 1] = 7'
corrupt short_axis 'del f["sweep/size"]'
corrupt bad_shape 'del f["falloff/r_squared"]; f["falloff/r_squared"] = np.zeros(4)'
corrupt no_flags 'del f["sweep/status"].attrs["flag_meanings"]'
# Codes mean what the file's flags say, not fixed numbers: the same file with the status codes
# renumbered (computed 7, masked 5, not computed 9) and its flags saying so reads the same.
corrupt renumbered 'st = f["sweep/status"]; old = st[()]; new = np.select([old == 1, old == 2], [7, 5], 9).astype(np.uint8)
st[...] = new; st.attrs["flag_values"] = np.array([9, 7, 5], np.uint8)'

for tool in inspect plot; do
  run() { if [ "$tool" = inspect ]; then "$murk" inspect "$1"; else plot "$1" -o "$dir/png"; fi; }
  expect_bad "$tool: missing file" "no_such.h5" run "$dir/no_such.h5"
  expect_bad "$tool: not HDF5" "text.h5" run "$dir/text.h5"
  expect_bad "$tool: not murk's" "not a murk result file" run "$dir/foreign.h5"
  expect_bad "$tool: no /sweep/status" "/sweep/status" run "$dir/no_status.h5"
  expect_bad "$tool: axis dataset missing" "/sweep/size" run "$dir/short_axis.h5"
done
expect_bad "plot: falloff of the wrong shape" "/falloff/r_squared" plot "$dir/bad_shape.h5" -o "$dir/png"
expect_bad "inspect: detection status 7" "/detection/status" "$murk" inspect "$dir/bad_code.h5"
expect_bad "inspect: falloff of the wrong shape" "/falloff/r_squared" "$murk" inspect "$dir/bad_shape.h5"
expect_bad "inspect: status without flag_meanings" "/sweep/status" "$murk" inspect "$dir/no_flags.h5"
expect_bad "plot: status without flag_meanings" "/sweep/status" plot "$dir/no_flags.h5" -o "$dir/png"
"$murk" inspect "$dir/renumbered.h5" > "$dir/inspect.txt" 2>&1 || fail "murk inspect on the renumbered file: $(cat "$dir/inspect.txt")"
expect_line 'points: +90 in all: 84 computed, 3 masked, 3 missing \(not computed\)'
expect_bad "plot: --points on an unknown axis" "colour" plot "$dir/sweep.h5" -o "$dir/png" --points colour=1
expect_bad "plot: --points index outside the axis" "outside axis distance" plot "$dir/sweep.h5" -o "$dir/png" --points distance=10

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "plot and inspect: ok"
