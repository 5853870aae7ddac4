#!/usr/bin/env bash
# murk layout on the shipped three-layout example (cases/examples/robot_layouts.toml, coarse
# panels: seconds): the result opens in xarray with both engines and every name in it is in
# cases/RESULT_LAYOUT.md; murk inspect prints the comparison table; the baseline readings of a
# one-layout case equal what murk solve computes for the same electrodes; the bound on the
# target's position is finite where computed and shrinks tenfold with ten times less noise; bad input is one
# line with exit status 2 and leaves no file behind.
# Usage: layout_compare.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
example="$src/cases/examples/robot_layouts.toml"

"$murk" layout "$example" -o "$dir/layouts.h5" --quiet --threads 2 2> "$dir/err.txt" \
  || { cat "$dir/err.txt"; echo "murk layout failed"; exit 1; }
[ -e "$dir/layouts.h5.partial" ] && fail "a finished run left its partial file"
"$py" "$src/tests/cli/check_netcdf_readers.py" "$dir/layouts.h5" || fail "netCDF readers"
"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir/layouts.h5" || fail "RESULT_LAYOUT.md"

# What the file says, read with h5py: three layouts, maps of the grid's shape, probabilities in
# [0, 1], an area no larger than the grid's, and a polygon whose shoelace area is near it.
"$py" - "$dir/layouts.h5" <<'PY' || fail "contents of the result"
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
assert f.attrs["water_planes"] == 0 and f.attrs["water_images"] == 0, dict(f.attrs)  # open water
names = f["layout_comparison"].attrs["layout_names"].split(",")
assert names == ["ends_reference", "ends_pairs", "middle_held"], names
for name in names:
    g = f["layouts"][name]
    nu, nv, ns = len(g["u"]), len(g["v"]), len(g["size"])
    nr = len(g["reading"])
    assert g["sensitivity"].shape == (nu, nv, 3, nr)
    pd = g["detection_probability"][...]
    assert pd.shape == (ns, nu, nv)
    ok = np.isfinite(pd)
    assert ok.any() and (pd[ok] >= 0).all() and (pd[ok] <= 1).all()
    blocked = g["target_status"][...] == 1
    assert (np.isnan(pd) == blocked).all(), "NaN exactly where the target does not fit"
    grid_area = (g["u"][-1] - g["u"][0]) * (g["v"][-1] - g["v"][0])
    area = g["detectable_area"][...]
    assert (area >= 0).all() and (area <= grid_area + 1e-12).all(), area
    # The bigger target is detectable over at least the smaller one's area (it polarizes 8x more).
    assert area[-1] >= area[0], area
    if "outline_u" in g:
        u, v, ring = g["outline_u"][...], g["outline_v"][...], g["outline_ring"][...]
        hole = g["outline_hole"][...]
        size = g["outline_size"][...]
        for k in range(ns):
            total = 0.0
            for r in np.unique(ring[size == g["size"][k]]):
                m = ring == r
                a = 0.5 * abs(np.sum(u[m][:-1] * v[m][1:] - u[m][1:] * v[m][:-1]))
                total += -a if hole[m][0] else a
            # Simplified by a quarter of a grid step: within a few per cent of the cells' area.
            if area[k] > 0:
                assert abs(total - area[k]) <= 0.1 * area[k], (name, k, total, area[k])
print("ok   contents of the layout result")
PY

