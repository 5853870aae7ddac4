#!/usr/bin/env bash
# The bottom_distance / surface_distance axis of [sweep] (cases/README.md): the example
# robot_bottom.toml swept over the gap between the robot and the bottom. Checks:
# - /sweep/bottom_distance is a coordinate (CF attributes, plane_z per value) and xarray opens
#   /sweep with it as a dimension;
# - the bottom of each fixed part sits at the hull's lowest point (z = -2 cm, the capsule's
#   radius below its axis: geometry of the case; within 0.1 mm, as meshed) minus the gap;
# - a point of the swept run equals the same case with the bottom placed by hand at that height
#   (bottom_z, no axis) to 1e-12 relative;
# - as the gap grows, the perturbation approaches the one in unbounded water (no bottom): the
#   image of a current source in an insulating plane at distance h changes the field near the
#   body by a part that falls off with h (method of images, e.g. Jackson, Classical
#   Electrodynamics, 3rd ed., 1999, section 2.1); the relative differences are printed;
# - three shares (--shard k/3) merged equal the whole run;
# - a moving object beyond a point's plane is masked (beyond_plane), at that gap only;
# - murk run --estimate counts the image and the fixed part per gap;
# - with a [signal] waveform, a gap's synthesis equals that of the bottom placed by hand;
# - refusals, one line and exit 2: both keys, a zero, negative or infinite gap, the plane missing
#   from [water], a gap whose plane cuts an unmoving object, a case without a sensing body.
# Usage: plane_distance_axis.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
base="$src/cases/examples/robot_bottom.toml"

run() { "$murk" run "$1" -o "$2" --quiet --threads 1 2> "$dir/err.txt" || { cat "$dir/err.txt"; echo "FAIL murk run $1"; exit 1; }; }
run "$base" "$dir/swept.h5"

# The case with the bottom where the sweep put it at gap index $1, and no axis.
"$py" - "$dir/swept.h5" > "$dir/heights.txt" <<'PY' || fail "plane_z and the coordinate"
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
d = f["sweep/bottom_distance"]
assert d.attrs["units"] == "m" and d.attrs["long_name"], dict(d.attrs)
assert f["sweep"].attrs["axes"] == "bottom_distance conductivity distance", f["sweep"].attrs["axes"]
gaps = d[...]
z = d.attrs["plane_z"]
assert np.allclose(gaps, [0.01, 0.02, 0.04, 0.08, 0.16, 0.32], rtol=0, atol=1e-15), gaps
# The capsule's lowest point lies at z = -2 cm (its radius below the axis at z = 0); the gap is
# measured from the mesh, whose lowest vertex may lie a little off the exact surface.
assert np.allclose(z, -0.02 - gaps, rtol=0, atol=1e-4), z
assert np.allclose(z[0] - z, gaps - gaps[0], rtol=0, atol=1e-15), z
assert f["sweep/baseline_reading"].shape == (1, 6, 3), f["sweep/baseline_reading"].shape
# The baselines differ per gap: a bottom at 1 cm changes what the sensors read.
b = f["sweep/baseline_reading"][0]
assert np.abs(b[0] - b[-1]).max() > 1e-3 * np.abs(b[-1]).max(), b
for v in z: print(repr(float(v)))
PY
"$py" - "$dir/swept.h5" <<'PY' || fail "xarray opens /sweep"
import sys, warnings, xarray as xr
warnings.simplefilter("ignore")
ds = xr.open_dataset(sys.argv[1], group="sweep", engine="h5netcdf")
p = ds["perturbation"]
assert p.dims[:3] == ("bottom_distance", "conductivity", "distance"), p.dims
v = p.sel(bottom_distance=0.04, conductivity=float("inf"), distance=0.02).values
assert v.shape == (3,) and abs(v).max() > 0, v
print("ok   xarray: perturbation", p.dims, "; bottom_distance =", list(ds["bottom_distance"].values))
PY

# Shares of a job array, merged: each point finds its fixed part (its gap) from its flat index.
for k in 1 2 3; do
  "$murk" run "$base" -o "$dir/part-$k.h5" --shard "$k/3" --quiet --threads 1 2> "$dir/err.txt" || fail "share $k: $(cat "$dir/err.txt")"
done
"$murk" merge "$dir"/part-{1,2,3}.h5 -o "$dir/merged.h5" --quiet 2> "$dir/err.txt" || fail "merge: $(cat "$dir/err.txt")"
"$py" - "$dir/swept.h5" "$dir/merged.h5" <<'PY' || fail "merged shares against the whole run"
import sys, h5py, numpy as np
a, b = h5py.File(sys.argv[1], "r")["sweep"], h5py.File(sys.argv[2], "r")["sweep"]
assert (b["status"][...] == 1).all()
assert np.array_equal(a["perturbation"][...], b["perturbation"][...])
assert np.array_equal(a["bottom_distance"].attrs["plane_z"], b["bottom_distance"].attrs["plane_z"])
print("ok   three shares merged equal the whole run")
PY

