#!/usr/bin/env bash
# Frequency and permittivity sweep axes and the emitter's waveform (cases/README.md, [signal]
# and [sweep]; cases/RESULT_LAYOUT.md, /signal and the synthesis datasets of /sweep), on a
# small case without a body (two point sources, two probe points, a 3 mm sphere):
#  1. a frequency axis gives, at each frequency, bit for bit the numbers of a case with that
#     one frequency (perturbation and baseline, in two waters); shares merged equal the whole,
#     and so does a waveform run killed half-way and resumed;
#  2. a permittivity axis gives, at each value, bit for bit the case with that permittivity;
#     across a frequency axis a distant capacitive sphere follows the Clausius-Mossotti factor,
#     closer on a finer mesh;
#  3. a purely resistive case: the synthesized perturbation at every sensor is a real multiple
#     of the emitter's waveform, which the case gives as samples (exact to rounding), and that
#     multiple is the direct-current perturbation of the same case without [signal];
#  4. a capacitive sphere: the synthesized waveform converges as energy_fraction falls (the
#     differences from the run with every harmonic are printed and must fall);
#  5. bad input exits 2 with one line; the result opens in xarray.
# The expected waveform comes from the case text (the samples), never from murk's own output.
# Usage: signal_waveform.sh MURK SOURCE_DIR
set -uo pipefail
murk="$(realpath "$1")"; src="$(realpath "$2")"
py=/usr/bin/python3
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
cd "$dir" || exit 1
run() { "$murk" run "$@" --quiet --threads 1 2> err.txt || { cat err.txt; fail "murk run $*"; }; }

# The case (numbers invented): SIGNAL, OBJECT and SWEEP are filled in per test.
write_case() {  # FILE SIGNAL OBJECT_EXTRA SWEEP_EXTRA [TOP]
  cat > "$1" <<EOF
title = "waveform test"
${5:-}
[water]
conductivity = "100 uS/cm"
[mesh]
panel_size = "1.5 mm"
$2
[[source]]
form = "point"
position = ["0 mm", "-5 mm", "0 mm"]
current = "10 uA"
[[source]]
form = "point"
position = ["0 mm", "5 mm", "0 mm"]
current = "-10 uA"
[[probe]]
name = "sensors"
form = "line"
from = ["3 mm", "-3 mm", "0 mm"]
to = ["3 mm", "3 mm", "0 mm"]
points = 2
[[object]]
name = "sphere"
shape = "sphere"
radius = "3 mm"
position = ["8 mm", "0 mm", "0 mm"]
conductivity = "50 uS/cm"
$3
[sweep]
object = "sphere"
distance = ["2 mm", "5 mm"]
direction = [1, 0, 0]
$4
EOF
}

