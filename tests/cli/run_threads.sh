#!/usr/bin/env bash
# Sweep points run in parallel, one point per thread (dipole points in fixed
# blocks, one block per thread); every point's arithmetic is the same whatever
# the thread count, so one and two threads give bit-identical maps, for each
# method (auto mixes exact and dipole points).
set -euo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
sed -e 's/^distance = .*/distance = ["4 mm", "1 cm", "2 cm"]/' -e 's/^water_conductivity = .*//' \
    -e 's/^panel_size = "1.2 mm"/panel_size = "3 mm"/' \
    "$src/cases/examples/fish_detection.toml" > "$dir/small.toml"
grep -q "^panel_size = \"3 mm\"" "$dir/small.toml" || { echo "FAIL: the example's zone line changed; update this test"; exit 1; }
for method in exact dipole auto; do
sed -e "s/^\[sweep\]/[sweep]\nmethod = \"$method\"/" "$dir/small.toml" > "$dir/$method.toml"
"$murk" run "$dir/$method.toml" -o "$dir/one.h5" --quiet --threads 1 --force
"$murk" run "$dir/$method.toml" -o "$dir/two.h5" --quiet --threads 2 --force
/usr/bin/python3 - "$dir/one.h5" "$dir/two.h5" "$method" <<'PY'
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
        assert same, f"{sys.argv[3]}: {n} differs between 1 and 2 threads"
    paths = set(np.unique(a["sweep/path"][()]).tolist())
print(f"threads, method {sys.argv[3]}: {len(names)} datasets identical (paths used: {sorted(paths)})")
PY
done
