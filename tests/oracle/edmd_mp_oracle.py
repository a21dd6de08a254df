"""Extended precision (mpmath, a general-purpose library): EDMD of the given data in exact arithmetic.

Usage: python3 edmd_mp_oracle.py X.npy Y.npy DEGREE DPS
X and Y are n x m float64 (one snapshot per column), taken as exact binary
values. Forms Psi_X, Psi_Y (monomials up to DEGREE), G = Psi_X^T Psi_X and
A = Psi_X^T Psi_Y in DPS-digit arithmetic, K = G^-1 A (G is nonsingular in
exact arithmetic even when it is numerically rank-deficient in float64), and
prints JSON {"eigenvalues": [[re, im], ...], "distanceToOne": d} with d the
distance of the eigenvalue closest to 1 (the constant function's, exactly 1
in exact arithmetic since A e_1 = G e_1).
"""
import itertools
import json
import sys

import mpmath as mp
import numpy as np


def monomials(z, degree):
    d, m = z.shape
    rows = []
    for i in range(m):
        row = []
        for total in range(degree + 1):
            for combo in itertools.combinations_with_replacement(range(d), total):
                f = mp.mpf(1)
                for v in combo:
                    f *= mp.mpf(float(z[v, i]))
                row.append(f)
        rows.append(row)
    return mp.matrix(rows)


def main():
    x = np.load(sys.argv[1])
    y = np.load(sys.argv[2])
    degree = int(sys.argv[3])
    mp.mp.dps = int(sys.argv[4])
    px = monomials(x, degree)
    py = monomials(y, degree)
    g = px.T * px
    a = px.T * py
    k = mp.inverse(g) * a
    ev = mp.eig(k, left=False, right=False)
    d = min(abs(e - 1) for e in ev)
    print(json.dumps({"eigenvalues": [[float(mp.re(e)), float(mp.im(e))] for e in ev], "distanceToOne": float(d)}))


if __name__ == "__main__":
    main()
