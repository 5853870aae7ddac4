#!/usr/bin/env bash
# The wall_distance axis (cases/sweep/moved_boundary.hpp) on a fish in a [tank]:
# - /sweep/wall_distance is a coordinate that xarray opens, with the wall's side
#   (attribute wall) and its coordinate per value (wall_y), and that coordinate is the
#   fish's farthest skin point towards the wall plus the gap (read from /mesh/fish);
# - a swept value equals the same case with the tank moved there by hand (to 1e-9:
#   the hand-placed centre is the written wall coordinate minus half the tank's width,
#   which can differ from the run's own in the last bit);
# - as the wall recedes, the prey's signal approaches its value with the wall far away:
#   the relative difference falls at every step;
# - a cylinder's curved wall keeps exactly the gap from the fish's farthest vertex, and
#   prey that would come too near that wall are masked;
# - murk inspect names the tank, its reference and the axis;
# - refusals, each one line with exit status 2: the axis without a tank, without its wall,
#   with a wall that is not a side wall, together with surface_distance, a gap the box
#   cannot take beside the fish, a gap the cylinder cannot take at all.
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
base="$src/cases/examples/fish_detection.toml"
py=/usr/bin/python3
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
source "$src/tests/cli/expect_refusal.bash"  # expect_bad NAME TEXT COMMAND...
# Three prey distances on the +y side, one size, one water, the exact path.
sed -e 's/^distance = .*/distance = { from = "3 mm", to = "3 cm", count = 3 }/' \
    -e 's/^size = .*/size = ["2 mm"]/' -e 's/^water_conductivity = .*/water_conductivity = ["100 uS\/cm"]/' \
    -e 's/^\[sweep\]/[sweep]\nmethod = "exact"/' "$base" > "$dir/small.toml"
box='\n[tank]\nshape = "box"\nsize = ["30 cm", "16 cm", "12 cm"]\ncentre = ["0 cm", "0 cm", "0 cm"]\npanel_size = "3 cm"\n'
axis() {  # WALL VALUES -> the small case with the axis in [sweep]
  sed -e "s/^\[sweep\]/[sweep]\nwall = \"$1\"\nwall_distance = $2/" "$dir/small.toml"
}
# The wall on the far side from the prey (-y), four gaps; the last stands for "far away".
{ axis "-y" '["1 cm", "2 cm", "4 cm", "8 cm"]'; printf "$box"; } > "$dir/wall.toml"
"$murk" run "$dir/wall.toml" -o "$dir/wall.h5" --quiet > "$dir/out" 2>&1 || { fail "run with the axis:"; cat "$dir/out"; }
"$py" - "$dir/wall.h5" > "$dir/centre.txt" <<'PY' || fail "the wall_distance coordinate"
import sys, h5py, numpy as np, xarray as xr
with h5py.File(sys.argv[1], "r") as f:
    d = f["sweep/wall_distance"]
    wall = d.attrs["wall"]; wall = wall.decode() if isinstance(wall, bytes) else str(wall)
    assert wall == "-y", wall
    at = np.asarray(d.attrs["wall_y"]); gaps = np.asarray(d)
    body_min_y = np.asarray(f["mesh/fish/vertices"])[:, 1].min()
    assert np.allclose(at, body_min_y - gaps, rtol=0, atol=1e-12), (at, body_min_y, gaps)
    assert np.all(np.asarray(f["sweep/status"]) == 1)
ds = xr.open_dataset(sys.argv[1], group="sweep", engine="h5netcdf")
assert "wall_distance" in ds.coords and ds["wall_distance"].attrs["units"] == "m"
assert "wall_distance" in ds["perturbation"].dims
print(f"{at[1] + 0.08:.17g}")  # the tank's centre at the second gap (half of 16 cm beyond the wall)
PY
centre=$(cat "$dir/centre.txt")
"$murk" inspect "$dir/wall.h5" > "$dir/inspect.txt" 2>&1 || fail "inspect"
grep -q '^  water bounds:   closed tank walls' "$dir/inspect.txt" && grep -q '^  reference:      mean over the tank walls is zero' "$dir/inspect.txt" \
  && grep -q '^  wall_distance (mm) ' "$dir/inspect.txt" || { fail "inspect does not show the tank and the axis:"; cat "$dir/inspect.txt"; }
