#!/usr/bin/env bash
# `murk run` end to end on a small fish sweep (water conductivity x object conductivity x
# size x distance), read back with h5py the way a user would: the axes as dimension
# scales with units, units and long_name on every dataset, masked points (status 2, NaN),
# the signal-to-noise ratio and detection probability against their formulas, the same
# case with the receptor noise doubled, the detection range monotone in size, the root
# metadata, `murk inspect`'s detection table, and no overwriting without --force.
# A second, tiny grid sweep puts the object inside the body: that point must be masked.
# The runs use one thread: on a busy machine (ctest -j) more threads than free cores slow
# murk down several times over.
# Usage: run_sweep.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees h5py and numpy
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }

# The case (all numbers invented for this test). The fish is centred at the origin, nose
# toward +x; the water surface is 3.5 cm above its axis. The pebble starts above the
# deepest part of the body (x = 3 cm) and moves straight up. At a clearance of 40 mm the
# pebble's bottom is more than 40 mm above z = 0 (the body's top under it is above its
# axis), so the pebble would stick out of the water: every point at 40 mm must be masked.
# At 10 mm or less its top stays below about 12 + 10 + 8 = 30 mm (body at most 11.7 mm
# high, profile 0.078 x 15 cm; largest pebble 8 mm across), well inside the water.
cat > "$dir/sweep.toml" <<'EOF'
# Test case of tests/cli/run_sweep.sh; all numbers invented.
title = "small fish sweep under a water surface"

[water]
conductivity = "100 uS/cm"
surface_z = "3.5 cm"

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
name = "pebble"
shape = "sphere"
radius = "2 mm"
position = ["3 cm", "0 cm", "2.5 cm"]
conductivity = "0.5 S/m"

[sweep]
object = "pebble"
distance = ["2 mm", "3 mm", "4.5 mm", "7 mm", "10 mm", "40 mm"]
direction = [0, 0, 1]
size = ["1 mm", "2 mm", "4 mm"]
conductivity = ["insulator", "conductor"]
water_conductivity = ["300 uS/cm"]    # an axis of one value replaces water.conductivity

[detection]
receptor_noise = "2 uV"
receptor_density = "20 cm^-2"
false_alarm_probability = 1e-3
probability_level = 0.5
EOF
sed 's/^receptor_noise = "2 uV"/receptor_noise = "4 uV"/' "$dir/sweep.toml" > "$dir/noisy.toml"
grep -q '^receptor_noise = "4 uV"' "$dir/noisy.toml" || { echo "could not write the noisy case"; exit 1; }

start=$SECONDS
"$murk" run "$dir/sweep.toml" -o "$dir/sweep.h5" --quiet --threads 1 2> "$dir/err.txt" || { cat "$dir/err.txt"; echo "murk run failed"; exit 1; }
"$murk" run "$dir/noisy.toml" -o "$dir/noisy.h5" --quiet --threads 1 2> "$dir/err.txt" || { cat "$dir/err.txt"; echo "murk run (noisy) failed"; exit 1; }
echo "two runs of 36 points: $((SECONDS - start)) s"

"$murk" inspect "$dir/sweep.h5" > "$dir/inspect.txt" 2> "$dir/err.txt" || fail "murk inspect: $(cat "$dir/err.txt")"

"$py" - "$dir" <<'PY' || failures=$((failures + 1))
import hashlib, math, os, re, statistics, sys
import h5py
import h5py.h5ds
import numpy as np

d = sys.argv[1]
bad = []
def check(ok, what):
    if not ok:
        bad.append(what)

Q = lambda x: 0.5 * math.erfc(x / math.sqrt(2.0))          # right tail of N(0, 1)
Qinv = lambda p: statistics.NormalDist().inv_cdf(1.0 - p)  # its inverse (Python's own)

a = h5py.File(os.path.join(d, "sweep.h5"), "r")
b = h5py.File(os.path.join(d, "noisy.h5"), "r")
case_text = open(os.path.join(d, "sweep.toml"), encoding="utf-8").read()

