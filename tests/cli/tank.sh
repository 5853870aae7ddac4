#!/usr/bin/env bash
# A [tank]: murk solve of a fish in a closed box writes the reference (root attribute and
# summary line); murk run sweeps prey inside it by the exact path, masking the points
# whose prey would come too near the walls; and every tank rule is refused with one line
# naming the file, line and key, exit status 2: a tank that does not hold the fish, a
# source or probe outside it, a net current into it, a plane beside it. The compressed solver
# solves a tank as the dense one does.
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
base="$src/cases/examples/fish_detection.toml"
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
source "$src/tests/cli/expect_refusal.bash"  # expect_bad NAME TEXT COMMAND...
tank() {  # SIZE CENTRE -> a [tank] table
  printf '\n[tank]\nshape = "box"\nsize = %s\ncentre = %s\npanel_size = "4 cm"\n' "$1" "$2"
}
# A small sweep: three distances, one size, one water; the tank's wall at y = 6 cm.
sed -e 's/^distance = .*/distance = { from = "3 mm", to = "5 cm", count = 3 }/' \
    -e 's/^size = .*/size = ["2 mm"]/' -e 's/^water_conductivity = .*/water_conductivity = ["100 uS\/cm"]/' \
    -e 's/^\[sweep\]/[sweep]\nmethod = "exact"/' "$base" > "$dir/small.toml"
{ cat "$dir/small.toml"; tank '["30 cm", "16 cm", "12 cm"]' '["0 cm", "-2 cm", "0 cm"]'; } > "$dir/tank.toml"

# murk solve: the reference in the summary and in the file.
"$murk" solve "$dir/tank.toml" -o "$dir/solve.h5" > "$dir/out" 2>&1 || { fail "solve in a tank:"; cat "$dir/out"; }
grep -qF "reference: mean over the tank walls is zero" "$dir/out" || fail "solve: no reference line"
/usr/bin/python3 - "$dir/solve.h5" <<'PY' || failures=$((failures + 1))
import sys, h5py
with h5py.File(sys.argv[1], "r") as f:
    ref = f.attrs["reference"]
    ref = ref.decode() if isinstance(ref, bytes) else str(ref)
    assert ref == "mean over the tank walls is zero", ref
print("ok   solve writes reference =", ref)
PY

# murk run by the exact path: the farthest prey (centre 2.7 mm + 5 cm + 2 mm off the flank,
# reaching y ~ 6.5 cm) would cross the wall at y = 6 cm and is masked.
"$murk" run "$dir/tank.toml" -o "$dir/run.h5" --quiet > "$dir/out" 2>&1 || { fail "run in a tank:"; cat "$dir/out"; }
/usr/bin/python3 - "$dir/run.h5" <<'PY' || failures=$((failures + 1))
import sys, h5py, numpy as np
with h5py.File(sys.argv[1], "r") as f:
    status = np.asarray(f["sweep/status"]).ravel()
    reason = np.asarray(f["sweep/mask_reason"]).ravel()
    path = np.asarray(f["sweep/path"]).ravel()
    ref = f.attrs["reference"]
    assert (status == 1).sum() >= 1, status
    assert (reason == 3).sum() >= 1, reason          # beyond_plane: too near the tank's wall
    assert set(path[status == 1].tolist()) == {1}, path  # exact
    pert = np.asarray(f["sweep/perturbation"])
    assert np.isfinite(pert[np.isfinite(pert)]).all() and np.nanmax(np.abs(pert)) > 0
print("ok   run in a tank: statuses", status.tolist(), "mask reasons", reason.tolist())
PY

# Refusals.
{ cat "$dir/small.toml"; tank '["10 cm", "16 cm", "12 cm"]' '["0 cm", "0 cm", "0 cm"]'; } > "$dir/narrow.toml"
expect_bad "tank does not hold the fish" "tank.size: the fish" "$murk" solve "$dir/narrow.toml" -o "$dir/x.h5"
{ cat "$dir/tank.toml"; printf '\n[[source]]\nform = "point"\nposition = ["0 cm", "4 cm", "0 cm"]\ncurrent = "1 uA"\n'; } > "$dir/net.toml"
expect_bad "net current into the tank" "net current of 1e-06 A into the closed [tank]" "$murk" solve "$dir/net.toml" -o "$dir/x.h5"
grep -qF "source[1] 1e-06 A" "$dir/err" || fail "the net current message does not name the source"
{ cat "$dir/tank.toml"; printf '\n[[source]]\nform = "point"\nposition = ["0 cm", "4 cm", "0 cm"]\ncurrent = "1 uA"\n[[source]]\nform = "point"\nposition = ["0 cm", "40 cm", "0 cm"]\ncurrent = "-1 uA"\n'; } > "$dir/out_source.toml"
expect_bad "source outside the tank" "tank.size: a source point at (0, 0.4, 0) m lies outside the tank" "$murk" solve "$dir/out_source.toml" -o "$dir/x.h5"
{ cat "$dir/tank.toml"; printf '\n[[probe]]\nname = "far"\nform = "point"\nposition = ["0 cm", "0 cm", "9 cm"]\n'; } > "$dir/probe.toml"
expect_bad "probe outside the tank" "tank.size: probe 'far' at (0, 0, 0.09) m lies outside the tank" "$murk" solve "$dir/probe.toml" -o "$dir/x.h5"
sed -e 's/^conductivity = "100 uS\/cm".*/conductivity = "100 uS\/cm"\nsurface_z = "5 cm"/' "$dir/tank.toml" > "$dir/plane.toml"
expect_bad "plane with a tank" "water.surface_z" "$murk" solve "$dir/plane.toml" -o "$dir/x.h5"
# The compressed solver with a tank: murk solve agrees with the dense solve to 1e-6 of the
# largest value, the electric image too. The image is the difference of two solutions about
# 4,000 times larger, so the tolerances are tight, as in tests/cli/solver_choice.sh.
sed -e 's/^panel_size = "7 mm".*/panel_size = "7 mm"\nsolver = "compressed"\ncompression_tolerance = 1e-12\niteration_tolerance = 1e-13/' \
  "$dir/tank.toml" > "$dir/compressed.toml"
"$murk" solve "$dir/compressed.toml" -o "$dir/compressed.h5" > "$dir/out" 2>&1 || { fail "compressed solve in a tank:"; cat "$dir/out"; }
/usr/bin/python3 - "$dir/solve.h5" "$dir/compressed.h5" <<'PY' || failures=$((failures + 1))
import sys, h5py, numpy as np
with h5py.File(sys.argv[1], "r") as a, h5py.File(sys.argv[2], "r") as b:
    assert b.attrs["system_solver"] in (b"compressed", "compressed"), b.attrs["system_solver"]
    worst = 0.0
    for group in ("baseline/fish", "difference/fish", "baseline/tank"):
        for field in a[group].keys():
            x, y = np.asarray(a[group][field]), np.asarray(b[group][field])
            if x.dtype.kind in "fc" and x.size and np.abs(x).max() > 0:
                worst = max(worst, float(np.abs(x - y).max() / np.abs(x).max()))
    assert worst < 1e-6, worst
print(f"ok   compressed solve in a tank equals the dense one (largest relative difference {worst:.1e})")
PY
[ -e "$dir/x.h5" ] && fail "a refused case left a result file"

[ "$failures" -eq 0 ] || { echo "$failures failure(s)"; exit 1; }
echo "all tank checks passed"
