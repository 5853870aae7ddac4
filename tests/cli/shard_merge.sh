#!/usr/bin/env bash
# Job-array shares: `murk run --shard K/N` on each share and `murk merge` give one result
# identical, in every dataset under /sweep, /detection and /falloff, to a run of the whole
# sweep (read with h5py, compared value for value). A share killed with SIGKILL part-way is
# resumed with --resume and merges to the same result. Merge refuses, with one line and exit
# 2, a missing share (unless --partial, which leaves those points not computed), the same
# share twice, and a part of another case. The merged file opens in xarray.
# The case: the demo with method "auto" (dipole and exact points, dipole checks) on a coarser
# zone, so that every path and the check records are split over the shares.
# Usage: shard_merge.sh MURK SOURCE_DIR
set -uo pipefail
murk="$(realpath "$1")"; src="$(realpath "$2")"
py=/usr/bin/python3
dir="$(mktemp -d)"; pid=""
cleanup() { [ -n "$pid" ] && kill -9 "$pid" 2> /dev/null; rm -rf "$dir"; }
trap cleanup EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
cd "$dir" || exit 1
# 39 distances rather than 13: enough exact points that a share holds several batches.
sed -e 's/^\[sweep\]/[sweep]\nmethod = "auto"\ndipole_checks = 6/' \
    -e 's/^distance = { from = "3 mm", to = "6 cm", count = 13,/distance = { from = "3 mm", to = "6 cm", count = 39,/' \
    -e '/^\[\[mesh.zone\]\]/,/^$/s/^panel_size = .*/panel_size = "3 mm"/' "$src/cases/examples/fish_detection.toml" > case.toml
run() { "$murk" run "$@" --quiet --threads 1; }
run case.toml -o whole.h5 2> err.txt || { cat err.txt; fail "the whole run"; }

compare() {  # A B: every dataset under /sweep, /detection, /falloff equal (NaN equal to NaN)
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

# ---- three shares, one of them killed part-way and resumed
run case.toml -o part-1.h5 --shard 1/3 2> err.txt || fail "share 1: $(cat err.txt)"
# Exact points finish in batches of up to 16, so a share's points arrive in bursts:
# kill once some are in the journal, or, should the share then finish before the
# kill lands, on a second try as soon as its journal exists.
for least in 1 0; do
  rm -f part-2.h5 part-2.h5.partial
  "$murk" run case.toml -o part-2.h5 --shard 2/3 --quiet --threads 1 2> /dev/null & pid=$!
  for _ in $(seq 1 400); do
    sleep 0.05
    n=$("$murk" inspect part-2.h5.partial 2> /dev/null | sed -n 's/^points: *\([0-9]*\) of .*/\1/p')
    [ -n "$n" ] && [ "$n" -ge "$least" ] && break
  done
  kill -9 "$pid" 2> /dev/null; wait "$pid" 2> /dev/null; pid=""
  [ -e part-2.h5.partial ] && [ ! -e part-2.h5 ] && break
done
[ -e part-2.h5.partial ] && [ ! -e part-2.h5 ] || fail "the killed share left no journal (or finished before the kill)"
echo "share 2 killed with ${n:-no} points in its journal"
run case.toml -o part-2.h5 --shard 2/3 --resume 2> err.txt || fail "resuming share 2: $(cat err.txt)"
run case.toml -o part-3.h5 --shard 3/3 2> err.txt || fail "share 3: $(cat err.txt)"
"$murk" merge part-1.h5 part-2.h5 part-3.h5 -o merged.h5 --quiet 2> err.txt || fail "merge: $(cat err.txt)"
out=$(compare merged.h5 whole.h5) || fail "merged against whole: $out"
echo "merged = whole: $out"
[ -e merged.xdmf ] || fail "no sidecar beside the merged result"
"$py" -c 'import sys, xarray as xr; ds = xr.open_dataset(sys.argv[1], group="sweep", engine="h5netcdf"); assert "distance" in ds.coords' merged.h5 \
  || fail "xarray cannot open the merged result's /sweep"

# ---- refusals
expect_bad() {  # NAME TEXT COMMAND...
  local name="$1" text="$2"; shift 2
  "$@" > /dev/null 2> err.txt
  local status=$?
  if [ "$status" -ne 2 ] || [ "$(wc -l < err.txt)" -ne 1 ] || ! grep -qF -- "$text" err.txt; then
    fail "$name: status $status: $(cat err.txt)"
  else
    echo "ok   $name: $(cat err.txt)"
  fi
}
expect_bad "a missing share" "shares missing: 2 of 3" "$murk" merge part-1.h5 part-3.h5 -o m1.h5
expect_bad "the same share twice" "are both share 1/3" "$murk" merge part-1.h5 part-1.h5 part-2.h5 -o m2.h5
sed -e 's/^title = .*/title = "another case"/' case.toml > other.toml
run other.toml -o other-2.h5 --shard 2/3 2> /dev/null
expect_bad "a share of another case" "another case" "$murk" merge part-1.h5 other-2.h5 part-3.h5 -o m3.h5
expect_bad "a whole result as a part" "is not a share" "$murk" merge whole.h5 part-2.h5 -o m4.h5
[ ! -e m1.h5 ] && [ ! -e m2.h5 ] && [ ! -e m3.h5 ] && [ ! -e m4.h5 ] || fail "a refused merge left a result"
# --partial: the missing share's points stay not computed, the others are the whole run's.
"$murk" merge part-1.h5 part-3.h5 -o partial.h5 --partial --quiet 2> err.txt || fail "merge --partial: $(cat err.txt)"
"$py" - partial.h5 whole.h5 part-2.h5 <<'PY' || failures=$((failures + 1))
import sys, h5py, numpy as np
p, w, two = (h5py.File(x, "r") for x in sys.argv[1:4])
missing = two["sweep/status"][()] != 0
assert (p["sweep/status"][()][missing] == 0).all(), "points of the missing share are not marked not computed"
assert np.isnan(p["sweep/peak_perturbation"][()][missing]).all(), "points of the missing share are not NaN"
assert np.array_equal(p["sweep/peak_perturbation"][()][~missing], w["sweep/peak_perturbation"][()][~missing]), "the other points differ from the whole run"
print(f"--partial: {missing.sum()} points not computed, the rest as the whole run")
PY
[ "$failures" -eq 0 ]
