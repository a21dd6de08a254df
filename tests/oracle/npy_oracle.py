"""Reference library: numpy.save / numpy.load for the .npy round trip.

Usage:
  python3 npy_oracle.py load FILE         -> JSON {"dtype", "shape", "fortran", "values": [[re, im], ...] in C order}
  python3 npy_oracle.py save DIR SEED     -> writes arrays of several dtypes, orders and format versions into DIR
                                             and prints a JSON manifest of their values (C order)
"""
import json
import os
import sys

import numpy as np
from numpy.lib import format as npformat


def describe(a):
    flat = np.ascontiguousarray(a).ravel()
    return {
        "dtype": str(a.dtype),
        "shape": list(a.shape),
        "values": [[float(np.real(v)), float(np.imag(v))] for v in flat],
    }


def main():
    if sys.argv[1] == "load":
        a = np.load(sys.argv[2])
        out = describe(a)
        out["fortran"] = bool(np.isfortran(a))
        print(json.dumps(out))
        return
    folder, seed = sys.argv[2], int(sys.argv[3])
    rng = np.random.default_rng(seed)
    manifest = []
    base = rng.standard_normal((4, 3))
    cbase = base + 1j * rng.standard_normal((4, 3))
    cases = [
        ("f8_c.npy", np.ascontiguousarray(base), None),
        ("f8_f.npy", np.asfortranarray(base), None),
        ("f4_c.npy", np.ascontiguousarray(base.astype(np.float32)), None),
        ("f4_f.npy", np.asfortranarray(base.astype(np.float32)), None),
        ("c16_c.npy", np.ascontiguousarray(cbase), None),
        ("c16_f.npy", np.asfortranarray(cbase), None),
        ("f8_be.npy", base.astype(">f8"), None),
        ("f8_v2.npy", base, (2, 0)),
        ("f8_v3.npy", base, (3, 0)),
        ("vec.npy", rng.standard_normal(5), None),
    ]
    for name, arr, version in cases:
        path = os.path.join(folder, name)
        if version is None:
            np.save(path, arr)
        else:
            with open(path, "wb") as fh:
                npformat.write_array(fh, arr, version=version)
        entry = describe(arr)
        entry["name"] = name
        entry["fortran"] = bool(np.isfortran(arr))
        manifest.append(entry)
    print(json.dumps(manifest))


if __name__ == "__main__":
    main()