# ---- root metadata (cases/RESULT_LAYOUT.md)
at = a.attrs
for key in ("murk_version", "title", "case", "case_sha256", "created_utc", "command", "approximation"):
    check(key in at and isinstance(at[key], str) and at[key] != "", f"root attribute {key} missing or empty")
check(at.get("case") == case_text, "the case attribute is not the case file's text")
check(at.get("case_sha256") == hashlib.sha256(case_text.encode()).hexdigest(), "case_sha256 is not the SHA-256 of the case text")
check(re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ", str(at.get("created_utc", ""))) is not None,
      f"created_utc {at.get('created_utc')!r} is not an ISO 8601 UTC time")
cmd = str(at.get("command", ""))
check(" run " in cmd and "sweep.toml" in cmd and "sweep.h5" in cmd, f"command {cmd!r} is not the command line")
check(at.get("title") == "small fish sweep under a water surface", "title attribute")

# ---- axes: 1-D, dimension scales, units, long_name, the case's values converted by hand
names = ["water_conductivity", "conductivity", "size", "distance"]   # cases/README.md, axis order
expected = {
    "water_conductivity": ([0.03], "S m-1"),              # 300 uS/cm = 300e-6 S / 1e-2 m
    "conductivity": ([0.0, math.inf], "S m-1"),           # insulator, conductor
    "size": ([1e-3, 2e-3, 4e-3], "m"),
    "distance": ([2e-3, 3e-3, 4.5e-3, 7e-3, 10e-3, 40e-3], "m"),
}
status = a["sweep/status"]
shape = tuple(len(expected[n][0]) for n in names)
check(status.shape == shape, f"/sweep/status has shape {status.shape}, expected {shape}")
check(status.dtype == np.uint8, f"/sweep/status is {status.dtype}, expected uint8")
for n in names:
    ds = a[f"sweep/{n}"]
    values, units = expected[n]
    check(ds.ndim == 1 and h5py.h5ds.is_scale(ds.id), f"/sweep/{n} is not a 1-D dimension scale")
    check(ds.attrs.get("units") == units, f"/sweep/{n} units {ds.attrs.get('units')!r}, expected {units!r}")
    check(np.allclose(ds[()], values, rtol=1e-12, atol=0) or np.array_equal(ds[()], values),
          f"/sweep/{n} holds {ds[()]}, expected {values}")
check(h5py.h5ds.is_scale(a["sweep/sensor"].id), "/sweep/sensor is not a dimension scale")

def dim_names(ds):
    return [dim[0].name if len(dim) else None for dim in ds.dims]

# Every /sweep dataset laid out over the axes names them, in order; /falloff and /detection
# name the axes (other than distance) by copies of their own, because netCDF-4 readers look
# for a dimension's coordinate only in the dataset's group and its parents (cases/RESULT_LAYOUT.md).
axis_paths = [f"/sweep/{n}" for n in names]
for key, ds in a["sweep"].items():
    if isinstance(ds, h5py.Dataset) and ds.shape[:len(shape)] == shape and ds.ndim >= len(shape):
        check(dim_names(ds)[:len(shape)] == axis_paths, f"/sweep/{key}: dimensions {dim_names(ds)}, expected {axis_paths} first")
check(dim_names(a["sweep/perturbation"])[-1] == "/sweep/sensor", "/sweep/perturbation: last dimension is not /sweep/sensor")
for group in ("falloff", "detection"):
    own = [f"/{group}/{n}" for n in names]
    others = [p for p in own if not p.endswith("/distance")]
    for n in names:
        if f"{group}/{n}" in a:
            copy, original = a[f"{group}/{n}"], a[f"sweep/{n}"]
            check(np.array_equal(copy[()], original[()]) and copy.attrs["units"] == original.attrs["units"],
                  f"/{group}/{n} is not a copy of /sweep/{n}")
    for key, ds in a[group].items():
        if key in names:
            continue
        if ds.shape == shape[:-1]:
            check(dim_names(ds) == others, f"/{group}/{key}: dimensions {dim_names(ds)}, expected {others}")
        elif ds.shape == shape:
            check(dim_names(ds) == own, f"/{group}/{key}: dimensions {dim_names(ds)}, expected {own}")

