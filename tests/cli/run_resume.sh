#!/usr/bin/env bash
# An interrupted `murk run` loses no finished work: SIGTERM stops it after the point in
# progress with exit status 1, leaving OUT.h5.partial (and no OUT.h5); `--resume` finishes
# it, and the result is identical, bit for bit, to an uninterrupted run of the same case.
# --resume refuses (exit 2, one line) a partial file started from another case, and keeps
# that file. Results are read with h5py, as a user would; the journal with murk inspect.
# The runs use one thread, so that the interrupted and the uninterrupted run do the same
# arithmetic and a busy machine (ctest -j) does not slow them down several times over.
# Usage: run_resume.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees h5py and numpy
dir="$(mktemp -d)"
pid=""
cleanup() { [ -n "$pid" ] && kill "$pid" 2> /dev/null; rm -rf "$dir"; }
trap cleanup EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
start=$SECONDS

# A fish sweep of 120 points (all numbers invented for this test): long enough to be
# interrupted part-way, short enough to run twice in well under a minute.
cat > "$dir/case.toml" <<'EOF'
# Test case of tests/cli/run_resume.sh; all numbers invented.
title = "resumable fish sweep"

[water]
conductivity = "100 uS/cm"

[mesh]
panel_size = "10 mm"

[fish]
length = "15 cm"
interior_conductivity = "1 S/m"
skin_resistance = "0.25 ohm*m^2"

[fish.organ]
from = 0.15
to = 0.85
points = 8
current = "5 uA"

[[object]]
name = "prey"
shape = "sphere"
radius = "2 mm"
position = ["2 cm", "2 cm", "0 cm"]
conductivity = "0.5 S/m"

[sweep]
distance = { from = "3 mm", to = "40 mm", count = 10, spacing = "log" }
direction = [0, 1, 0]
size = ["1 mm", "2 mm", "3 mm"]
conductivity = ["insulator", "0.02 S/m", "0.5 S/m", "conductor"]

[detection]
receptor_noise = "2 uV"
receptor_density = "20 cm^-2"
EOF
run() { "$murk" run "$@" --quiet --threads 1; }

# ---- the reference: an uninterrupted run
mkdir -p "$dir/full"
run "$dir/case.toml" -o "$dir/full/out.h5" 2> "$dir/err.txt" || { cat "$dir/err.txt"; echo "uninterrupted run failed"; exit 1; }
echo "uninterrupted run: $((SECONDS - start)) s"

# ---- the same run, stopped with SIGTERM once a few points are on disk
# count_done FILE: points finished in the run's journal (out.h5.partial), as `murk inspect`
# reports them while the run writes it (0 until the journal exists).
count_done() {
  "$murk" inspect "$1" 2> /dev/null | sed -n 's/^points: *\([0-9]*\) of .*/\1/p' | grep . || echo 0
}
# (murk itself in the background, not a shell function: $! must be murk's own process)
"$murk" run "$dir/case.toml" -o "$dir/out.h5" --quiet --threads 1 2> "$dir/stop.txt" &
pid=$!
done_before=0
for _ in $(seq 1 300); do
  sleep 0.3
  kill -0 "$pid" 2> /dev/null || break
  [ -e "$dir/out.h5.partial" ] || continue
  done_before=$(count_done "$dir/out.h5.partial")
  [ "$done_before" -ge 8 ] && break
done
kill -TERM "$pid" 2> /dev/null
wait "$pid"
status=$?
pid=""
echo "stopped after $done_before or more points: exit status $status"
[ "$status" -eq 1 ] || fail "an interrupted run exits with status $status, expected 1 (the run may have finished before the signal)"
[ -e "$dir/out.h5.partial" ] || fail "no out.h5.partial after the interruption"
[ ! -e "$dir/out.h5" ] || fail "out.h5 exists after an interruption: only a finished run may have that name"
grep -q -- "--resume" "$dir/stop.txt" || fail "the interruption message does not mention --resume: $(cat "$dir/stop.txt")"

# The journal: some points finished, not all; murk inspect says it was interrupted.
"$murk" inspect "$dir/out.h5.partial" > "$dir/inspect.txt" 2>&1 || fail "murk inspect of the journal: $(cat "$dir/inspect.txt")"
kept=$(count_done "$dir/out.h5.partial")
[ "$kept" -ge 8 ] && [ "$kept" -lt 120 ] || fail "the journal holds $kept of 120 points after the interruption"
grep -q "interrupted" "$dir/inspect.txt" || fail "murk inspect does not say the run was interrupted: $(cat "$dir/inspect.txt")"
echo "journal: $kept of 120 points finished"