# The bound on the target's position ([detection] localization_accuracy in the example): finite
# where the status is ok, NaN where not computed, within_accuracy as the longest semi-axis says.
"$py" - "$dir/layouts.h5" <<'PY' || fail "position bound"
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
cmp = f["layout_comparison"]
for name in cmp.attrs["layout_names"].split(","):
    g = f["layouts"][name]
    ns, nu, nv = len(g["size"]), len(g["u"]), len(g["v"])
    st = g["localization_status"]
    words = st.attrs["flag_meanings"].split()
    code = dict(zip(words, st.attrs["flag_values"]))
    st = st[...]
    sd, ax = g["position_sd"][...], g["error_semi_axes"][...]
    assert sd.shape == (ns, nu, nv, 3) and ax.shape == (ns, nu, nv, 3), (sd.shape, ax.shape)
    ok = st == code["ok"]
    computed = st != code["not_computed"]
    if len(g["reading"]) < 3:
        # Fewer readings than the three coordinates: J = G^T C^-1 G has rank below 3 (common practice).
        assert (st[computed] == code["singular"]).all() and np.isinf(sd[computed]).any(), name
    elif name == "ends_reference":  # the layout with patches
        assert ok.sum() > 0, name
    else:
        # Rings only: the scene is symmetric about the plane z = 0 the targets lie in, so every
        # reading's derivative along z vanishes there (elementary symmetry) and z is not
        # informed: no point may get a finite bound marked ok.
        assert not ok.any() and (st[computed] != code["ok"]).all(), name
    assert np.isfinite(sd[ok]).all() and (sd[ok] > 0).all() and np.isfinite(ax[ok]).all()
    assert (np.diff(ax[ok], axis=-1) <= 0).all(), "semi-axes longest first"
    # The ellipsoid's longest semi-axis bounds every coordinate's standard deviation.
    assert (sd[ok].max(axis=-1) <= ax[ok][:, 0] * (1 + 1e-9)).all()
    # The axes are orthonormal, and with the semi-axes they rebuild the covariance, whose
    # diagonal is position_sd squared (the eigen-decomposition C = sum a^2 d d^T).
    d = g["error_axes"][...]
    assert d.shape == (ns, nu, nv, 3, 3), d.shape
    dk = d[ok]
    assert np.allclose(np.einsum("nki,nli->nkl", dk, dk), np.eye(3), atol=1e-9), "axes not orthonormal"
    cov_diag = np.einsum("nk,nki->ni", ax[ok] ** 2, dk ** 2)
    assert np.allclose(cov_diag, sd[ok] ** 2, rtol=1e-6), "axes and semi-axes do not rebuild position_sd"
    assert np.isnan(d[st == code["not_computed"]]).all()
    off = st == code["not_computed"]
    assert np.isnan(sd[off]).all() and off[g["target_status"][...] == 1].all()
    acc = g["localization_accuracy"][()]
    within = g["within_accuracy"][...] == 1
    assert (within == (ok | (st == code["ill_conditioned"])) & (ax[..., 0] <= acc)).all()
    area = g["localizable_area"][...]
    assert np.array_equal(area, cmp["localizable_area"][list(cmp.attrs["layout_names"].split(",")).index(name)])
    assert ((area > 0) == within.any(axis=(1, 2))).all(), (name, area)
print("ok   position bound: finite where ok, NaN where not computed, within the accuracy as its axes say")
PY

# Fisher information scales as 1/sigma^2 (Kay 1993, "Fundamentals of Statistical Signal
# Processing, Vol. I", ch. 3; from memory), so ten times less noise bounds the position ten
# times tighter: the example again with every noise density divided by 10.
sed -e 's|^amplifier_noise = "30 nV/sqrt(Hz)"|amplifier_noise = "3 nV/sqrt(Hz)"|' \
    -e 's|^noise = "2 pA/sqrt(Hz)"|noise = "0.2 pA/sqrt(Hz)"|' "$example" > "$dir/quiet.toml"
[ "$(grep -c 'nV/sqrt(Hz)"\|pA/sqrt(Hz)"' "$dir/quiet.toml")" -eq 2 ] && grep -q '"3 nV' "$dir/quiet.toml" && grep -q '"0.2 pA' "$dir/quiet.toml" \
  || { echo "could not write the quieter case"; exit 1; }
"$murk" layout "$dir/quiet.toml" -o "$dir/quiet.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk layout, less noise"; }
"$py" - "$dir/layouts.h5" "$dir/quiet.h5" <<'PY' || fail "bound against noise"
import sys, h5py, numpy as np
a, b = h5py.File(sys.argv[1], "r"), h5py.File(sys.argv[2], "r")
for name in a["layout_comparison"].attrs["layout_names"].split(","):
    ga, gb = a["layouts"][name], b["layouts"][name]
    assert np.isclose(ga["channel_noise"][()], 10 * gb["channel_noise"][()], rtol=1e-12)
    st = ga["localization_status"][...]
    assert np.array_equal(st, gb["localization_status"][...]), "the status does not depend on the noise level"
    ok = st == 0
    assert ok.any() or name != "ends_reference", name
    for key in ("position_sd", "error_semi_axes"):
        ratio = ga[key][...][ok] / gb[key][...][ok]
        assert np.allclose(ratio, 10, rtol=1e-7), (name, key, ratio.min(), ratio.max())
    assert (gb["localizable_area"][...] >= ga["localizable_area"][...]).all()
print("ok   ten times less noise: standard deviations and semi-axes ten times smaller")
PY