# ---- units and long_name on every dataset (labels, such as xyz, are not quantities: no units)
def visit(name, obj):
    if isinstance(obj, h5py.Dataset):
        needs = ("long_name",) if obj.dtype.kind == "O" else ("units", "long_name")
        check(all(k in obj.attrs for k in needs), f"/{name}: units or long_name missing")
a.visititems(visit)

# ---- masked and computed points
st = status[()]
check(set(np.unique(st)) <= {1, 2}, f"status holds {np.unique(st)} in a finished run (expected 1 and 2 only)")
check((st[..., 5] == 2).all(), "a pebble 40 mm above the body would leave the water: those points must be masked")
check((st[..., :5] == 1).all(), "points at 10 mm or less lie well inside the water and must be computed")
# Why each point is masked (codes in cases/RESULT_LAYOUT.md): 3 = reaches through the plane.
reason = a["sweep/mask_reason"][()]
check((reason[..., 5] == 3).all(), f"the pebbles above the water surface must be masked as beyond the plane, got {np.unique(reason[..., 5])}")
check((reason[..., :5] == 0).all(), "computed points must carry mask reason 0")
masked, done = st == 2, st == 1
pert = a["sweep/perturbation"][()]
check(pert.dtype.kind == "f", f"/sweep/perturbation is {pert.dtype} (direct current: expected real)")
fields = {k: a[f"sweep/{k}"][()] for k in ("peak_perturbation", "image_width", "snr", "detection_probability", "peak_position")}
fields["perturbation"] = pert
fields["local_exponent"] = a["falloff/local_exponent"][()]
for k, v in fields.items():
    check(np.isnan(v[masked]).all(), f"{k}: masked points are not NaN (status 2 must not hide a number, not even zero)")
    if k != "local_exponent":
        check(np.isfinite(v[done]).all(), f"{k}: a computed point is not finite")
check((a["falloff/near_fourth_power"][()][masked] == 2).all(), "near_fourth_power is not 2 (unknown) at masked points")
check(np.isfinite(a["sweep/object_position"][()][done]).all(), "object_position of a computed point is not finite")

# peak = largest |perturbation| over the skin panels, at the panel named (RESULT_LAYOUT.md)
absp = np.abs(pert[done])
check(np.array_equal(fields["peak_perturbation"][done], absp.max(axis=-1)), "peak_perturbation is not max |perturbation|")
peak_sensor = a["sweep/peak_sensor"][()][done]
check(np.array_equal(absp[np.arange(len(absp)), peak_sensor], absp.max(axis=-1)), "peak_sensor is not where the peak is")
body = str(a.attrs.get("body", "fish"))
centroid = a[f"mesh/{body}/centroid"][()]
check(np.array_equal(fields["peak_position"][done], centroid[peak_sensor]), "peak_position is not the peak panel's centroid")

# ---- signal-to-noise ratio and detection probability against their formulas
# Ideal observer of a known signal in independent Gaussian noise (Kay 1998, Fundamentals of
# Statistical Signal Processing, Vol. II: Detection Theory, ch. 4): d'^2 = sum_k n_k (dV_k/sigma)^2,
# n_k = receptor density x panel area; P_D = Q(Q^-1(P_FA) - d') (Neyman-Pearson).
area = a[f"mesh/{body}/area"][()]
density = 20 / 1e-4            # 20 per cm^2
sigma = 2e-6                   # 2 uV rms
n = density * area
check(np.allclose(a["sweep/receptors"][()], n, rtol=1e-12, atol=0), "/sweep/receptors is not density x panel area")
snr = fields["snr"]
expect = np.sqrt((n * (pert / sigma) ** 2).sum(axis=-1))
check(np.allclose(snr[done], expect[done], rtol=1e-12, atol=0),
      f"snr differs from sqrt(sum n_k (dV_k/sigma)^2) by up to {np.nanmax(np.abs(snr[done] / expect[done] - 1)):.3g} (relative)")