echo "ok   wall coordinate and xarray; the second gap puts the tank's centre at y = $centre m"
# The second value by hand.
{ cat "$dir/small.toml"; printf "$box" | sed -e "s/^centre = .*/centre = [\"0 m\", \"$centre m\", \"0 m\"]/"; } > "$dir/hand.toml"
"$murk" run "$dir/hand.toml" -o "$dir/hand.h5" --quiet > "$dir/out" 2>&1 || { fail "run by hand:"; cat "$dir/out"; }
"$py" - "$dir/wall.h5" "$dir/hand.h5" <<'PY' || fail "a swept value against the tank moved by hand"
import sys, h5py, numpy as np
with h5py.File(sys.argv[1], "r") as a, h5py.File(sys.argv[2], "r") as b:
    swept = np.asarray(a["sweep/perturbation"])[0]  # (water, wall_distance, size, distance, sensor), one water
    hand = np.asarray(b["sweep/perturbation"])[0]   # (water, size, distance, sensor)
    assert swept.shape[1:] == hand.shape, (swept.shape, hand.shape)
    err = np.abs(swept[1] - hand).max() / np.abs(hand).max()
    assert err < 1e-9, err
    # Receding wall: the peak change approaches the farthest gap's, at every step.
    peak = np.abs(swept).max(axis=-1)               # per gap, size, distance
    rel = [np.abs(peak[k] - peak[-1]).max() / np.abs(peak[-1]).max() for k in range(3)]
    assert rel[0] > rel[1] > rel[2] > 0, rel
print(f"ok   swept value = moved by hand ({err:.1e}); difference from the 8 cm gap at 1, 2, 4 cm: "
      + ", ".join(f"{r:.3g}" for r in rel))
PY
# A cylinder: the curved wall on +y, 5 mm from the fish; the prey 5 cm out would cross it
# and is masked.
cyl='\n[tank]\nshape = "cylinder"\nradius = "8.5 cm"\nheight = "12 cm"\ncentre = ["0 cm", "0 cm", "0 cm"]\npanel_size = "3 cm"\n'
{ axis "+y" '["5 mm"]' | sed -e 's/^distance = .*/distance = { from = "3 mm", to = "5 cm", count = 3 }/'; printf "$cyl"; } > "$dir/cyl.toml"
"$murk" run "$dir/cyl.toml" -o "$dir/cyl.h5" --quiet > "$dir/out" 2>&1 || { fail "run in a cylinder:"; cat "$dir/out"; }
"$py" - "$dir/cyl.h5" <<'PY' || fail "the cylinder's gap"
import sys, h5py, numpy as np
with h5py.File(sys.argv[1], "r") as f:
    wall_y = float(np.asarray(f["sweep/wall_distance"].attrs["wall_y"])[0])
    v = np.asarray(f["mesh/fish/vertices"])
    cx, cy, radius, gap = 0.0, wall_y - 0.085, 0.085, 0.005
    reach = np.hypot(v[:, 0] - cx, v[:, 1] - cy).max()
    assert abs(radius - reach - gap) < 1e-9, (radius - reach, gap)
    reason = np.asarray(f["sweep/mask_reason"]).ravel()
    assert (reason == 3).sum() >= 1 and (np.asarray(f["sweep/status"]).ravel() == 1).sum() >= 1, reason
print(f"ok   cylinder: least gap to the curved wall {radius - reach:.12g} m; mask reasons {reason.tolist()}")
PY

# Refusals.
axis "-y" '["1 cm"]' > "$dir/no_tank.toml"
expect_bad "axis without a tank" "sweep.wall_distance: moves a wall of the tank" "$murk" run "$dir/no_tank.toml" -o "$dir/x.h5"
{ sed -e 's/^\[sweep\]/[sweep]\nwall_distance = ["1 cm"]/' "$dir/small.toml"; printf "$box"; } > "$dir/no_wall.toml"
expect_bad "axis without its wall" "sweep.wall" "$murk" run "$dir/no_wall.toml" -o "$dir/x.h5"
{ axis "+z" '["1 cm"]'; printf "$box"; } > "$dir/top.toml"
expect_bad "a wall that is not a side wall" "sweep.wall" "$murk" run "$dir/top.toml" -o "$dir/x.h5"
{ axis "-y" '["1 cm"]' | sed -e 's/^\[sweep\]/[sweep]\nsurface_distance = ["1 cm"]/'; printf "$box"; } > "$dir/two.toml"
expect_bad "two moved boundaries" "a sweep moves one boundary" "$murk" run "$dir/two.toml" -o "$dir/x.h5"
{ axis "-y" '["1 cm", "15.5 cm"]'; printf "$box"; } > "$dir/wide.toml"
expect_bad "a gap the box cannot take" "sweep.wall_distance = 0.155 m: the tank cannot be placed" "$murk" run "$dir/wide.toml" -o "$dir/x.h5"
{ axis "+y" '["4 cm"]'; printf "$cyl"; } > "$dir/small_cyl.toml"
expect_bad "a gap the cylinder cannot take" "sweep.wall_distance = 0.04 m: the tank of radius 0.085 m cannot hold the body" "$murk" run "$dir/small_cyl.toml" -o "$dir/x.h5"
[ -e "$dir/x.h5" ] && fail "a refused case left a result file"

[ "$failures" -eq 0 ] || { echo "$failures failure(s)"; exit 1; }
echo "wall distance axis: all checks passed"