# xarray, both engines: a value found by its coordinates equals the one h5py reads by index.
"$py" - "$dir/layouts.h5" <<'PY' || fail "xarray selection by coordinates"
import sys, warnings, h5py, numpy as np, xarray as xr
warnings.simplefilter("ignore")
path = sys.argv[1]
h5 = h5py.File(path, "r")
for engine in ("h5netcdf", "netcdf4"):
    for name in ("ends_reference", "middle_held"):
        ds = xr.open_dataset(path, group=f"layouts/{name}", engine=engine)
        g = h5[f"layouts/{name}"]
        i, j, k = 1, 10, 5
        got = ds.detection_probability.sel(size=g["size"][i], u=g["u"][j], v=g["v"][k]).values
        want = g["detection_probability"][i, j, k]
        assert (np.isnan(got) and np.isnan(want)) or got == want, (engine, name, got, want)
        s = ds.sensitivity.sel(u=g["u"][j], v=g["v"][k], xyz="y").values
        assert np.array_equal(s, g["sensitivity"][j, k, 1, :]), (engine, name)
    c = xr.open_dataset(path, group="layout_comparison", engine=engine)
    assert list(c.layout.values) == ["ends_reference", "ends_pairs", "middle_held"], c.layout.values
    assert c.detectable_area.dims == ("layout", "size")
    assert c.localizable_area.dims == ("layout", "size")
    for name in ("ends_reference", "ends_pairs", "middle_held"):
        ds = xr.open_dataset(path, group=f"layouts/{name}", engine=engine)
        assert ds.position_sd.dims == ("size", "u", "v", "xyz"), ds.position_sd.dims
        assert ds.error_semi_axes.dims == ("size", "u", "v", "semi_axis"), ds.error_semi_axes.dims
        assert ds.error_axes.dims == ("size", "u", "v", "semi_axis", "xyz"), ds.error_axes.dims
        ok = (ds.localization_status == 0).values
        computed = (ds.localization_status != 3).values
        if name == "ends_reference":  # its two patches break the symmetry about the grid plane
            assert ok.any() and np.isfinite(ds.position_sd.values[ok]).all(), (engine, name)
        else:
            # Rings only: the scene is symmetric about the plane z = 0 the targets lie in, so a
            # reading's derivative along z vanishes there and z is not informed: singular at
            # every computed point up to rounding (elementary symmetry), never a bound marked ok.
            assert not ok[computed].any(), (engine, name)
        assert np.isfinite(ds.error_semi_axes.values[ok]).all() and ds.within_accuracy.dims == ("size", "u", "v")
print("ok   xarray (h5netcdf, netcdf4) selects layout values by coordinates")
PY

"$murk" inspect "$dir/layouts.h5" > "$dir/inspect.txt" 2>&1 || { cat "$dir/inspect.txt"; fail "murk inspect"; }
for name in ends_reference ends_pairs middle_held; do
  grep -q "^  $name " "$dir/inspect.txt" || fail "murk inspect shows no row for $name"
done
grep -q "layouts compared" "$dir/inspect.txt" && echo "ok   murk inspect prints the comparison table" || fail "murk inspect: no table"
grep -q "localized, 10.0 mm" "$dir/inspect.txt" && echo "ok   murk inspect shows the localizable area" || fail "murk inspect: no localized column"

# The plotting script draws the layouts side by side: one PNG of three columns and,
# as the example asks for the position bound, three rows (4.2 inches per column,
# 5.4 + 4.0 inches high, at its 100 dots per inch, as plot_results.py sets).
"$py" "$src/tools/plot_results.py" "$dir/layouts.h5" -o "$dir" > "$dir/plot.txt" 2>&1 \
  || { cat "$dir/plot.txt"; fail "plot_results.py on the layout file"; }
"$py" - "$dir/layouts_layouts.png" <<'PY' || fail "layout figure"
import struct, sys
data = open(sys.argv[1], "rb").read(32)
assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
w, h = struct.unpack(">II", data[16:24])  # IHDR, the first chunk (PNG specification, 11.2.2)
assert (w, h) == (1260, 940), f"{w} x {h} pixels, expected 1260 x 940"
PY
echo "ok   plot_results.py draws the three layouts side by side"

# One layout against murk solve: the same electrodes as an ordinary robot (roles in
# [[robot.electrode]]); the layout reads r1..r4 against mid, so its readings are the
# differences of the potentials murk solve writes to /baseline/electrodes/potential.
sed -n '1,/^\[\[layout\]\]/p' "$example" | sed '$d' > "$dir/one.toml"
cat >> "$dir/one.toml" <<'TOML'
[[layout]]
name = "only"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", current = "-50 uA" }]
read = "reference"
sensors = ["r1", "r2", "r3", "r4"]
reference = "mid"