pfa = a["detection"].attrs["false_alarm_probability"]
level = a["detection"].attrs["probability_level"]
check(pfa == 1e-3 and level == 0.5, f"detection attributes {pfa}, {level}: expected 0.001 and 0.5")
pd = fields["detection_probability"]
pd_expect = np.vectorize(lambda s: Q(Qinv(pfa) - s))(snr[done])
check(np.allclose(pd[done], pd_expect, rtol=0, atol=1e-12), "detection_probability is not Q(Q^-1(P_FA) - d')")
check(snr[done].min() < 1 < snr[done].max(), "the sweep should span undetectable and detectable points (test design)")

# the same case with the receptor noise doubled: the perturbation is the same, d' halves
snr_b, pd_b = b["sweep/snr"][()], b["sweep/detection_probability"][()]
check(np.array_equal(b["sweep/status"][()], st), "noisy run: status differs")
check(np.array_equal(b["sweep/perturbation"][()], pert, equal_nan=True), "noisy run: perturbation differs")
check(np.allclose(snr_b[done], snr[done] / 2, rtol=1e-12, atol=0), "doubling the receptor noise does not halve d'")
pd_b_expect = np.vectorize(lambda s: Q(Qinv(pfa) - s / 2))(snr[done])
check(np.allclose(pd_b[done], pd_b_expect, rtol=0, atol=1e-12), "noisy run: P_D is not Q(Q^-1(P_FA) - d'/2)")
check(np.abs(pd_b[done] - pd[done]).max() > 0.1, "doubling the noise should change some P_D clearly (test design)")

# ---- detection range: monotone in size, consistent with P_D along distance
dist = np.array(expected["distance"][0])
def range_key(status, rng):
    # order: never detectable (3) < a range crossed inside the sweep (1, by distance) < beyond the sweep (2)
    return {3: (0, 0.0), 1: (1, float(rng)), 2: (2, 0.0)}[int(status)]
for f, label, pdv in ((a, "sweep.h5", pd), (b, "noisy.h5", pd_b)):
    rs, rr = f["detection/status"][()], f["detection/range"][()]
    check(rs.shape == shape[:-1], f"{label}: /detection/status shape {rs.shape}")
    check(set(np.unique(rs)) <= {1, 2, 3}, f"{label}: detection status holds {np.unique(rs)}")
    check(np.isfinite(rr[rs == 1]).all() and np.isnan(rr[rs != 1]).all(), f"{label}: range is not finite exactly where crossed")
    for w in range(shape[0]):
        for c in range(shape[1]):
            keys = [range_key(rs[w, c, s], rr[w, c, s]) for s in range(shape[2])]
            check(all(k1 <= k2 for k1, k2 in zip(keys, keys[1:])),
                  f"{label}: detection range falls with size at water {w}, conductivity {c}: {keys}")
    # a range crossed inside the sweep lies after the last detectable computed distance and
    # before the next computed one, interpolated linearly in ln(distance) (cases/README.md)
    for idx in zip(*np.nonzero(rs == 1)):
        line = pdv[idx]
        ok = np.flatnonzero(np.isfinite(line))
        last = max(k for k in ok if line[k] >= level)
        nxt = min(k for k in ok if k > last)
        t = (line[last] - level) / (line[last] - line[nxt])
        r = math.exp(math.log(dist[last]) + t * (math.log(dist[nxt]) - math.log(dist[last])))
        check(math.isclose(rr[idx], r, rel_tol=1e-12), f"{label}: range at {idx} is {rr[idx]}, expected {r}")
rs_a, rs_b = a["detection/status"][()], b["detection/status"][()]
check((rs_a == 1).any() and len({tuple(x) for x in rs_a.reshape(-1, shape[2])}) > 1,
      "the detection ranges should differ between lines and cross inside the sweep somewhere (test design)")