# ---- 1. frequency axis against one-frequency cases ------------------------------------
waters='water_conductivity = ["100 uS/cm", "300 uS/cm"]'
write_case axis.toml "" "permittivity = 1e6" "$waters
frequency = [\"200 Hz\", \"2 kHz\"]"
write_case f200.toml "" "permittivity = 1e6" "$waters" 'frequency = "200 Hz"'
write_case f2k.toml "" "permittivity = 1e6" "$waters" 'frequency = "2 kHz"'
for c in axis f200 f2k; do run $c.toml -o $c.h5; done
"$py" - <<'PY' || fail "the frequency axis differs from the one-frequency cases"
import h5py, numpy as np
a = h5py.File("axis.h5", "r")["sweep"]
units = a["frequency"].attrs["units"]
assert list(a["frequency"][()]) == [200.0, 2000.0] and (units.decode() if isinstance(units, bytes) else units) == "Hz"
for k, name in enumerate(["f200.h5", "f2k.h5"]):
    s = h5py.File(name, "r")["sweep"]
    same = np.array_equal(a["perturbation"][:, k], s["perturbation"][()])
    base = np.array_equal(a["baseline_reading"][:, k], s["baseline_reading"][()])
    print(f"frequency {a['frequency'][k]:g} Hz: perturbation bit for bit {same}, baseline bit for bit {base}")
    assert same and base
# the frequency matters here (a capacitive sphere): the two frequencies differ
assert not np.allclose(a["perturbation"][:, 0], a["perturbation"][:, 1], rtol=1e-3)
PY
run axis.toml -o part-1.h5 --shard 1/2
run axis.toml -o part-2.h5 --shard 2/2
"$murk" merge part-1.h5 part-2.h5 -o merged.h5 --quiet 2> err.txt || fail "merge: $(cat err.txt)"
out=$("$py" "$src/tests/cli/compare_results.py" merged.h5 axis.h5) || fail "merged shares against the whole: $out"
echo "frequency axis, merged shares = whole: $out"

# ---- 2. permittivity axis against one-permittivity cases -------------------------------
write_case eps_axis.toml "" "" 'permittivity = [1e4, 1e6]' 'frequency = "1 kHz"'
write_case eps4.toml "" "permittivity = 1e4" "" 'frequency = "1 kHz"'
write_case eps6.toml "" "permittivity = 1e6" "" 'frequency = "1 kHz"'
for c in eps_axis eps4 eps6; do run $c.toml -o $c.h5; done
"$py" - <<'PY' || fail "the permittivity axis differs from the one-permittivity cases"
import h5py, numpy as np
a = h5py.File("eps_axis.h5", "r")["sweep"]
for k, name in enumerate(["eps4.h5", "eps6.h5"]):
    s = h5py.File(name, "r")["sweep"]
    same = np.array_equal(a["perturbation"][k], s["perturbation"][()])
    print(f"permittivity {a['permittivity'][k]:g}: perturbation bit for bit {same}")
    assert same
PY

# ---- 2b. the frequency axis against a closed form -----------------------------------
# Far from the emitter a sphere answers as a dipole proportional to the Clausius-Mossotti
# factor K = (s - w) / (s + 2 w) of its complex conductivity s = sigma + i omega eps0 eps_r in
# water of conductivity w (Maxwell 1873, "A Treatise on Electricity and Magnetism", vol. 1,
# sec. 313; Jones 1995, "Electromechanics of Particles", ch. 2). So the perturbation over K is
# the same complex number at every frequency (a real geometric factor); what differs is the
# mesh's error and the higher multipoles. Shown on two meshes of the sphere at 40 mm clearance.
for ps in 1.5 0.7; do
  write_case cm_$ps.toml "" "permittivity = 1e6
panel_size = \"$ps mm\"" 'frequency = ["100 Hz", "1 kHz", "10 kHz"]'
  sed -i 's/^distance = .*/distance = ["40 mm"]/' cm_$ps.toml
  run cm_$ps.toml -o cm_$ps.h5
done
"$py" - <<'PY' || fail "the frequency axis does not follow the Clausius-Mossotti factor"
import h5py, numpy as np
dev = {}
for ps in ["1.5", "0.7"]:
    f = h5py.File(f"cm_{ps}.h5", "r")["sweep"]
    freq, p = f["frequency"][()], f["perturbation"][()][:, 0, 0]
    s = 50e-4 + 1j * 2 * np.pi * freq * 8.8541878128e-12 * 1e6   # 50 uS/cm, eps_r 1e6
    k = (s - 1e-2) / (s + 2e-2)                                     # water 100 uS/cm
    r = p / k
    dev[ps] = (np.abs(np.angle(r / r[-1])).max(), np.abs(np.abs(r) / np.abs(r[-1]) - 1).max())
    print(f"object panels {ps} mm: perturbation / K over 100 Hz .. 10 kHz varies by {dev[ps][0]:.4f} rad "
          f"in phase, {dev[ps][1]:.4f} in magnitude (K's own phase spans "
          f"{np.ptp(np.angle(k)):.2f} rad)")
assert dev["0.7"][0] < dev["1.5"][0] and dev["0.7"][0] < 0.01 and dev["0.7"][1] < 0.01
PY

# ---- 3. resistive: the synthesized perturbation is the scaled emitter waveform ---------
samples="0, 0.5, 1.0, 0.8, 0.2, -0.2, -0.4, -0.5, -0.5, -0.4, -0.3, -0.2, 0, 0, 0, 0"
write_case resistive.toml "[signal]
frequency = \"500 Hz\"
samples = [$samples]
energy_fraction = 1e-15
synthesize = \"all\"" "" 'method = "full"'
write_case dc.toml "" "" 'method = "full"'
run resistive.toml -o resistive.h5
run dc.toml -o dc.h5
"$py" - "$samples" <<'PY' || fail "the resistive synthesis is not the scaled emitter waveform"
import sys, h5py, numpy as np
s = np.array([float(v) for v in sys.argv[1].split(",")])
w = s / np.sqrt(np.mean(s**2))              # the emitter's waveform relative to its given rms value
f = h5py.File("resistive.h5", "r")
# every harmonic that carries any energy is solved (one of this pulse's is zero to rounding)
assert f["signal"].attrs["energy_left_out"] < 1e-25, f["signal"].attrs["energy_left_out"]
p = f["sweep/waveform_perturbation"][()]     # (position, sensor, time)
positions = f["sweep/waveform_position"][()]
dc = h5py.File("dc.h5", "r")["sweep/perturbation"][()]   # (distance, sensor), real
assert dc.dtype.kind == "f"
worst_shape = worst_scale = 0.0
for i, q in enumerate(positions):
    for k in range(p.shape[1]):
        r = p[i, k] @ w / (w @ w)            # the best real multiple of the waveform
        worst_shape = max(worst_shape, np.abs(p[i, k] - r * w).max() / np.abs(r))
        worst_scale = max(worst_scale, abs(r - dc[q, k]) / abs(dc[q, k]))
print(f"resistive: max |synthesized - multiple x waveform| / multiple = {worst_shape:.2e}; "
      f"multiple against the direct-current run: {worst_scale:.2e}")
assert worst_shape < 1e-12 and worst_scale < 1e-9
# the synthesized emitter waveform is the samples themselves (every harmonic kept)
assert np.abs(f["signal/emitter_waveform"][()] - w).max() < 1e-13
PY

# ---- 4. convergence as energy_fraction falls -------------------------------------------
for e in 0.3 0.1 0.01 0.001 1e-4 1e-15; do
  write_case conv_$e.toml "[signal]
frequency = \"500 Hz\"
samples = [$samples]
energy_fraction = $e
synthesize = \"all\"" "permittivity = 1e6" ""
  run conv_$e.toml -o conv_$e.h5
done
"$py" - <<'PY' || fail "the synthesized waveform does not converge as energy_fraction falls"
import h5py, numpy as np
ref = h5py.File("conv_1e-15.h5", "r")
r = ref["sweep/waveform_perturbation"][()]
diffs = []
for e in ["0.3", "0.1", "0.01", "0.001", "1e-4"]:
    f = h5py.File(f"conv_{e}.h5", "r")
    d = np.abs(f["sweep/waveform_perturbation"][()] - r).max() / np.abs(r).max()
    kept = int(f["signal/kept"][()].sum())
    left = f["signal"].attrs["energy_left_out"]
    print(f"energy_fraction {e:>6}: {kept} harmonics, energy left out {left:.2e}, max difference {d:.3e}")
    diffs.append(d)
assert all(b <= a * (1 + 1e-12) for a, b in zip(diffs, diffs[1:])), "the difference must not grow"
assert diffs[-1] < diffs[0] / 10
PY

# The synthesis of merged shares equals that of the whole run (it is computed from the file).
run conv_0.01.toml -o wave-1.h5 --shard 1/2
run conv_0.01.toml -o wave-2.h5 --shard 2/2
"$murk" merge wave-1.h5 wave-2.h5 -o wave-merged.h5 --quiet 2> err.txt || fail "merge: $(cat err.txt)"
out=$("$py" "$src/tests/cli/compare_results.py" wave-merged.h5 conv_0.01.h5) || fail "merged waveform shares against the whole: $out"
echo "waveform, merged shares = whole: $out"

# A run killed half-way (SIGKILL) and resumed gives the same result as one uninterrupted run:
# the journal keys points by their flat index, whose (water, frequency) pair picks the fixed part.
sed 's/^distance = .*/distance = ["2 mm", "3 mm", "4 mm", "5 mm", "6 mm", "8 mm"]/' conv_0.01.toml > resume.toml
t0=$(date +%s%N)
run resume.toml -o resume-whole.h5
half_ms=$(( ($(date +%s%N) - t0) / 2000000 ))
"$murk" run resume.toml -o resumed.h5 --quiet --threads 1 > /dev/null 2>&1 & pid=$!
sleep "$(printf '%d.%03d' $((half_ms / 1000)) $((half_ms % 1000)))"
kill -9 "$pid" 2> /dev/null; wait "$pid" 2> /dev/null
if [ -e resumed.h5.partial ]; then
  echo "killed after $half_ms ms with a journal: resuming"
  run resume.toml -o resumed.h5 --resume
else
  echo "the run finished or had not started its journal after $half_ms ms: running it whole"
  rm -f resumed.h5; run resume.toml -o resumed.h5
fi
out=$("$py" "$src/tests/cli/compare_results.py" resumed.h5 resume-whole.h5) || fail "resumed against whole: $out"
echo "waveform, killed and resumed = whole: $out"

# ---- 5. bad input and xarray -----------------------------------------------------------
write_case bad.toml "[signal]
frequency = \"500 Hz\"
samples = [0, nan, 1]" "" ""
"$murk" run bad.toml -o bad.h5 --quiet 2> err.txt; status=$?
[ "$status" -eq 2 ] && [ "$(wc -l < err.txt)" -eq 1 ] && grep -q "bad.toml:.*signal.samples\[2\]" err.txt \
  && echo "ok   a sample that is not finite: exit 2, $(cat err.txt)" || fail "bad sample: exit $status, $(cat err.txt)"
"$py" - <<'PY' || fail "xarray cannot open the waveform result"
import xarray as xr
for engine in ("h5netcdf", "netcdf4"):
    s = xr.open_dataset("conv_0.01.h5", group="sweep", engine=engine)
    g = xr.open_dataset("conv_0.01.h5", group="signal", engine=engine)
    assert "frequency" in s.coords and "time" in s.coords and "harmonic" in g.coords
    assert s["waveform_perturbation"].dims == ("waveform_position", "sensor", "time")
    assert s["fundamental_phase_shift"].dims == ("distance", "sensor")
print("ok   xarray opens /sweep and /signal with both engines")
PY

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "signal waveform: ok"