[[object]]
name = "target"
shape = "sphere"
radius = "1 cm"
position = ["0 cm", "8 cm", "0 cm"]
conductivity = "conductor"

[sweep]
object = "target"

[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = { from = "-10 cm", to = "10 cm", count = 3 }
v = { from = "6 cm", to = "10 cm", count = 2 }

[detection]
amplifier_noise = "30 nV/sqrt(Hz)"
integration_time = "2 ms"
TOML
"$murk" layout "$dir/one.toml" -o "$dir/one.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk layout on one layout"; }
# murk solve solves a layout case in its first layout; with the target object left out of the
# scene (murk solve would put it in the water) its baseline is the layout's.
sed '/^\[\[object\]\]/,$d' "$dir/one.toml" > "$dir/one_solve.toml"
"$murk" solve "$dir/one_solve.toml" -o "$dir/solve.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk solve"; }
"$py" - "$dir/one.h5" "$dir/solve.h5" <<'PY' || fail "the layout's readings differ from murk solve's"
import sys, h5py, numpy as np
lay, sol = h5py.File(sys.argv[1], "r"), h5py.File(sys.argv[2], "r")
names = [n.decode() if isinstance(n, bytes) else n for n in sol["baseline/electrodes/electrode"][...]]
v = dict(zip(names, sol["baseline/electrodes/potential"][...]))
expect = np.array([v[s] - v["mid"] for s in ("r1", "r2", "r3", "r4")])
got = lay["layouts/only/baseline_reading"][...]
assert np.allclose(got, expect, rtol=1e-9, atol=0), (got, expect)
assert np.abs(expect).max() > 0
print("ok   one layout's baseline readings equal murk solve's electrode potentials")
PY

# Bad input: one line, exit 2, no file (nor partial file) left.
bad() {  # bad NAME SED_EXPRESSION WORDS
  sed -e "$2" "$example" > "$dir/$1.toml"
  "$murk" layout "$dir/$1.toml" -o "$dir/$1.h5" --quiet 2> "$dir/err.txt"; status=$?
  if [ "$status" -eq 2 ] && [ "$(wc -l < "$dir/err.txt")" -eq 1 ] && grep -q "$3" "$dir/err.txt" \
     && [ ! -e "$dir/$1.h5" ] && [ ! -e "$dir/$1.h5.partial" ]; then
    echo "ok   refused: $1"
  else
    fail "$1: status $status, message: $(cat "$dir/err.txt")"
  fi
}
bad unknown_sensor 's/sensors = \["r1", "r2", "r3", "r4", "top", "side"\]/sensors = ["r1", "r9"]/' "no \[\[robot.electrode\]\] is named 'r9'"
bad overlap 's/from = "-6 cm"/from = "-10 cm"/' "overlaps electrode 'r1'"
bad no_grid '/^\[sweep.grid\]/,/^v = /d' "sweep.grid"
bad wrong_noise '/^noise = /d' "give the layout its own noise"
bad negative_accuracy 's/^localization_accuracy = .*/localization_accuracy = "-2 mm"/' "localization_accuracy: a positive length"
bad time_accuracy 's/^localization_accuracy = .*/localization_accuracy = "3 s"/' "localization_accuracy"
bad size_word 's/^localization_accuracy = .*/&\nlocalization_size = "guessed"/' "localization_size: expected one of"
bad size_alone 's/^localization_accuracy = .*/localization_size = "unknown"/' "localization_size: says how the position bound"
"$murk" layout "$example" -o "$dir/layouts.h5" --quiet 2> "$dir/err.txt"
[ $? -eq 2 ] && grep -q "exists" "$dir/err.txt" && echo "ok   an existing result is kept without --force" || fail "existing result: $(cat "$dir/err.txt")"

# A volume of targets: a third grid axis w (murk layout only; murk run refuses it).
sed -e 's/^v = { from = "4 cm", to = "30 cm", count = 14 }/v = { from = "4 cm", to = "30 cm", count = 6 }\nw_direction = [0, 0, 1]\nw = { from = "-6 cm", to = "6 cm", count = 4 }/' \
    -e 's/^u = { from = "-30 cm", to = "30 cm", count = 31 }/u = { from = "-30 cm", to = "30 cm", count = 11 }/' \
    "$example" > "$dir/volume.toml"
