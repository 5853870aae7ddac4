#!/usr/bin/env bash
# The canonical falloff case against the exact Legendre series of a sphere beside
# a point current source (expansion of 1/|x - x'| in Legendre polynomials,
# Jackson 1999 "Classical Electrodynamics" §3.3, with continuity of potential and
# normal current at the sphere): the perturbation at the sensor at every swept
# distance, and the fitted falloff exponent within +-0.05 of the series' own.
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
"$murk" run "$src/cases/examples/canonical_falloff.toml" -o "$dir/c.h5" --quiet
/usr/bin/python3 - "$dir/c.h5" <<'PY'
import sys
import h5py
import numpy as np
from numpy.polynomial import legendre

I, sigma_w, sigma_i, a = 10e-6, 100e-6 * 100, 1.0, 2e-3   # from the case file: 10 uA, 100 uS/cm, 1 S/m, 2 mm
source = np.zeros(3)

def series(centre, x):
    """Perturbation at x of a sphere at `centre` beside a point source at the origin."""
    d_vec = source - centre
    d = np.linalg.norm(d_vec)
    r_vec = x - centre
    r = np.linalg.norm(r_vec)
    cos_t = np.dot(d_vec, r_vec) / (d * r)
    n = np.arange(1, 200)
    # a^(2n+1) / (d r)^(n+1), written as powers of ratios below one to avoid overflow
    coef = n * (sigma_w - sigma_i) / (n * sigma_i + (n + 1) * sigma_w) * (a / d) ** (n + 1) * (a / r) ** (n + 1) / a
    return I / (4 * np.pi * sigma_w) * legendre.legval(cos_t, np.concatenate([[0.0], coef]))

with h5py.File(sys.argv[1], "r") as f:
    dist = f["sweep/distance"][()]
    centres = f["sweep/object_position"][()]
    probe = f["sweep/sensor_position"][()][0]
    computed = f["sweep/perturbation"][()][:, 0]
    exponent = float(f["falloff/exponent"][()].ravel()[0])
    lo, hi = float(f["falloff/fit_from"][()].ravel()[0]), float(f["falloff/fit_to"][()].ravel()[0])
    assert (f["sweep/status"][()] == 1).all(), "every point must be computed"

exact = np.array([series(c, probe) for c in centres])
rel = np.abs(computed - exact) / np.abs(exact)
print("distance (mm)   computed (V)     series (V)      rel. error")
for d, c, e, r in zip(dist, computed, exact, rel):
    print(f"{d * 1e3:10.2f}   {c: .6e}   {e: .6e}   {r:.2e}")
assert rel.max() < 0.01, f"largest relative error {rel.max():.3e} exceeds 1%"

# The series' own exponent over the same fit range, by the same least squares.
mask = (dist >= lo * (1 - 1e-12)) & (dist <= hi * (1 + 1e-12))
slope = np.polyfit(np.log(dist[mask]), np.log(np.abs(exact[mask])), 1)[0]
print(f"fitted exponent {exponent:.4f}, series exponent {slope:.4f} over {lo * 1e3:.1f}..{hi * 1e3:.1f} mm")
assert abs(exponent - slope) <= 0.05
# and the rule of thumb: about -4 far from the emitter (common practice)
assert abs(exponent + 4) <= 0.5
PY
