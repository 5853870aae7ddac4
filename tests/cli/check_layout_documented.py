#!/usr/bin/python3
"""Every dataset, group member and attribute a result file holds is named in
cases/RESULT_LAYOUT.md, so that the layout document stays complete as the writers change.

Usage: check_layout_documented.py RESULT_LAYOUT.md OUT.h5...

A name counts as documented when it appears in the document as a whole word. Group names that
stand for a surface, probe or axis (<surface>, <name>, <axis>) are taken from the file; the
attributes HDF5 itself keeps for dimension scales (CLASS, NAME, DIMENSION_LIST,
REFERENCE_LIST; the HDF5 Dimension Scale Specification) are not murk's to document.
"""
import re
import sys

import h5py

doc = open(sys.argv[1], encoding="utf-8").read()
HDF5_OWN = {"CLASS", "NAME", "DIMENSION_LIST", "REFERENCE_LIST"}
missing = {}


def documented(name):
    return re.search(r"(?<![A-Za-z0-9_])" + re.escape(name) + r"(?![A-Za-z0-9_])", doc) is not None


for path in sys.argv[2:]:
    with h5py.File(path, "r") as f:
        # Groups below /mesh, /baseline, /perturbed, /difference, /probes and /layouts are named by the case.
        case_named = set()
        for parent in ("mesh", "baseline", "perturbed", "difference", "probes", "layouts"):
            if parent in f:
                case_named |= {k for k in f[parent] if k != "electrodes"}

        def look(name, obj):
            leaf = name.split("/")[-1]
            if not (isinstance(obj, h5py.Group) and leaf in case_named) and not documented(leaf):
                missing.setdefault(f"/{name}", path)
            for key in obj.attrs:
                if key not in HDF5_OWN and not documented(key):
                    missing.setdefault(f"attribute {key} of /{name}", path)

        for key in f.attrs:
            if not documented(key):
                missing.setdefault(f"root attribute {key}", path)
        f.visititems(look)

for what, path in sorted(missing.items()):
    print(f"FAILED: {what} ({path}) is not in cases/RESULT_LAYOUT.md")
print(f"layout document: {len(sys.argv) - 2} files, {'incomplete' if missing else 'complete'}")
sys.exit(1 if missing else 0)
