"""Reference library: plain NumPy/SciPy transcriptions of the engine's formulas.

Usage: python3 spectra_oracle.py DIR
DIR holds job.json and the .npy files it names. job.json:
  {"method": "dmd" | "edmd" | "kernel-edmd", "x": "x.npy", "y": "y.npy" (or "trajectory": "d.npy"),
   "rank": r, "degree": p, "dictionary": "monomial" | "hermite",
   "kernel": "linear" | "polynomial" | "gaussian", "coef0": c, "gamma": g, "sigma": s,
   "ours": "ours.npy"}
X and Y are n x m (one snapshot per column). Prints JSON:
  {"eigenvalues": [[re, im], ...], "maxRelErr": e, "matchCost": c}
where maxRelErr compares "ours" (complex128) with the NumPy eigenvalues after
an optimal matching by scipy.optimize.linear_sum_assignment on |a - b|.

Formulas: exact DMD (Tu et al. 2014): numpy.linalg.svd, A~ = U* Y V S^-1, numpy.linalg.eig.
EDMD (Williams, Kevrekidis & Rowley 2015): K = pinv(G) A.
Kernel EDMD (Williams, Rowley & Kevrekidis 2015): numpy.linalg.eigh of G,
K^ = (S^-1 Q^T) A^ (Q S^-1).
"""
import itertools
import json
import os
import sys

import numpy as np
from numpy.polynomial import hermite_e
from scipy.optimize import linear_sum_assignment


def dictionary(z, degree, kind):
    d, m = z.shape
    cols = []
    for total in range(degree + 1):
        for alpha in itertools.product(range(total + 1), repeat=d):
            if sum(alpha) != total:
                continue
            f = np.ones(m)
            for v, e in enumerate(alpha):
                if kind == "hermite":
                    c = np.zeros(e + 1)
                    c[e] = 1.0
                    f = f * hermite_e.hermeval(z[v], c)
                else:
                    f = f * z[v] ** e
            cols.append(f)
    return np.stack(cols, axis=1)  # m x N


def kernel(a, b, job):
    k = job.get("kernel", "polynomial")
    s = a.T @ b
    if k == "linear":
        return s
    if k == "polynomial":
        return (job.get("coef0", 1.0) + job.get("gamma", 1.0) * s) ** job["degree"]
    d2 = (a * a).sum(0)[:, None] + (b * b).sum(0)[None, :] - 2 * s
    return np.exp(-np.maximum(d2, 0) / (2 * job["sigma"] ** 2))


def main():
    folder = sys.argv[1]
    with open(os.path.join(folder, "job.json")) as fh:
        job = json.load(fh)
    if "trajectory" in job:  # one trajectory D (n x (m+1)): X = D[:, :-1], Y = D[:, 1:]
        d = np.load(os.path.join(folder, job["trajectory"]))
        x, y = d[:, :-1], d[:, 1:]
    else:
        x = np.load(os.path.join(folder, job["x"]))
        y = np.load(os.path.join(folder, job["y"]))
    method = job["method"]
    if method == "dmd":
        u, s, vh = np.linalg.svd(x, full_matrices=False)
        r = job["rank"]
        ur, sr, vr = u[:, :r], s[:r], vh[:r].T
        at = ur.T @ y @ vr / sr[None, :]
        lam = np.linalg.eigvals(at)
    elif method == "edmd":
        px = dictionary(x, job["degree"], job.get("dictionary", "monomial"))
        py = dictionary(y, job["degree"], job.get("dictionary", "monomial"))
        m = x.shape[1]
        g = px.T @ px / m
        a = px.T @ py / m
        lam = np.linalg.eigvals(np.linalg.pinv(g) @ a)
    else:
        g = kernel(x, x, job)
        a = kernel(y, x, job)
        w, q = np.linalg.eigh(g)
        idx = np.argsort(w)[::-1][: job["rank"]]
        sig = np.sqrt(w[idx])
        q = q[:, idx]
        kh = (q / sig[None, :]).T @ a @ (q / sig[None, :])
        lam = np.linalg.eigvals(kh)
    out = {"eigenvalues": [[float(v.real), float(v.imag)] for v in lam]}
    if "ours" in job:
        ours = np.load(os.path.join(folder, job["ours"])).ravel()
        cost = np.abs(ours[:, None] - lam[None, :])
        rows, cols = linear_sum_assignment(cost)
        scale = np.maximum(np.abs(lam[cols]), 1e-300)
        out["maxRelErr"] = float(np.max(cost[rows, cols] / scale)) if len(rows) else 0.0
        out["matchCost"] = float(cost[rows, cols].sum())
        out["matched"] = int(len(rows))
    print(json.dumps(out))


if __name__ == "__main__":
    main()
