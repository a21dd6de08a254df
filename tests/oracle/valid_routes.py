"""Reference library: other valid routes to the same spectrum, in NumPy/SciPy.

Usage: python3 valid_routes.py DIR
DIR holds jobs.json and the .npy files it names. jobs.json is a list of
  {"id": ..., "method": "dmd" | "edmd" | "kernel-edmd", "x": "x.npy", "y": "y.npy",
   "rank": r, "degree": p}
with X and Y n x m (one snapshot per column). Prints one JSON object
  {id: {route name: [[re, im], ...], ...}, ...}
Every route computes the same spectrum as the engine in exact arithmetic, by
another sequence of floating-point steps a careful student might take:

exact DMD (Tu et al. 2014) at rank r: economy SVD of X (numpy.linalg.svd and
  scipy.linalg.svd with the gesvd driver), method of snapshots (numpy.linalg.eigh
  of X^T X), the data rounded to float32 and computed in float64; eigenvalues by
  numpy.linalg.eigvals or scipy.linalg.eigvals.
EDMD (Williams, Kevrekidis & Rowley 2015), monomials up to degree p: least
  squares Psi_X K = Psi_Y by numpy.linalg.lstsq and scipy.linalg.lstsq, on the data
  and on the data rounded to float32; K = pinv(G) A with and without the 1/m
  factor only when G is well conditioned (cond(G) < 1e8): G squares the
  condition of Psi_X, so pinv(G) A is not a valid route on a rank-deficient
  dictionary (that is the point of solving the least-squares problem).
kernel EDMD (Williams, Rowley & Kevrekidis 2015), (1 + x^T y)^p at rank r:
  numpy.linalg.eigh of G^, K^ = (S^-1 Q^T)(A^ Q S^-1) and ((S^-1 Q^T A^) Q) S^-1,
  the 1/m factor on G^ and A^, the data rounded to float32.
"""
import itertools
import json
import os
import sys

import numpy as np
import scipy.linalg as sl


def monomials(z, degree):
    # every product of at most `degree` state variables (the same function set as the engine; the order of
    # the functions does not change the eigenvalues)
    d, m = z.shape
    cols = []
    for total in range(degree + 1):
        for combo in itertools.combinations_with_replacement(range(d), total):
            f = np.ones(m)
            for v in combo:
                f = f * z[v]
            cols.append(f)
    return np.array(cols).T  # m x N


def f32(a):
    return a.astype(np.float32).astype(np.float64)


def dmd_svd(x, y, r, svd=np.linalg.svd, eig=np.linalg.eigvals):
    u, s, vt = svd(x, full_matrices=False)
    a = (u[:, :r].T @ y @ vt[:r].T) / s[:r]
    return eig(a)


def dmd_snapshots(x, y, r):
    lam, v = np.linalg.eigh(x.T @ x)
    idx = np.argsort(lam)[::-1][:r]
    s = np.sqrt(lam[idx])
    v = v[:, idx]
    u = x @ v / s
    return sl.eigvals((u.T @ y @ v) / s)


def edmd_routes(x, y, p):
    out = {}
    px, py = monomials(x, p), monomials(y, p)
    m = px.shape[0]
    out["lstsq numpy"] = np.linalg.eigvals(np.linalg.lstsq(px, py, rcond=None)[0])
    out["lstsq scipy gelsd"] = sl.eigvals(sl.lstsq(px, py)[0])
    qx, qy = monomials(f32(x), p), monomials(f32(y), p)
    out["lstsq numpy, float32 data"] = np.linalg.eigvals(np.linalg.lstsq(qx, qy, rcond=None)[0])
    g = px.T @ px
    if np.linalg.cond(g) < 1e8:
        a = px.T @ py
        out["pinv(G) A"] = np.linalg.eigvals(np.linalg.pinv(g) @ a)
        out["pinv(G/m) A/m, scipy"] = sl.eigvals(np.linalg.pinv(g / m) @ (a / m))
    return out


def kernel_routes(x, y, r, p):
    out = {}

    def run(x, y, scale, assoc, eig):
        g = (1 + x.T @ x) ** p / scale
        a = (1 + y.T @ x) ** p / scale
        lam, q = np.linalg.eigh(g)
        idx = np.argsort(lam)[::-1][:r]
        s = np.sqrt(lam[idx])
        q = q[:, idx]
        if assoc == 1:
            k = (q.T / s[:, None]) @ (a @ q / s)
        else:
            k = ((q.T / s[:, None]) @ a) @ q / s
        return eig(k)

    m = x.shape[1]
    out["eigh, (S^-1 Q^T)(A Q S^-1), numpy eig"] = run(x, y, 1, 1, np.linalg.eigvals)
    out["eigh, ((S^-1 Q^T A) Q) S^-1, scipy eig"] = run(x, y, 1, 2, sl.eigvals)
    out["1/m factor"] = run(x, y, m, 1, np.linalg.eigvals)
    out["float32 data"] = run(f32(x), f32(y), 1, 1, np.linalg.eigvals)
    return out


def main():
    d = sys.argv[1]
    with open(os.path.join(d, "jobs.json")) as fh:
        jobs = json.load(fh)
    result = {}
    for job in jobs:
        x = np.load(os.path.join(d, job["x"]))
        y = np.load(os.path.join(d, job["y"]))
        r = job.get("rank")
        if job["method"] == "dmd":
            routes = {
                "economy SVD, numpy eig": dmd_svd(x, y, r),
                "scipy gesvd, scipy eig": dmd_svd(x, y, r, svd=lambda a, full_matrices: sl.svd(a, full_matrices=full_matrices, lapack_driver="gesvd"), eig=sl.eigvals),
                "method of snapshots": dmd_snapshots(x, y, r),
                "float32 data": dmd_svd(f32(x), f32(y), r),
            }
        elif job["method"] == "edmd":
            routes = edmd_routes(x, y, job["degree"])
        else:
            routes = kernel_routes(x, y, r, job["degree"])
        result[job["id"]] = {k: [[float(z.real), float(z.imag)] for z in np.asarray(v, dtype=complex)] for k, v in routes.items()}
    json.dump(result, sys.stdout)


if __name__ == "__main__":
    main()
