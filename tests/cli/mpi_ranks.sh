#!/usr/bin/env bash
# `mpirun -np 2 murk run`: two ranks share the sweep and one result comes out, identical
# in every dataset under /sweep, /detection and /falloff to the single-process run. An MPI
# run stopped with SIGTERM part-way keeps its ranks' parts (no result under the output's
# name) and the same mpirun command with --resume finishes it, identically. A rank that
# fails ends the run, naming the rank and host, and leaves no result.
# The case: the demo with method "auto" on a coarser zone (dipole and exact points).
# Usage: mpi_ranks.sh MURK SOURCE_DIR
set -uo pipefail
murk="$(realpath "$1")"; src="$(realpath "$2")"
py=/usr/bin/python3
dir="$(mktemp -d)"; pid=""; holder=""
cleanup() { [ -n "$pid" ] && kill -9 "$pid" 2> /dev/null; [ -n "$holder" ] && kill "$holder" 2> /dev/null; rm -rf "$dir"; }
trap cleanup EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
cd "$dir" || exit 1
command -v mpirun > /dev/null || { echo "FAIL mpirun is not installed (tools/setup.sh installs openmpi-bin)"; exit 1; }
# As root (CI), Open MPI wants to be told; --bind-to none lets each rank use more than one core.
export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1
mpi() { mpirun --oversubscribe --bind-to none -np 2 "$murk" "$@"; }
sed -e 's/^\[sweep\]/[sweep]\nmethod = "auto"\ndipole_checks = 6/' \
    -e '/^\[\[mesh.zone\]\]/,/^$/s/^panel_size = .*/panel_size = "3 mm"/' "$src/cases/examples/fish_detection.toml" > case.toml
"$murk" run case.toml -o whole.h5 --quiet --threads 1 2> err.txt || { cat err.txt; fail "the single-process run"; }

compare() {
  "$py" - "$1" "$2" <<'PY'
import sys, h5py, numpy as np
a, b = (h5py.File(p, "r") for p in sys.argv[1:3])
def datasets(f):
    out = {}
    f.visititems(lambda n, o: out.__setitem__(n, o) if isinstance(o, h5py.Dataset) and n.split("/")[0] in ("sweep", "detection", "falloff") else None)
    return out
x, y = datasets(a), datasets(b)
bad = [] if sorted(x) == sorted(y) else [f"different datasets: {sorted(set(x) ^ set(y))}"]
for n in sorted(set(x) & set(y)):
    u, v = x[n][()], y[n][()]
    if u.dtype != v.dtype or u.shape != v.shape or not (np.array_equal(u, v, equal_nan=True) if u.dtype.kind in "fc" else np.array_equal(u, v)):
        bad.append(f"/{n} differs")
print("\n".join(bad) if bad else f"identical: {len(x)} datasets")
sys.exit(1 if bad else 0)
PY
}

# ---- two ranks, one result
mpi run case.toml -o map.h5 --quiet --threads 1 > out.txt 2>&1 || fail "mpirun -np 2: $(cat out.txt)"
out=$(compare map.h5 whole.h5) || fail "two ranks against one process: $out"
echo "two ranks = one process: $out"
ls map.h5.rank-* > /dev/null 2>&1 && fail "the ranks' parts are left beside the result"

# ---- stopped part-way, then resumed: a slower sweep (the demo's fine zone, twice the
# distances), so that the signal lands while both ranks compute
sed -e 's/count = 13/count = 26/' "$src/cases/examples/fish_detection.toml" > slow.toml
"$murk" run slow.toml -o slow_whole.h5 --quiet --threads 1 2> err.txt || { cat err.txt; fail "the slow single-process run"; }
# (mpirun itself in the background, not a shell function: $! must be mpirun's own process)
mpirun --oversubscribe --bind-to none -np 2 "$murk" run slow.toml -o stop.h5 --quiet --threads 1 > stop.txt 2>&1 & pid=$!
for _ in $(seq 1 300); do
  sleep 0.1
  n=$("$murk" inspect stop.h5.rank-1-of-2.partial 2> /dev/null | sed -n 's/^points: *\([0-9]*\) of .*/\1/p')
  [ -n "$n" ] && [ "$n" -ge 3 ] && break
done
kill -TERM "$pid" 2> /dev/null; wait "$pid"; status=$?; pid=""
# mpirun may return before its ranks have finished the points in progress and let go of
# their journals: wait until neither is held.
for _ in $(seq 1 300); do
  "$murk" inspect stop.h5.rank-1-of-2.partial 2> /dev/null | grep -q "in progress" && { sleep 0.1; continue; }
  "$murk" inspect stop.h5.rank-2-of-2.partial 2> /dev/null | grep -q "in progress" && { sleep 0.1; continue; }
  break
done
[ "$status" -ne 0 ] || fail "a stopped MPI run exited with status 0 (it may have finished before the signal)"
[ ! -e stop.h5 ] || fail "a stopped MPI run left stop.h5"
ls stop.h5.rank-* > /dev/null 2>&1 || fail "a stopped MPI run kept no parts"
mpi run slow.toml -o stop.h5 --quiet --threads 1 --resume > resume.txt 2>&1 || fail "mpirun --resume: $(cat resume.txt)"
out=$(compare stop.h5 slow_whole.h5) || fail "stopped and resumed against one process: $out"
echo "stopped and resumed = one process: $out"

# ---- a rank that fails: another process holds rank 2's journal, so that rank cannot start
: > fail.h5.rank-2-of-2.partial
flock fail.h5.rank-2-of-2.partial sleep 30 & holder=$!
sleep 0.5
mpi run case.toml -o fail.h5 --quiet --threads 1 > fail.txt 2>&1
status=$?
pkill -P "$holder" 2> /dev/null; kill "$holder" 2> /dev/null; holder=""
[ "$status" -ne 0 ] || fail "a failed rank did not fail the run"
grep -q "murk: rank 1 of 2 on $(hostname)" fail.txt || fail "the failure does not name the rank and host: $(cat fail.txt)"
[ ! -e fail.h5 ] || fail "a failed MPI run left fail.h5"
echo "a failed rank: $(grep 'murk: rank' fail.txt | head -1)"
[ "$failures" -eq 0 ]
