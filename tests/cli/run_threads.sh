#!/usr/bin/env bash
# Sweep points run in parallel, one point per thread; every point's arithmetic is
# the same whatever the thread count, so one and two threads give bit-identical maps.
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
sed -e 's/^distance = .*/distance = ["4 mm", "1 cm", "2 cm"]/' -e 's/^water_conductivity = .*//' \
    "$src/cases/examples/fish_detection.toml" > "$dir/small.toml"
"$murk" run "$dir/small.toml" -o "$dir/one.h5" --quiet --threads 1
"$murk" run "$dir/small.toml" -o "$dir/two.h5" --quiet --threads 2
/usr/bin/python3 - "$dir/one.h5" "$dir/two.h5" <<'PY'
import sys
import h5py
import numpy as np
with h5py.File(sys.argv[1], "r") as a, h5py.File(sys.argv[2], "r") as b:
    names = []
    a.visititems(lambda n, o: names.append(n) if isinstance(o, h5py.Dataset) else None)
    assert len(names) > 20
    for n in names:
        x, y = a[n][()], b[n][()]
        same = np.array_equal(x, y, equal_nan=x.dtype.kind in "fc")
        assert same, f"{n} differs between 1 and 2 threads"
print(f"threads: {len(names)} datasets identical")
PY
