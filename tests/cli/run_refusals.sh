#!/usr/bin/env bash
# murk run refuses, with one line and exit status 2, what would waste or lose work:
# a sweep direction into the body, a leftover partial file without --resume or
# --force, noise keys that belong to another noise model, settings of another
# method, a run estimated to need more memory than it may use, and resuming a
# partial file of an earlier layout. --estimate prints the plan without running it.
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
base="$src/cases/examples/fish_detection.toml"
failures=0
source "$src/tests/cli/expect_refusal.bash"  # expect_bad NAME TEXT COMMAND...
sed -e 's/^direction = .*/direction = [0, -1, 0]/' "$base" > "$dir/inward.toml"
expect_bad "direction into the body" "sweep.direction" "$murk" run "$dir/inward.toml" -o "$dir/a.h5" --quiet
: > "$dir/b.h5.partial"
expect_bad "leftover partial file" "--resume" "$murk" run "$base" -o "$dir/b.h5" --quiet
[ -e "$dir/b.h5.partial" ] || { echo "FAIL the leftover partial file was removed"; failures=$((failures + 1)); }
sed -e 's/^probability_level = 0.5/probability_level = 0.5\nintegration_time = "1 s"/' "$base" > "$dir/mixed.toml"
expect_bad "keys of another noise model" "integration_time" "$murk" run "$dir/mixed.toml" -o "$dir/c.h5" --quiet

# The sweep method keys: a method murk does not have; settings that belong to another method.
sed -e 's/^\[sweep\]/[sweep]\nmethod = "fast"/' "$base" > "$dir/method.toml"
expect_bad "unknown sweep method" "sweep.method" "$murk" run "$dir/method.toml" -o "$dir/d.h5" --quiet
sed -e 's/^\[sweep\]/[sweep]\ndipole_accuracy = 0.05/' "$base" > "$dir/accuracy.toml"
expect_bad "dipole accuracy without auto" "sweep.dipole_accuracy" "$murk" run "$dir/accuracy.toml" -o "$dir/e.h5" --quiet
sed -e 's/^\[sweep\]/[sweep]\nmethod = "auto"\ndipole_accuracy = 2/' "$base" > "$dir/accuracy2.toml"
expect_bad "dipole accuracy above 0.5" "sweep.dipole_accuracy" "$murk" run "$dir/accuracy2.toml" -o "$dir/f.h5" --quiet
sed -e 's/^\[sweep\]/[sweep]\nmethod = "dipole"\ndipole_checks = -1/' "$base" > "$dir/checks.toml"
expect_bad "negative dipole checks" "sweep.dipole_checks" "$murk" run "$dir/checks.toml" -o "$dir/g.h5" --quiet
sed -e 's/^\[sweep\]/[sweep]\ncoupling_tolerance = 0.1/' "$base" > "$dir/tolerance.toml"
expect_bad "loose coupling tolerance" "sweep.coupling_tolerance" "$murk" run "$dir/tolerance.toml" -o "$dir/h.h5" --quiet

# Memory: a run estimated to need more than --memory-limit is refused before anything is
# assembled or written, naming the system's size; a limit without a unit is refused.
expect_bad "estimated memory above the limit" "panels), more than the 1 MiB" "$murk" run "$base" -o "$dir/m.h5" --memory-limit "1 MiB"
[ ! -e "$dir/m.h5" ] && [ ! -e "$dir/m.h5.partial" ] || { echo "FAIL a refused run left a file"; failures=$((failures + 1)); }
expect_bad "murk solve: memory above the limit" "panels), more than the 1 MiB" "$murk" solve "$src/cases/examples/fish_prey.toml" -o "$dir/s.h5" --memory-limit "1 MiB"
[ ! -e "$dir/s.h5" ] && [ ! -e "$dir/s.h5.partial" ] || { echo "FAIL a refused solve left a file"; failures=$((failures + 1)); }
expect_bad "memory limit without a unit" "--memory-limit" "$murk" run "$base" -o "$dir/m.h5" --memory-limit 100
# Point counts that do not fit: a product that wraps a 64-bit count, one whose bookkeeping
# alone exceeds the memory, and more object forms than the run keeps.
sed -e 's/^distance = .*/distance = { from = "4 mm", to = "5 cm", count = 65536 }/' \
    -e 's/^size = .*/size = { from = "1 mm", to = "4 mm", count = 65536 }/' \
    -e 's/^water_conductivity = .*/water_conductivity = { from = "50 uS\/cm", to = "300 uS\/cm", count = 65536 }\nconductivity = { from = "0.1 S\/m", to = "1 S\/m", count = 65536 }/' \
    "$base" > "$dir/wrap.toml"
expect_bad "a point count that wraps" "65536 x 65536 x 65536 x 65536" "$murk" run "$dir/wrap.toml" -o "$dir/w.h5" --quiet
sed -e 's/count = 65536/count = 1000/g' "$dir/wrap.toml" > "$dir/many.toml"
expect_bad "points beyond memory" "1000000000000 points" "$murk" run "$dir/many.toml" -o "$dir/w.h5" --quiet --memory-limit "1 TiB"
sed -e 's/count = 65536/count = 400/g' "$dir/wrap.toml" > "$dir/forms.toml"
expect_bad "too many object forms" "forms (objects x sizes" "$murk" run "$dir/forms.toml" -o "$dir/w.h5" --quiet --memory-limit "100 TiB"

# --estimate prints the plan (the demo's 2 x 3 x 13 = 78 points, all exact) and writes nothing.
"$murk" run "$base" --estimate > "$dir/estimate.txt" 2>&1 || { echo "FAIL --estimate: $(cat "$dir/estimate.txt")"; failures=$((failures + 1)); }
grep -q "78 in all: 78 exact, 0 dipole, 0 full re-solve, 0 masked" "$dir/estimate.txt" \
  || { echo "FAIL --estimate counts: $(cat "$dir/estimate.txt")"; failures=$((failures + 1)); }
grep -q "^memory: *about" "$dir/estimate.txt" && grep -q "^time: *about" "$dir/estimate.txt" \
  || { echo "FAIL --estimate gives no memory or time"; failures=$((failures + 1)); }

# A partial file of an earlier murk (an HDF5 file, not this murk's journal): it cannot be
# resumed, so it is refused, and kept.
"$murk" run "$base" -o "$dir/old.h5" --quiet --threads 1 2> "$dir/err" || { cat "$dir/err"; echo "FAIL run"; failures=$((failures + 1)); }
cp "$dir/old.h5" "$dir/older.h5.partial"
/usr/bin/python3 -c 'import sys, h5py; del h5py.File(sys.argv[1], "r+").attrs["Conventions"]' "$dir/older.h5.partial"
expect_bad "partial file of an earlier layout" "start over with --force" "$murk" run "$base" -o "$dir/older.h5" --resume --quiet
[ -e "$dir/older.h5.partial" ] || { echo "FAIL the refused partial file was removed"; failures=$((failures + 1)); }
[ "$failures" -eq 0 ]
