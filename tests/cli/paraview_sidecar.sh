#!/usr/bin/env bash
# ParaView opens the XDMF sidecars murk writes: the demo sweep's (one surface; signed values and
# magnitudes of a direct-current case) and murk solve's on a membrane at 100 Hz (two surfaces;
# magnitudes only, named so). ParaView 5.11's XDMFReader, run headless by pvpython under
# xvfb-run (Debian paraview, python3-paraview, xvfb; tools/test.sh installs them), reports the
# cells and cell arrays it read; they must match the HDF5 file as h5py reads it: as many cells
# as /mesh/<surface>/triangles has rows, and each array's range that of the dataset it names.
# Usage: paraview_sidecar.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees h5py
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
command -v pvpython > /dev/null && command -v xvfb-run > /dev/null \
  || { echo "pvpython or xvfb-run is missing (Debian paraview, python3-paraview, xvfb): run bash tools/test.sh, which installs them"; exit 1; }

"$murk" run "$src/cases/examples/fish_detection.toml" -o "$dir/demo.h5" --quiet --threads 1 2> "$dir/err.txt" \
  || { cat "$dir/err.txt"; echo "murk run failed"; exit 1; }
"$murk" solve "$src/cases/examples/membrane_sphere.toml" -o "$dir/membrane.h5" --quiet 2> "$dir/err.txt" \
  || { cat "$dir/err.txt"; echo "murk solve failed"; exit 1; }

# paraview NAME: ParaView's view of NAME.xdmf as JSON in NAME.json. Its first start on a busy
# machine can abort while setting up the X display: one retry.
paraview() {
  local tries
  for tries in 1 2; do
    xvfb-run -a pvpython "$src/tests/cli/read_xdmf_paraview.py" "$dir/$1.xdmf" > "$dir/$1.out" 2> "$dir/$1.err" \
      && tail -n 1 "$dir/$1.out" > "$dir/$1.json" && return 0
    echo "pvpython failed (try $tries): $(tail -n 3 "$dir/$1.err")"
  done
  return 1
}
paraview demo || fail "ParaView cannot read demo.xdmf"
paraview membrane || fail "ParaView cannot read membrane.xdmf"

"$py" - "$dir" <<'PY' || failures=$((failures + 1))
import json, os, sys
import h5py
import numpy as np

d = sys.argv[1]
bad = []

def compare(name, expected_blocks):
    """expected_blocks: per surface, its mesh group and {array name: dataset path} (typed in
    from cases/RESULT_LAYOUT.md's sidecar section)."""
    seen = json.load(open(os.path.join(d, name + ".json")))
    with h5py.File(os.path.join(d, name + ".h5"), "r") as f:
        if len(seen) != len(expected_blocks):
            bad.append(f"{name}: ParaView shows {len(seen)} blocks, expected {len(expected_blocks)}")
            return
        for block, (mesh, arrays) in zip(seen, expected_blocks):
            cells = f[f"{mesh}/triangles"].shape[0]
            if block["cells"] != cells:
                bad.append(f"{name}: {block['cells']} cells, {mesh}/triangles has {cells} rows")
            if block["points"] != f[f"{mesh}/vertices"].shape[0]:
                bad.append(f"{name}: {block['points']} points, {mesh}/vertices has {f[mesh + '/vertices'].shape[0]}")
            if set(block["arrays"]) != set(arrays):
                bad.append(f"{name} {mesh}: arrays {sorted(block['arrays'])}, expected {sorted(arrays)}")
                continue
            for label, path in arrays.items():
                values = f[path][()]
                want = [float(values.min()), float(values.max())]
                if not np.allclose(block["arrays"][label], want, rtol=1e-12, atol=0):
                    bad.append(f"{name}: {label} spans {block['arrays'][label]}, {path} spans {want}")
    return seen

# The demo: direct current, so signed values (with their magnitudes). The baseline potential of
# a fish whose organ is a dipole along the body is positive at one end and negative at the other
# (common practice): signed values must span both signs.
demo = compare("demo", [("/mesh/fish", {
    "baseline potential (V)": "/baseline/fish/outer_potential",
    "|baseline potential| (V)": "/baseline/fish/outer_potential_magnitude",
    "baseline transdermal voltage (V)": "/baseline/fish/transdermal_voltage",
    "|baseline transdermal voltage| (V)": "/baseline/fish/transdermal_voltage_magnitude",
    "strongest electric image dV (V)": "/sweep/strongest_image",
    "|strongest electric image dV| (V)": "/sweep/strongest_image_magnitude"})])
if demo:
    low, high = demo[0]["arrays"]["baseline potential (V)"]
    if not low < 0 < high:
        bad.append(f"the signed baseline potential spans {low} .. {high}: not both signs")
# The membrane at 100 Hz: complex, so magnitudes only, named as such.
m = "|potential| (V, magnitude of a complex value)"
compare("membrane", [("/mesh/robot", {m: "/perturbed/robot/outer_potential_magnitude"}),
                     ("/mesh/cell", {m: "/perturbed/cell/outer_potential_magnitude"})])
if bad:
    print("\n".join("FAIL " + b for b in bad))
    sys.exit(1)
print("ParaView reads both sidecars: cells, points and arrays as in the HDF5 files")
PY

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "paraview sidecar: ok"
