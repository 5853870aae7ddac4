#!/usr/bin/env bash
# A full disk ends a run with exit status 1 and one line saying so and what was kept, never
# a crash: writes fail as they do on a full disk when a file-size limit is set (ulimit -f;
# murk ignores SIGXFSZ, so the write fails with EFBIG instead of ending the process).
#  - murk run, the journal hits the limit: the finished points stay in OUT.h5.partial and a
#    resume with room finishes the run, identical to one that never failed;
#  - murk run, the result file hits the limit when written: every point stays in the journal,
#    and a resume writes the result, identical;
#  - murk solve: no result and nothing partial is left.
# Usage: disk_full.sh MURK SOURCE_DIR
set -uo pipefail
murk="$(realpath "$1")"; src="$(realpath "$2")"
py=/usr/bin/python3
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
cd "$dir" || exit 1
# The demo, smaller: one water, one size, four distances (its result is about 0.4 MB).
sed -e 's/count = 13/count = 4/' -e 's/^size = .*/size = ["1 mm"]/' -e 's/^water_conductivity = .*/water_conductivity = ["35 uS\/cm"]/' \
    "$src/cases/examples/fish_detection.toml" > case.toml
"$murk" run case.toml -o reference.h5 --quiet --threads 1 2> err.txt || { cat err.txt; echo "FAIL the reference run"; exit 1; }
same() {
  "$py" - "$1" reference.h5 <<'PY'
import sys, h5py, numpy as np
a, b = (h5py.File(p, "r") for p in sys.argv[1:3])
for g in ("sweep", "detection", "falloff"):
    names = []
    a[g].visit(names.append)
    for n in names:
        if isinstance(a[g][n], h5py.Dataset):
            u, v = a[g][n][()], b[g][n][()]
            assert u.dtype == v.dtype and (np.array_equal(u, v, equal_nan=True) if u.dtype.kind in "fc" else np.array_equal(u, v)), f"/{g}/{n} differs"
PY
}
limited() {  # BLOCKS COMMAND...: runs with a file-size limit of BLOCKS x 1 KiB
  local blocks="$1"; shift
  (ulimit -f "$blocks"; "$@") > /dev/null 2> err.txt
}
one_line() { [ "$(wc -l < err.txt)" -eq 1 ]; }

# The journal reaches the limit (a point's record is about 14 KB).
limited 30 "$murk" run case.toml -o a.h5 --quiet --threads 1; status=$?
[ "$status" -eq 1 ] && one_line && grep -q "kept there" err.txt || fail "journal at the limit: status $status: $(cat err.txt)"
[ -e a.h5.partial ] && [ ! -e a.h5 ] || fail "journal at the limit: expected a.h5.partial and no a.h5"
"$murk" run case.toml -o a.h5 --quiet --threads 1 --resume 2> err.txt || fail "resume after the journal's failure: $(cat err.txt)"
same a.h5 || fail "the resumed result differs from the reference"
echo "ok   journal at the limit: exit 1, points kept, resumed identically"

# The result file reaches the limit when written (the journal, about 60 KB, fits).
limited 200 "$murk" run case.toml -o b.h5 --quiet --threads 1; status=$?
[ "$status" -eq 1 ] && one_line && grep -q "disk is full" err.txt && grep -q "every point is kept" err.txt \
  || fail "result at the limit: status $status: $(cat err.txt)"
[ -e b.h5.partial ] && [ ! -e b.h5 ] && [ ! -e b.h5.writing ] || fail "result at the limit: expected only b.h5.partial"
"$murk" run case.toml -o b.h5 --quiet --threads 1 --resume 2> err.txt || fail "resume after the result's failure: $(cat err.txt)"
same b.h5 || fail "the result written on resume differs from the reference"
echo "ok   result at the limit: exit 1, every point kept, written identically on resume"

# murk solve: nothing is left behind.
limited 50 "$murk" solve "$src/cases/examples/fish_prey.toml" -o c.h5 --quiet; status=$?
[ "$status" -eq 1 ] && one_line && grep -q "disk is full" err.txt || fail "solve at the limit: status $status: $(cat err.txt)"
ls c.* > /dev/null 2>&1 && fail "solve at the limit left $(ls c.*)"
echo "ok   solve at the limit: exit 1, one line, nothing left"
[ "$failures" -eq 0 ]
