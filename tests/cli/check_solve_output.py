#!/usr/bin/python3
"""Reads a `murk solve` result the way a user would (h5py, no murk) and checks
the layout contract of cases/RESULT_LAYOUT.md: root metadata, units and long_name on every
dataset (long_name only on labels, which are not quantities), finite values, and the meshes
matching the panel values.
Usage: check_solve_output.py OUT.h5 [--fish]   (--fish adds order-of-magnitude checks)"""
import hashlib
import sys

import h5py
import numpy as np

path = sys.argv[1]
fish = "--fish" in sys.argv[2:]
failures = []


def fail(msg):
    failures.append(msg)


with h5py.File(path, "r") as f:
    for key in ("murk_version", "case", "case_sha256", "created_utc", "command", "approximation",
                "near_ratio", "far_ratio", "system_solver", "dense_limit"):
        if key not in f.attrs:
            fail(f"root attribute {key} missing")
    case_text = f.attrs["case"]
    if not isinstance(case_text, str):
        fail("case attribute is not a str")
    elif hashlib.sha256(case_text.encode()).hexdigest() != f.attrs["case_sha256"]:
        fail("case_sha256 does not match the case text")

    def visit(name, obj):
        if isinstance(obj, h5py.Dataset):
            needs = ("long_name",) if obj.dtype.kind == "O" else ("units", "long_name")
            if not all(k in obj.attrs for k in needs):
                fail(f"{name}: units or long_name missing")
            data = obj[()]
            if name.endswith("electrodes/exact_area"):
                # NaN marks an electrode whose true area murk does not know (RESULT_LAYOUT.md)
                data = data[~np.isnan(data)]
                if not np.all(data > 0):
                    fail(f"{name}: an exact area that is not positive")
            if data.dtype.kind in "fc" and not np.all(np.isfinite(data)):
                fail(f"{name}: non-finite values")

    f.visititems(visit)

    for surface in f["mesh"]:
        n = f[f"mesh/{surface}/triangles"].shape[0]
        if f[f"perturbed/{surface}/outer_potential"].shape != (n,):
            fail(f"{surface}: panel values do not match the mesh")
        tri = f[f"mesh/{surface}/triangles"][()]
        if tri.min() < 0 or tri.max() >= f[f"mesh/{surface}/vertices"].shape[0]:
            fail(f"{surface}: triangle indices out of range")

    if fish:
        # Orders of magnitude of the trade (common practice, DEVELOPERS.md "Physics and method"): a baseline
        # transdermal voltage of the order of a millivolt, and a prey-sized object a
        # couple of centimetres away changing it by microvolts or less.
        base = np.abs(f["baseline/fish/transdermal_voltage"][()]).max()
        image = np.abs(f["difference/fish/transdermal_voltage"][()]).max()
        if not 1e-4 < base < 1e-2:
            fail(f"baseline transdermal voltage {base} V is not of the order of a millivolt")
        if not 1e-8 < image < 1e-5:
            fail(f"electric image {image} V is not of the order of a microvolt or below")
        if f["difference/fish/transdermal_voltage"].attrs["units"] != "V":
            fail("transdermal voltage units are not V")

if failures:
    print("\n".join(failures))
    sys.exit(1)
print(f"{path}: layout ok")