# more noise never lengthens the range
ka = [range_key(s, r) for s, r in zip(rs_a.ravel(), a["detection/range"][()].ravel())]
kb = [range_key(s, r) for s, r in zip(rs_b.ravel(), b["detection/range"][()].ravel())]
check(all(y <= x for x, y in zip(ka, kb)), "doubling the noise lengthened a detection range")
check(ka != kb, "doubling the noise changed no detection range (test design)")

# ---- murk inspect: one row of the detection table per line, with the range from the file
table = open(os.path.join(d, "inspect.txt"), encoding="utf-8").read().splitlines()
def cond_text(v):
    return "0 \\(insulator\\)" if v == 0 else "inf \\(conductor\\)"
rr = a["detection/range"][()]
for w, wv in enumerate(expected["water_conductivity"][0]):
    for c, cv in enumerate(expected["conductivity"][0]):
        for s, sv in enumerate(expected["size"][0]):
            code = rs_a[w, c, s]
            text = {1: f"{rr[w, c, s] * 1e3:.1f} mm", 2: "beyond the sweep", 3: "not detectable within the sweep"}[int(code)]
            row = re.compile(rf"\s+{wv:g}\s+{cond_text(cv)}\s+{sv * 1e3:g}\s+{re.escape(text)}.*")
            check(any(row.fullmatch(line) for line in table), f"murk inspect has no row for {wv:g}, {cv}, {sv:g}: {text}")
check(any("detection range" in line for line in table), "murk inspect prints no detection range header")

if bad:
    print("\n".join("FAIL " + x for x in bad))
    sys.exit(1)
print("sweep file: every check passed")
PY

