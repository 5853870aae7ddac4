#!/usr/bin/env bash
# Receptor densities by skin zone: every skin panel carries density x area
# receptors, the density of the zone (fraction of the body length from the
# nose) that holds its centroid. Checked with h5py against the geometry in the file.
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
# The refinement zone coarsened to 3 mm panels: the densities do not depend on it.
sed -e 's/^distance = .*/distance = ["1 cm", "2 cm"]/' -e 's/^size = .*/size = ["2 mm"]/' \
    -e 's/^panel_size = "1.2 mm"/panel_size = "3 mm"/' -e 's/^water_conductivity = .*//' "$src/cases/examples/fish_detection.toml" > "$dir/zones.toml"
grep -q "^panel_size = \"3 mm\"" "$dir/zones.toml" || { echo "FAIL: the example's zone line changed; update this test"; exit 1; }
"$murk" run "$dir/zones.toml" -o "$dir/zones.h5" --quiet
/usr/bin/python3 - "$dir/zones.h5" <<'PY'
import sys
import h5py
import numpy as np
with h5py.File(sys.argv[1], "r") as f:
    n = f["sweep/receptors"][()]
    area = f["mesh/fish/area"][()]
    x = f["mesh/fish/centroid"][()][:, 0]
# The case: a 15 cm body centred at the origin heading along +x (nose at x = 7.5 cm);
# 360 receptors per cm^2 on the front quarter (x >= 7.5 - 3.75 cm), 120 elsewhere.
expected = np.where(x >= 0.075 - 0.25 * 0.15, 360e4, 120e4) * area
assert np.allclose(n, expected, rtol=1e-12), np.abs(n - expected).max()
assert (x >= 0.0375).sum() > 10 and (x < 0.0375).sum() > 10
print("receptor zones: ok,", int(round(n.sum())), "receptors in all")
PY