no_axis() { sed -e '/^bottom_distance = /d' "$@"; }
for k in 0 5; do
  z=$(sed -n "$((k + 1))p" "$dir/heights.txt")
  no_axis -e "s/^bottom_z = .*/bottom_z = \"$z m\"/" "$base" > "$dir/hand_$k.toml"
  run "$dir/hand_$k.toml" "$dir/hand_$k.h5"
  "$py" - "$dir/swept.h5" "$dir/hand_$k.h5" "$k" <<'PY' || fail "gap $k against the bottom placed by hand"
import sys, h5py, numpy as np
k = int(sys.argv[3])
swept = h5py.File(sys.argv[1], "r")["sweep/perturbation"][k]
hand = h5py.File(sys.argv[2], "r")["sweep/perturbation"][...]
diff = np.abs(swept - hand).max() / np.abs(hand).max()
print(f"ok   gap index {k}: swept against placed by hand, largest relative difference {diff:.2e}")
assert diff <= 1e-12, diff
PY
done

no_axis -e '/^bottom_z = /d' "$base" > "$dir/unbounded.toml"
run "$dir/unbounded.toml" "$dir/unbounded.h5"
"$py" - "$dir/swept.h5" "$dir/unbounded.h5" <<'PY' || fail "approach to unbounded water"
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
gaps = f["sweep/bottom_distance"][...]
swept = f["sweep/perturbation"][...]        # (gap, conductivity, distance, sensor)
free = h5py.File(sys.argv[2], "r")["sweep/perturbation"][...]
for c, name in enumerate(["insulator", "conductor"]):
    rel = [np.abs(swept[k, c] - free[c]).max() / np.abs(free[c]).max() for k in range(len(gaps))]
    print(f"ok   {name}: relative difference from unbounded water at gaps "
          + ", ".join(f"{g * 100:g} cm: {r:.3g}" for g, r in zip(gaps, rel)))
    assert all(rel[k + 1] < rel[k] for k in range(len(rel) - 1)), rel
    assert rel[-1] < 0.1 * rel[0], rel
PY

# A sphere lower down, reaching 3.5 cm below the axis: beyond the bottom at a 1 cm gap (z = -3 cm).
sed -e 's/^position = \["5 cm", "4 cm", "0 cm"\]/position = ["5 cm", "4 cm", "-2.5 cm"]/' "$base" > "$dir/low.toml"
run "$dir/low.toml" "$dir/low.h5"
"$py" - "$dir/low.h5" <<'PY' || fail "masking by the moved bottom"
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
status, reason = f["sweep/status"][...], f["sweep/mask_reason"][...]
codes = dict(zip(f["sweep/mask_reason"].attrs["flag_meanings"].split(), f["sweep/mask_reason"].attrs["flag_values"]))
assert status.shape == (6, 2, 4) and (status[0] == 2).all() and (reason[0] == codes["beyond_plane"]).all(), (status, reason)
assert (status[1:] == 1).all(), status
print("ok   masked at the 1 cm gap only:", status.tolist())
PY

# expect_bad NAME TEXT SED...: exit 2, one stderr line with the text, no result file.
expect_bad() {
  local name="$1" text="$2"; shift 2
  sed "$@" "$base" > "$dir/bad.toml"
  "$murk" run "$dir/bad.toml" -o "$dir/bad.h5" --quiet > /dev/null 2> "$dir/stderr"
  local status=$? lines; lines=$(wc -l < "$dir/stderr")
  if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -qF -- "$text" "$dir/stderr" || [ -e "$dir/bad.h5" ]; then
    fail "$name: status $status, $lines lines: $(cat "$dir/stderr")"
  else
    echo "ok   $name: $(cat "$dir/stderr")"
  fi
}
expect_bad "both planes swept" "sweep.bottom_distance: a sweep moves one boundary" \
  -e 's/^bottom_distance = .*/&\nsurface_distance = ["1 cm"]/'
expect_bad "zero gap" "sweep.bottom_distance[1]: must be positive" -e 's/^bottom_distance = .*/bottom_distance = ["0 cm", "1 cm"]/'
expect_bad "negative gap" "sweep.bottom_distance[2]: must be positive" -e 's/^bottom_distance = .*/bottom_distance = ["1 cm", "-1 cm"]/'
expect_bad "infinite gap" "sweep.bottom_distance[2]: 'inf m' is not a finite number" \
  -e 's/^bottom_distance = .*/bottom_distance = ["1 cm", "inf m"]/'