# ---- a grid point inside the body is masked; one beside it is computed
# The sphere (2 mm) centred 1 mm from the body axis at mid-length, where the body is more than
# 6 mm wide on each side, lies wholly inside the body.
sed -e '/^\[sweep\]/,$d' -e 's/^surface_z.*//' "$dir/sweep.toml" > "$dir/grid.toml"
cat >> "$dir/grid.toml" <<'EOF'
[sweep]
size = ["2 mm"]
[sweep.grid]
origin = ["-1 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = ["1 cm"]
v = ["1 mm", "3 cm"]
EOF
"$murk" run "$dir/grid.toml" -o "$dir/grid.h5" --threads 1 > /dev/null 2> "$dir/err.txt" || fail "grid run: $(cat "$dir/err.txt")"
grep -q "masked points: 1 touching the body" "$dir/err.txt" || fail "the run does not print its masked points per reason: $(cat "$dir/err.txt")"
"$py" - "$dir/grid.h5" <<'PY' || failures=$((failures + 1))
import sys
import h5py
import numpy as np
with h5py.File(sys.argv[1], "r") as f:
    st = f["sweep/status"][()]
    assert st.shape == (1, 1, 2), st.shape
    assert st[0, 0, 0] == 2, f"the grid point inside the body has status {st[0, 0, 0]}, expected 2 (masked)"
    assert st[0, 0, 1] == 1, f"the grid point 3 cm out has status {st[0, 0, 1]}, expected 1"
    reason = f["sweep/mask_reason"][()]
    assert reason[0, 0, 0] == 1, f"the point inside the body has mask reason {reason[0, 0, 0]}, expected 1 (touches the body)"
    assert reason[0, 0, 1] == 0, "a computed point must carry mask reason 0"
    for k in ("perturbation", "peak_perturbation", "image_width"):
        v = f[f"sweep/{k}"][()]
        assert np.isnan(v[0, 0, 0]).all(), f"{k} of the masked point is not NaN"
        assert np.isfinite(v[0, 0, 1]).all(), f"{k} of the computed point is not finite"
    assert "analysis_note" in f.attrs  # no distance axis: the file says why there is no range
print("grid: the point inside the body is masked")
PY

# ---- a robot: sensor channels, the amplifier noise model, and the sign and size of the
# change for an insulator, two conductivities and a perfect conductor far from the hull.
sed -e 's/^distance = .*/distance = ["15 cm", "24 cm"]/' "$src/cases/examples/robot_detection.toml" > "$dir/robot.toml"
grep -q '^distance = \["15 cm", "24 cm"\]' "$dir/robot.toml" || fail "could not shorten robot_detection.toml"
"$murk" run "$dir/robot.toml" -o "$dir/robot.h5" --quiet --threads 1 2> "$dir/err.txt" || fail "robot run: $(cat "$dir/err.txt")"
"$py" - "$dir/robot.h5" <<'PY' || failures=$((failures + 1))
import math, sys
import h5py
import numpy as np
with h5py.File(sys.argv[1], "r") as f:
    assert f["sweep/sensor"].attrs["sensor_names"] == "S1,S2,S3", f["sweep/sensor"].attrs["sensor_names"]
    pert = f["sweep/perturbation"]
    assert pert.attrs["units"] == "V" and pert.shape == (4, 2, 3), (pert.attrs["units"], pert.shape)
    p = pert[()]
    assert (f["sweep/status"][()] == 1).all()
    # Amplifier noise of a plain average over T: noise bandwidth B = 1/(2T) (Parseval on the
    # boxcar; common practice), sigma = 30 nV/sqrt(Hz) x sqrt(B) with T = 2 ms (the example's
    # values); ideal observer d' = sqrt(sum_i (dV_i/sigma)^2) (Kay 1998, Vol. II, ch. 4).
    sigma = 30e-9 * math.sqrt(1 / (2 * 2e-3))
    snr = f["sweep/snr"][()]
    expect = np.sqrt(((p / sigma) ** 2).sum(axis=-1))
    assert np.allclose(snr, expect, rtol=1e-12, atol=0), np.abs(snr / expect - 1).max()
    # Far from the hull the sphere (1.5 cm) acts as an induced dipole proportional to
    # (s - s_w) / (s + 2 s_w) (Maxwell's sphere in a uniform field, Jackson, Classical
    # Electrodynamics, 3rd ed., section 4.4, with conductivities for permittivities), so the
    # change at every sensor relative to the perfect conductor's is -1/2 for the insulator,
    # (0.03 - 0.02) / (0.03 + 0.04) = 1/7 and (0.2 - 0.02) / (0.2 + 0.04) = 3/4. Tolerance 5 %:
    # the field is not uniform over the sphere, and its mesh is coarse.
    for k, factor in ((0, -0.5), (1, 1 / 7), (2, 0.75)):
        ratio = p[k, -1] / p[3, -1]
        assert np.allclose(ratio, factor, rtol=0.05, atol=0), (k, ratio, factor)
    print("robot: sensor channels, amplifier noise and dipole factors ok")
PY

# ---- an existing result is not replaced without --force: exit 2, one line, file untouched
before="$(sha256sum < "$dir/sweep.h5")"
"$murk" run "$dir/sweep.toml" -o "$dir/sweep.h5" --quiet > /dev/null 2> "$dir/err.txt"
status=$?
lines=$(wc -l < "$dir/err.txt")
if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -q -- "--force" "$dir/err.txt" || ! grep -q "sweep.h5" "$dir/err.txt"; then
  fail "existing output: status $status, $lines lines: $(cat "$dir/err.txt")"
fi
[ "$before" = "$(sha256sum < "$dir/sweep.h5")" ] || fail "the existing output was modified"
[ ! -e "$dir/sweep.h5.partial" ] || fail "a refused run left sweep.h5.partial behind"
# with --force it is replaced
"$murk" run "$dir/grid.toml" -o "$dir/sweep.h5" --quiet --force 2> "$dir/err.txt" || fail "--force: $(cat "$dir/err.txt")"
"$py" -c 'import sys, h5py; f = h5py.File(sys.argv[1], "r"); assert "grid_u" in f["sweep"]' "$dir/sweep.h5" \
  || fail "--force did not replace the result"

echo "run_sweep: $((SECONDS - start)) s"
[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "run sweep: ok"
