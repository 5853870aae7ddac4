#!/usr/bin/env bash
# Amplitude and phase channels ([detection] channels): the example capacitive_prey
# (a prey item that differs from the water only in permittivity, and a resistive one
# matched to the same |dV|) run twice, reading amplitude and phase, then amplitude
# alone. The capacitive item turns the phase of the skin's reading and barely changes
# its amplitude; the resistive one the reverse. With amplitude alone the capacitive
# item's P_D stays at the false-alarm rate; with the phase channel it rises.
# Usage: phase_channel.sh MURK SOURCE_DIR
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
example="$src/cases/examples/capacitive_prey.toml"
"$murk" run "$example" -o "$dir/phase.h5" --quiet
sed -e 's/^channels = "amplitude_and_phase"/channels = "amplitude"/' -e '/^timing_jitter = /d' "$example" > "$dir/amplitude.toml"
grep -q '^channels = "amplitude"$' "$dir/amplitude.toml" || { echo "FAIL: the example's channels line changed; update this test"; exit 1; }
"$murk" run "$dir/amplitude.toml" -o "$dir/amplitude.h5" --quiet
/usr/bin/python3 - "$dir/phase.h5" "$dir/amplitude.h5" <<'PY'
import sys
import h5py
import numpy as np
phase, amplitude = (h5py.File(p, "r") for p in sys.argv[1:3])
s = phase["sweep"]
names = s["alternative"].attrs["alternative_names"]
names = names.decode() if isinstance(names, bytes) else names
assert names.split(",") == ["capacitive", "resistive"], names
distance = s["distance"][()]
d1 = int(np.argmin(abs(distance - 0.01)))
peak = s["peak_perturbation"][()]
dphi, da = s["phase_change"][()], s["amplitude_change"][()]
cap, res = 0, 1
# Matched at 1 cm: the two peak amplitudes agree within 5 % (the case's comment says how).
ratio = peak[cap, d1] / peak[res, d1]
print(f"peak |dV| at 1 cm: capacitive {peak[cap, d1]:.3e} V, resistive {peak[res, d1]:.3e} V, ratio {ratio:.3f}")
assert abs(ratio - 1) < 0.05, ratio
# The capacitive item turns the phase (its change is mostly in quadrature), the resistive
# one changes the amplitude: compare |dA| with |V0| |dphi| at the peak sensor.
v0 = np.abs(s["baseline_reading"][()][0, s["peak_sensor"][()]])
print("phase change (rad):", dphi[cap], dphi[res])
print("amplitude change (V):", da[cap], da[res])
assert np.all(np.abs(da[cap]) < 0.2 * v0[cap] * np.abs(dphi[cap]))
assert np.all(np.abs(v0[res] * dphi[res]) < 0.2 * np.abs(da[res]))
# The parts of d' add in quadrature to d'.
assert np.allclose(s["snr"][()] ** 2, s["snr_amplitude"][()] ** 2 + s["snr_phase"][()] ** 2, rtol=1e-12)
pfa = s["detection_probability"].attrs["false_alarm_probability"]
pd_phase = s["detection_probability"][()]
pd_amp = amplitude["sweep/detection_probability"][()]
print("P_D capacitive, amplitude and phase:", pd_phase[cap], " amplitude alone:", pd_amp[cap])
print("P_D resistive,  amplitude and phase:", pd_phase[res], " amplitude alone:", pd_amp[res])
# Amplitude alone: the capacitive item stays near the false-alarm rate at every distance
# (within a few times it: its amplitude change is not zero, see the case's comment).
assert np.all(pd_amp[cap] < 5 * pfa), pd_amp[cap]
# The phase channel detects it at 5 mm and 1 cm; with amplitude alone the resistive item of
# the same |dV| is detected far better than the capacitive one.
assert np.all(pd_phase[cap, :2] > 0.5), pd_phase[cap]
assert pd_amp[res, 0] > 0.2 and pd_amp[res, 0] > 50 * pd_amp[cap, 0]
assert np.all(pd_phase[cap] >= pd_amp[cap])
# The amplitude-only file has no phase part.
assert np.all(amplitude["sweep/snr_phase"][()] == 0)
# xarray finds the new datasets by coordinate values (cases/RESULT_LAYOUT.md).
import xarray as xr
ds = xr.open_dataset(sys.argv[1], group="sweep", engine="h5netcdf")
for name in ("phase_change", "amplitude_change", "snr_amplitude", "snr_phase"):
    value = float(ds[name].sel(alternative=cap, distance=0.01, method="nearest"))
    assert value == s[name][cap, d1], name
assert ds["phase_change"].attrs["units"] == "rad"
print("phase channel: ok")
PY

# The same two items under a two-harmonic emitter (cases/examples/capacitive_prey_waveform.toml):
# the resistive item's contrast hardly depends on frequency, so it changes the local waveform
# almost by a multiple of itself; the capacitive item's contrast is nearly imaginary and grows
# with frequency (the Clausius-Mossotti factor, Jones 1995, "Electromechanics of Particles"),
# so it turns the fundamental's phase and changes the ratio of the waveform's two peaks.
# At the peak sensor, at every distance, the capacitive item's two distortion measures are at
# least 50 times the resistive one's (the water's own permittivity keeps the latter from zero).
"$murk" run "$src/cases/examples/capacitive_prey_waveform.toml" -o "$dir/waveform.h5" --quiet
/usr/bin/python3 - "$dir/waveform.h5" <<'PY'
import sys
import h5py
import numpy as np
s = h5py.File(sys.argv[1], "r")["sweep"]
names = s["alternative"].attrs["alternative_names"]
names = (names.decode() if isinstance(names, bytes) else str(names)).split(",")
cap, res = names.index("capacitive"), names.index("resistive")
amp = s["fundamental_amplitude"][...]            # (alternative, distance, sensor)
for d in range(amp.shape[1]):
    k = int(np.argmax(amp[cap, d]))
    for name in ("peak_ratio_change", "fundamental_phase_shift"):
        c, r = abs(s[name][cap, d, k]), abs(s[name][res, d, k])
        assert np.isfinite(c) and np.isfinite(r) and c > 50 * r, (name, d, c, r)
    # matched amplitude: the two fundamentals within 10 % at the peak sensor
    assert abs(amp[res, d, k] / amp[cap, d, k] - 1) < 0.1, (d, amp[res, d, k], amp[cap, d, k])
print("waveform distortion: the capacitive item's peak ratio and phase change at least 50x the resistive one's: ok")
PY
