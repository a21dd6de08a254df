"""Reference library: EDMD with a Gaussian radial dictionary as plain NumPy least squares.

Williams, Kevrekidis & Rowley 2015, J. Nonlinear Sci. 25:1307-1346: the EDMD
operator K solves the least-squares problem Psi_X K ~ Psi_Y (K = G^+ A in exact
arithmetic), and its eigenvalues approximate Koopman eigenvalues. Here the
dictionary is the constant function and exp(-||x - c||^2 / (2 sigma^2)) for
each centre c, and the centres are columns of X chosen by a rule, rebuilt
here from the data alone (as a student would), not taken from the engine.

Usage: python3 edmd_radial_oracle.py DIR
DIR holds job.json and the .npy files it names. job.json:
  {"x": "x.npy", "y": "y.npy"}  or  {"trajectory": "d.npy"}   (n x m, one snapshot per column;
                                   a trajectory D gives X = D[:, :-1], Y = D[:, 1:])
  "sigma": s,
  "centres": {"kind": "every", "step": k}  or  {"kind": "indices", "indices": [i, ...]}  (0-based columns of X)
  "ours": "ours.npy"   (optional: complex128 eigenvalues to compare)
Prints JSON:
  {"eigenvalues": [[re, im], ...], "indices": [...], "condPsiX": c, "rankPsiX": r}
and with "ours": "maxRelErr" (largest |ours - numpy| / max(|numpy|, 1e-300) after an optimal
matching by scipy.optimize.linear_sum_assignment on |a - b|), "matched".
Solved by numpy.linalg.lstsq (LAPACK gelsd, SVD-based), eigenvalues by numpy.linalg.eig.
"""
import json
import os
import sys

import numpy as np
from scipy.optimize import linear_sum_assignment


def centre_indices(rule, columns):
    if rule["kind"] == "every":
        return list(range(0, columns, int(rule["step"])))
    return [int(i) for i in rule["indices"]]


def radial_dictionary(z, centres, sigma):
    """Psi (m x (1 + k)): the constant, then one Gaussian per centre, in centre order."""
    d2 = ((z[:, :, None] - centres[:, None, :]) ** 2).sum(axis=0)  # m x k
    return np.hstack([np.ones((z.shape[1], 1)), np.exp(-d2 / (2.0 * sigma * sigma))])


def main():
    folder = sys.argv[1]
    with open(os.path.join(folder, "job.json")) as fh:
        job = json.load(fh)
    if "trajectory" in job:
        d = np.load(os.path.join(folder, job["trajectory"]))
        x, y = d[:, :-1], d[:, 1:]
    else:
        x = np.load(os.path.join(folder, job["x"]))
        y = np.load(os.path.join(folder, job["y"]))
    idx = centre_indices(job["centres"], x.shape[1])
    centres = x[:, idx]
    sigma = float(job["sigma"])
    psi_x = radial_dictionary(x, centres, sigma)
    psi_y = radial_dictionary(y, centres, sigma)
    k_op, _, rank, sv = np.linalg.lstsq(psi_x, psi_y, rcond=None)
    lam = np.linalg.eig(k_op)[0]
    out = {
        "eigenvalues": [[float(v.real), float(v.imag)] for v in lam],
        "indices": idx,
        "condPsiX": float(sv[0] / sv[-1]) if sv[-1] > 0 else float("inf"),
        "rankPsiX": int(rank),
    }
    if "ours" in job:
        ours = np.load(os.path.join(folder, job["ours"])).ravel()
        cost = np.abs(ours[:, None] - lam[None, :])
        rows, cols = linear_sum_assignment(cost)
        scale = np.maximum(np.abs(lam[cols]), 1e-300)
        out["maxRelErr"] = float(np.max(cost[rows, cols] / scale)) if len(rows) else 0.0
        out["matched"] = int(len(rows))
    print(json.dumps(out))


if __name__ == "__main__":
    main()