expect_bad "no bottom in [water]" "sweep.bottom_distance: moves the bottom: give [water] bottom_z" -e '/^bottom_z = /d'
expect_bad "no surface in [water]" "sweep.surface_distance: moves the water surface: give [water] surface_z" \
  -e 's/^bottom_distance = /surface_distance = /'
expect_bad "a gap that cuts an unmoving object" "sweep.bottom_distance = 0.01 m: this plane cannot be placed" \
  -e 's/^\[sweep\]/[[object]]\nname = "stone"\nshape = "sphere"\nradius = "1 cm"\nposition = ["-5 cm", "5 cm", "-4.5 cm"]\nconductivity = "insulator"\n\n[sweep]/'

# Without a sensing body there is nothing to measure the gap from (canonical_falloff has none).
sed -e 's/^\[sweep\]/[sweep]\nsurface_distance = ["1 cm"]/' -e 's/^\[water\]/[water]\nsurface_z = "1 m"/' \
  "$src/cases/examples/canonical_falloff.toml" > "$dir/nobody.toml"
"$murk" run "$dir/nobody.toml" -o "$dir/nobody.h5" --quiet > /dev/null 2> "$dir/stderr"
status=$?
if [ "$status" -eq 2 ] && [ "$(wc -l < "$dir/stderr")" -eq 1 ] && grep -qF "the case needs a [fish] or [robot]" "$dir/stderr"; then
  echo "ok   no sensing body: $(cat "$dir/stderr")"
else
  fail "no sensing body: status $status: $(cat "$dir/stderr")"
fi

# The estimate counts the bottom's image in every entry (cases/sweep/cost_model.hpp).
"$murk" run "$base" --estimate > "$dir/estimate.txt" 2>&1 || fail "murk run --estimate: $(cat "$dir/estimate.txt")"
grep -q '^water:   1 image of the bounding planes in every entry (entries cost 1.15 times' "$dir/estimate.txt" \
  && grep -q '6 fixed parts (one per water, frequency and boundary gap)' "$dir/estimate.txt" \
  || fail "the estimate does not count the image or the gaps: $(cat "$dir/estimate.txt")"

# A waveform with the axis: each (harmonic, gap) has its fixed part, and the synthesis of a
# gap equals the synthesis of the case with the bottom placed there by hand, bit for bit.
wave() {  # the case at one distance and one conductivity, with a three-harmonic waveform
  sed -e 's/^title = .*/&\n[signal]\nfrequency = "1 kHz"\nharmonics = [{ order = 1, amplitude = 1 }, { order = 3, amplitude = 0.4, phase = \"30 deg\" }, { order = 5, amplitude = 0.2 }]\nsynthesize = [0]/' \
      -e 's/^conductivity = \["insulator", "conductor"\]/conductivity = ["conductor"]/' \
      -e 's/^distance = .*/distance = ["2 cm"]/' "$@"
}
wave -e 's/^bottom_distance = .*/bottom_distance = ["1 cm", "4 cm"]/' -e 's/synthesize = \[0\]/synthesize = [0, 1]/' \
  "$base" > "$dir/wave.toml"
run "$dir/wave.toml" "$dir/wave.h5"
z=$(sed -n "3p" "$dir/heights.txt")   # the 4 cm gap's bottom (the same body, the same gaps)
wave -e '/^bottom_distance = /d' -e "s/^bottom_z = .*/bottom_z = \"$z m\"/" "$base" > "$dir/wave_hand.toml"
run "$dir/wave_hand.toml" "$dir/wave_hand.h5"
"$py" - "$dir/wave.h5" "$dir/wave_hand.h5" <<'PY' || fail "a waveform with the axis against the bottom placed by hand"
import sys, h5py, numpy as np
a, b = h5py.File(sys.argv[1], "r")["sweep"], h5py.File(sys.argv[2], "r")["sweep"]
assert a["baseline_reading"].shape == (1, 3, 2, 3), a["baseline_reading"].shape  # water, harmonic, gap, sensor
for name in ["fundamental_amplitude", "fundamental_phase", "fundamental_phase_shift", "waveform_perturbation"]:
    swept, hand = a[name][...], b[name][...]
    # fundamental_*: (gap, conductivity, distance, sensor) against (conductivity, distance, sensor);
    # waveform_perturbation: (position, sensor, time), positions 0 and 1 against position 0
    got = swept[1]  # the 4 cm gap (position 1 of the waveforms)
    hand = hand[0] if name == "waveform_perturbation" else hand
    assert np.array_equal(got, hand), (name, got, hand)
assert not np.array_equal(a["fundamental_amplitude"][0], a["fundamental_amplitude"][1])
print("ok   a waveform with the axis: the 4 cm gap's synthesis equals the bottom placed by hand, bit for bit")
PY

[ "$failures" -eq 0 ] && echo "plane distance axis: all checks passed"
exit $(( failures > 0 ))