# ---- --resume refuses a partial file of another case, and keeps it
mkdir -p "$dir/other"
cp "$dir/out.h5.partial" "$dir/other/out.h5.partial"
sed 's/^title = .*/title = "another case"/' "$dir/case.toml" > "$dir/other.toml"
before="$(sha256sum < "$dir/other/out.h5.partial")"
run "$dir/other.toml" -o "$dir/other/out.h5" --resume > /dev/null 2> "$dir/err.txt"
status=$?
lines=$(wc -l < "$dir/err.txt")
if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -q "different case" "$dir/err.txt"; then
  fail "resume with another case: status $status, $lines lines: $(cat "$dir/err.txt")"
else
  echo "ok   resume with another case refused: $(cat "$dir/err.txt")"
fi
if [ ! -e "$dir/other/out.h5.partial" ]; then
  fail "refusing to resume deleted the other case's partial file: its finished points are lost"
elif [ "$before" != "$(sha256sum < "$dir/other/out.h5.partial")" ]; then
  fail "refusing to resume changed the other case's partial file"
fi
[ ! -e "$dir/other/out.h5" ] || fail "a refused resume wrote other/out.h5"
# nothing to resume: exit 2, one line
run "$dir/case.toml" -o "$dir/nothing.h5" --resume > /dev/null 2> "$dir/err.txt"
status=$?
[ "$status" -eq 2 ] && [ "$(wc -l < "$dir/err.txt")" -eq 1 ] && grep -q "nothing.h5.partial" "$dir/err.txt" \
  || fail "resume without a partial file: status $status: $(cat "$dir/err.txt")"

# ---- resume and compare with the uninterrupted run
run "$dir/case.toml" -o "$dir/out.h5" --resume 2> "$dir/err.txt" || fail "--resume failed: $(cat "$dir/err.txt")"
[ -e "$dir/out.h5" ] || fail "no out.h5 after --resume"
[ ! -e "$dir/out.h5.partial" ] || fail "out.h5.partial is left after a finished resume"
[ -e "$dir/out.xdmf" ] || fail "no out.xdmf sidecar after --resume"

"$py" - "$dir/out.h5" "$dir/full/out.h5" <<'PY' || failures=$((failures + 1))
import sys
import h5py
import numpy as np
resumed, full = (h5py.File(p, "r") for p in sys.argv[1:3])
bad = []

def datasets(f):
    out = {}
    f.visititems(lambda name, obj: out.__setitem__(name, obj) if isinstance(obj, h5py.Dataset) else None)
    return out

# Attributes HDF5 keeps for dimension scales hold object references (compared through .dims).
SCALE_ATTRS = {"DIMENSION_LIST", "REFERENCE_LIST", "CLASS", "NAME"}
a, b = datasets(resumed), datasets(full)
if sorted(a) != sorted(b):
    bad.append(f"different datasets: only resumed {sorted(set(a) - set(b))}, only uninterrupted {sorted(set(b) - set(a))}")
for name in sorted(set(a) & set(b)):
    x, y = a[name], b[name]
    if x.dtype != y.dtype or x.shape != y.shape:
        bad.append(f"/{name}: {x.dtype} {x.shape} against {y.dtype} {y.shape}")
        continue
    u, v = x[()], y[()]
    same = (np.array_equal(u, v, equal_nan=True) if u.dtype.kind in "fc" else np.array_equal(u, v))
    if not same:
        bad.append(f"/{name}: values differ")
    ka = {k for k in x.attrs if k not in SCALE_ATTRS}
    kb = {k for k in y.attrs if k not in SCALE_ATTRS}
    if ka != kb or any(not np.array_equal(x.attrs[k], y.attrs[k], equal_nan=np.asarray(x.attrs[k]).dtype.kind == "f")
                       for k in ka):
        bad.append(f"/{name}: attributes differ")
    if [[d.name for d in dim.values()] for dim in x.dims] != [[d.name for d in dim.values()] for dim in y.dims]:
        bad.append(f"/{name}: dimension scales differ")
for k in set(resumed.attrs) | set(full.attrs):
    if k in ("created_utc", "command", "history", "peak_memory_MiB"):  # differ from run to run by nature
        continue
    if k not in resumed.attrs or k not in full.attrs or np.any(resumed.attrs[k] != full.attrs[k]):
        bad.append(f"root attribute {k} differs")
# The CF history holds the first command and then the resuming one, each after its UTC time.
history = resumed.attrs["history"].split("\n")
if len(history) != 2 or not all(" run " in line and "--resume" in line for line in history[1:]) or "--resume" in history[0]:
    bad.append(f"history {history!r} is not the first run's line and then the resuming one")
st = resumed["sweep/status"][()]
if (st == 0).any():
    bad.append(f"{(st == 0).sum()} points are still not computed after --resume")
if bad:
    print("\n".join("FAIL " + x for x in bad))
    sys.exit(1)
print(f"resumed = uninterrupted: {len(a)} datasets identical, {st.size} points")
PY

echo "run_resume: $((SECONDS - start)) s"
[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "run resume: ok"
