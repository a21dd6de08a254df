"""NumPy side of `npm run bench`: a straightforward transcription of the same
steps on the same .npy data, timed in this process (medians taken by run.ts).

kernel-edmd (polynomial kernel (1 + x.y)^p, one trajectory D = [x_0 ... x_m]):
  1. G = k(X, X), A = k(Y, X) computed the straightforward way (two products)
  2. full numpy.linalg.eigh(G), leading r pairs
  3. K = S^+ Q^T A Q S^+
  4. numpy.linalg.eig(K)
  5. eigenfunctions on the samples Phi_X = Q S V
dmd (exact DMD, method of snapshots): eigh(X^T X) -> V, S; U = X V S^-1;
  A~ = U^T Y V S^-1; eig(A~); modes Phi = Y V S^-1 W.

sweep (growth sweep of kernel-edmd): the whole method, and its Gram step
(the two products X^T X, Y^T X) and eigen step (full eigh of G) timed alone.

Usage: python3 numpy_kernel_edmd.py FILE.npy METHOD RANK REPS [DEGREE]
Prints one JSON line: {"times": [...], "re": [...], "im": [...]}
(sweep: {"total": [...], "gram": [...], "eigen": [...]}).
"""
import json
import os
import sys
import time

import numpy as np


def kernel_edmd(d, r, p):
    x = d[:, :-1]
    y = d[:, 1:]
    g = (1.0 + x.T @ x) ** p
    a = (1.0 + y.T @ x) ** p
    w, q = np.linalg.eigh(g)
    order = np.argsort(w)[::-1][:r]
    sig = np.sqrt(w[order])
    q = q[:, order]
    qs = q / sig
    k = qs.T @ a @ qs
    lam, v = np.linalg.eig(k)
    phi = (q * sig) @ v
    return lam, phi


def exact_dmd(d, r):
    x = d[:, :-1]
    y = d[:, 1:]
    w, v = np.linalg.eigh(x.T @ x)
    order = np.argsort(w)[::-1][:r]
    sig = np.sqrt(w[order])
    v = v[:, order]
    vs = v / sig
    u = x @ vs
    at = u.T @ (y @ vs)
    lam, wv = np.linalg.eig(at)
    modes = y @ (vs @ wv)
    return lam, modes


def warm_up(f):
    """Untimed runs until BENCH_WARMUP_S seconds have passed (at least one): the rule of our side too."""
    limit = float(os.environ.get("BENCH_WARMUP_S", "1"))
    t0 = time.perf_counter()
    f()
    while time.perf_counter() - t0 < limit:
        f()


def timed(f, reps):
    warm_up(f)  # not counted
    out = []
    for _ in range(reps):
        t0 = time.perf_counter()
        f()
        out.append(time.perf_counter() - t0)
    return out


def sweep(d, r, p, reps):
    x = d[:, :-1]
    y = d[:, 1:]
    g = (1.0 + x.T @ x) ** p

    def gram_step():
        return x.T @ x, y.T @ x

    res = {
        "total": timed(lambda: kernel_edmd(d, r, p), reps),
        "gram": timed(gram_step, reps),
        "eigen": timed(lambda: np.linalg.eigh(g), reps),
    }
    print(json.dumps(res))


def main():
    path, method, rank, reps = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
    degree = int(sys.argv[5]) if len(sys.argv) > 5 else 2
    d = np.load(path)
    if method == "sweep":
        sweep(d, rank, degree, reps)
        return
    def run():
        if method == "kernel-edmd":
            return kernel_edmd(d, rank, degree)[0]
        return exact_dmd(d, rank)[0]

    warm_up(run)  # not counted
    times = []
    lam = None
    for _ in range(reps):
        t0 = time.perf_counter()
        lam = run()
        times.append(time.perf_counter() - t0)
    print(json.dumps({"times": times, "re": lam.real.tolist(), "im": lam.imag.tolist()}))


if __name__ == "__main__":
    main()
