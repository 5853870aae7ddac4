#!/usr/bin/env bash
# A killed run loses no finished work, whenever it is killed: SIGKILL at random instants
# (while it places points, computes them, re-solves the dipole checks, writes the result,
# and while it resumes an earlier kill), then --resume until it finishes. Every trial
# must end in a result identical, bit for bit in every dataset under /sweep, /detection and
# /falloff, to an uninterrupted run. The instants are random (seeded by the trial number,
# so that a failure can be replayed) and spread over the whole length of a run.
# Usage: kill_resume.sh MURK SOURCE_DIR [TRIALS]
set -uo pipefail
murk="$(realpath "$1")"; src="$(realpath "$2")"; trials="${3:-30}"
py=/usr/bin/python3
dir="$(mktemp -d)"; pid=""
cleanup() { [ -n "$pid" ] && kill -9 "$pid" 2> /dev/null; rm -rf "$dir"; }
trap cleanup EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
cd "$dir" || exit 1
# The demo with method "auto" (exact and dipole points, dipole checks) on a coarse zone: about
# a second a run on one thread.
sed -e 's/^\[sweep\]/[sweep]\nmethod = "auto"\ndipole_checks = 6/' \
    -e '/^\[\[mesh.zone\]\]/,/^$/s/^panel_size = .*/panel_size = "3 mm"/' "$src/cases/examples/fish_detection.toml" > case.toml
run() { "$murk" run case.toml --quiet --threads 1 "$@"; }
t0=$(date +%s%N)
run -o whole.h5 2> err.txt || { cat err.txt; echo "FAIL the uninterrupted run"; exit 1; }
length_ms=$(( ($(date +%s%N) - t0) / 1000000 ))
echo "uninterrupted run: $length_ms ms"

cat > compare.py <<'PY'
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
print("; ".join(bad))
sys.exit(1 if bad else 0)
PY

# kill_at MS ARGS...: runs murk, kills it with SIGKILL after MS milliseconds (if still running).
kill_at() {
  local ms="$1"; shift
  "$murk" run case.toml --quiet --threads 1 "$@" > /dev/null 2>&1 & pid=$!
  sleep "$(printf '%d.%03d' $((ms / 1000)) $((ms % 1000)))"
  kill -9 "$pid" 2> /dev/null && killed=$((killed + 1))
  wait "$pid" 2> /dev/null; pid=""
}
killed=0 identical=0
for trial in $(seq 1 "$trials"); do
  RANDOM=$trial
  rm -f out.h5 out.h5.partial out.xdmf out.h5.writing
  # A kill during a fresh run at a random instant of its length (the last tenth is the
  # result being written), then one during its resume (if the first left a journal to
  # resume); then resumes until it finishes.
  kill_at $(( RANDOM % (length_ms + 1) )) -o out.h5
  if [ ! -e out.h5 ] && [ -e out.h5.partial ]; then
    kill_at $(( RANDOM % (length_ms + 1) )) -o out.h5 --resume
  fi
  for attempt in 1 2 3; do
    [ -e out.h5 ] && break
    if [ -e out.h5.partial ]; then run -o out.h5 --resume 2> err.txt; else run -o out.h5 2> err.txt; fi \
      || { fail "trial $trial: the run after the kills failed: $(cat err.txt)"; break; }
  done
  [ -e out.h5 ] || { fail "trial $trial: no result after three runs"; continue; }
  [ ! -e out.h5.partial ] || fail "trial $trial: the journal is left beside a finished result"
  if out=$("$py" compare.py out.h5 whole.h5); then
    identical=$((identical + 1))
  else
    fail "trial $trial: the result differs from the uninterrupted run: $out"
  fi
done
echo "$trials trials, $killed kills landed while murk ran, $identical results identical to the uninterrupted run"
[ "$killed" -ge "$trials" ] || fail "only $killed kills landed while murk ran (fewer than the $trials trials)"
[ "$failures" -eq 0 ]
