"""Two murk result files hold the same datasets under /sweep, /detection and
/falloff, each with the same type, shape and values (NaN equal to NaN).
Prints "identical: N datasets", or one line per difference and exits 1.
Usage: /usr/bin/python3 compare_results.py A.h5 B.h5"""
import sys

import h5py
import numpy as np


def datasets(f):
    out = {}

    def visit(name, obj):
        if isinstance(obj, h5py.Dataset) and name.split("/")[0] in ("sweep", "detection", "falloff"):
            out[name] = obj

    f.visititems(visit)
    return out


def main(a_path, b_path):
    with h5py.File(a_path, "r") as a, h5py.File(b_path, "r") as b:
        x, y = datasets(a), datasets(b)
        bad = [] if sorted(x) == sorted(y) else [f"different datasets: {sorted(set(x) ^ set(y))}"]
        if not x:
            bad.append(f"{a_path}: no datasets under /sweep, /detection, /falloff")
        for n in sorted(set(x) & set(y)):
            u, v = x[n][()], y[n][()]
            same = u.dtype == v.dtype and u.shape == v.shape and (
                np.array_equal(u, v, equal_nan=True) if u.dtype.kind in "fc" else np.array_equal(u, v))
            if not same:
                bad.append(f"/{n} differs")
        print("\n".join(bad) if bad else f"identical: {len(x)} datasets")
        return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1], sys.argv[2]))
