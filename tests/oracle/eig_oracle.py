"""Reference library: NumPy/SciPy general eigendecomposition of real square matrices.

Reads a JSON list of cases {"k": k, "a": [k*k numbers, column-major]} on stdin
and prints a JSON list, one object per case:
  {"np_re", "np_im"}: eigenvalues from numpy.linalg.eig,
  {"re", "im"}: eigenvalues from scipy.linalg.eig(A, left=True, right=True),
  {"vr_re", "vr_im", "vl_re", "vl_im"}: its right and left eigenvectors
      (unit 2-norm columns, column-major flat lists; vl[:, j]^H A = w_j vl[:, j]^H),
  {"kappa"}: eigenvalue condition numbers 1 / |vl_j^H vr_j| (unit vectors).
"""
import json
import sys

import numpy as np
import scipy.linalg


def flat(m):
    return np.asarray(m).reshape(-1, order="F").tolist()


def main() -> None:
    cases = json.load(sys.stdin)
    out = []
    for case in cases:
        k = int(case["k"])
        a = np.asarray(case["a"], dtype=np.float64).reshape((k, k), order="F")
        np_w = np.linalg.eig(a)[0]
        w, vl, vr = scipy.linalg.eig(a, left=True, right=True)
        w = np.asarray(w, dtype=np.complex128)
        vl = np.asarray(vl, dtype=np.complex128)
        vr = np.asarray(vr, dtype=np.complex128)
        dots = np.abs(np.sum(np.conj(vl) * vr, axis=0))
        with np.errstate(divide="ignore"):
            kappa = np.where(dots > 0, 1.0 / dots, np.inf)
        out.append({
            "np_re": np.real(np_w).tolist(),
            "np_im": np.imag(np_w).tolist(),
            "re": np.real(w).tolist(),
            "im": np.imag(w).tolist(),
            "vr_re": flat(np.real(vr)),
            "vr_im": flat(np.imag(vr)),
            "vl_re": flat(np.real(vl)),
            "vl_im": flat(np.imag(vl)),
            "kappa": [float(x) if np.isfinite(x) else None for x in kappa],
        })
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
