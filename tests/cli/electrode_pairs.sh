#!/usr/bin/env bash
# Differential readings: with readings = "pairs" each channel is the difference of
# two neighbouring sensor electrodes. Checked with h5py against a run of the same
# case read electrode by electrode (the difference is formed independently here).
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
sed -e 's/^conductivity = \[.*/conductivity = ["conductor"]/' \
    -e 's/^distance = .*/distance = ["2 cm", "4 cm", "8 cm"]/' \
    "$src/cases/examples/robot_detection.toml" > "$dir/single.toml"
sed -e 's/^\[sweep\]/[sweep]\nreadings = "pairs"/' "$dir/single.toml" > "$dir/pairs.toml"
"$murk" run "$dir/single.toml" -o "$dir/single.h5" --quiet
"$murk" run "$dir/pairs.toml" -o "$dir/pairs.h5" --quiet
/usr/bin/python3 - "$dir/single.h5" "$dir/pairs.h5" <<'PY'
import sys
import h5py
import numpy as np
with h5py.File(sys.argv[1], "r") as s, h5py.File(sys.argv[2], "r") as p:
    names = s["sweep/sensor"].attrs["sensor_names"].split(",")
    pair_names = p["sweep/sensor"].attrs["sensor_names"].split(",")
    assert pair_names == [f"{b}-{a}" for a, b in zip(names, names[1:])], pair_names
    single = s["sweep/perturbation"][()]
    pairs = p["sweep/perturbation"][()]
    expected = single[..., 1:] - single[..., :-1]
    scale = np.abs(expected).max()
    assert pairs.shape == expected.shape, (pairs.shape, expected.shape)
    assert np.abs(pairs - expected).max() <= 1e-9 * scale
print("electrode pairs: ok")
PY