grep -q '^w = ' "$dir/volume.toml" || { echo "could not write the volume case"; exit 1; }
"$murk" layout "$dir/volume.toml" -o "$dir/volume.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk layout on a volume"; }
"$py" "$src/tests/cli/check_netcdf_readers.py" "$dir/volume.h5" || fail "netCDF readers, volume"
"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir/volume.h5" || fail "RESULT_LAYOUT.md, volume"
"$py" - "$dir/volume.h5" <<'PY' || fail "contents of the volume result"
import sys, h5py, numpy as np
g = h5py.File(sys.argv[1], "r")["layouts/ends_reference"]
assert g["detection_probability"].shape == (2, 11, 6, 4)
box = 0.6 * 0.26 * 0.12
vol = g["detectable_volume"][...]
assert (vol >= 0).all() and (vol <= box + 1e-12).all() and vol[-1] > 0, vol
assert "outline_u" not in g and "detectable_area" not in g
print("ok   a volume of targets: detectable_volume, no outline")
PY
"$murk" inspect "$dir/volume.h5" | grep -q "volume, " && echo "ok   murk inspect shows volumes" || fail "murk inspect on a volume"
"$murk" run "$dir/volume.toml" -o "$dir/volume_run.h5" --quiet 2> "$dir/err.txt"
[ $? -eq 2 ] && grep -q "sweep.grid.w" "$dir/err.txt" && echo "ok   murk run refuses a third grid axis" || fail "murk run with w: $(cat "$dir/err.txt")"

# The size unknown ([detection] localization_size = "unknown"): a fourth parameter of the
# bound, whose own bound size_sd is written; on the same grid, the position bound can only
# grow when a parameter must be estimated with it (Kay 1993, ch. 3: the inverse of a Schur
# complement of the information dominates the known-size inverse; from memory).
sed -e 's/^localization_accuracy = .*/&\nlocalization_size = "unknown"/' "$dir/volume.toml" > "$dir/size.toml"
"$murk" layout "$dir/size.toml" -o "$dir/size.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk layout, size unknown"; }
"$py" "$src/tests/cli/check_netcdf_readers.py" "$dir/size.h5" || fail "netCDF readers, size unknown"
"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir/size.h5" || fail "RESULT_LAYOUT.md, size unknown"
"$py" - "$dir/volume.h5" "$dir/size.h5" <<'PY' || fail "contents of the size-unknown result"
import sys, h5py, numpy as np
known = h5py.File(sys.argv[1], "r")["layouts/ends_reference"]
unknown = h5py.File(sys.argv[2], "r")["layouts/ends_reference"]
assert "size_sd" not in known
ok = (unknown["localization_status"][...] == 0) & (known["localization_status"][...] == 0)
assert ok.sum() > 10, ok.sum()
size_sd = unknown["size_sd"][...]
assert np.isfinite(size_sd[ok]).all() and (size_sd[ok] > 0).all()
k, u = known["position_sd"][...][ok], unknown["position_sd"][...][ok]
assert (u >= k * (1 - 1e-9)).all(), np.min(u / k)
assert (u > 1.01 * k).any()
print("ok   size unknown: size_sd written, the position bound never smaller (largest ratio %.3g)" % np.max(u / k))
PY
"$murk" inspect "$dir/size.h5" | grep -q "size unknown" && echo "ok   murk inspect says the size was unknown" || fail "murk inspect, size unknown"

# Stopped while it computes (SIGTERM after a second, during the first layout's
# factorization): exit status 128 + 15, and neither the result nor its partial file is left.
"$murk" layout "$example" -o "$dir/stopped.h5" --quiet --threads 1 2> "$dir/err.txt" &
pid=$!
sleep 1
kill -TERM "$pid"
wait "$pid"; status=$?
if [ "$status" -eq 143 ] && [ ! -e "$dir/stopped.h5" ] && [ ! -e "$dir/stopped.h5.partial" ]; then
  echo "ok   a stopped run leaves no file"
elif [ "$status" -eq 0 ] && [ -e "$dir/stopped.h5" ] && [ ! -e "$dir/stopped.h5.partial" ]; then
  echo "ok   the run finished before the stop arrived, and its file is whole"  # a very fast machine
else
  fail "stopped run: status $status, files: $(ls "$dir" | grep stopped | tr '\n' ' ') $(cat "$dir/err.txt")"
fi

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "murk layout: ok"
