#!/usr/bin/python3
"""Reference minimisers for amplink/core/connect.ClosestOrthogonal.

The symmetric multivariate leakage correction of Colclough et al. 2015
(NeuroImage 117:439) replaces the channels' signals Z (n x T) by D·O, the
minimiser of ||Z - D·O||_F over a diagonal D and an O with orthonormal rows.
For a fixed D the best O is the orthogonal Procrustes solution U·Vt from the
SVD D·Z = U·S·Vt (Schönemann 1966, Psychometrika 31:1), so

    min_O ||Z - D·O||^2 = ||Z||^2 - 2·||D·Z||_* + sum(d^2)

(||.||_* the nuclear norm, the sum of singular values). This script
minimises that function of d with scipy.optimize.minimize (BFGS, then
Nelder-Mead from the BFGS point, from several starting points, keeping the
best), independently of the alternating iteration amplink uses, and writes
closest_orth.json next to this file: each case's Z, the minimising d (signs
made positive), the minimum ||Z - D·O||_F and the library versions.

Run: /usr/bin/python3 testdata/connect/symmetric_ref.py
"""
import json
import os
import platform

import numpy as np
import scipy
import scipy.optimize


def objective(d, z):
    return float(np.sum(z * z) - 2 * np.linalg.svd(d[:, None] * z, compute_uv=False).sum() + np.sum(d * d))


def solve(z, rng):
    n = z.shape[0]
    starts = [np.linalg.norm(z, axis=1), np.ones(n)] + [np.abs(rng.normal(size=n)) + 0.1 for _ in range(4)]
    best = None
    for d0 in starts:
        r = scipy.optimize.minimize(objective, d0, args=(z,), method="BFGS", options={"gtol": 1e-12, "maxiter": 10000})
        r = scipy.optimize.minimize(objective, r.x, args=(z,), method="Nelder-Mead",
                                    options={"xatol": 1e-13, "fatol": 1e-15, "maxiter": 200000, "maxfev": 200000})
        if best is None or r.fun < best.fun:
            best = r
    return np.abs(best.x), max(best.fun, 0.0) ** 0.5


def main():
    rng = np.random.default_rng(20150415)
    cases = []
    for n, t, leak in [(2, 8, 0.3), (2, 40, 0.9), (3, 12, 0.5), (3, 30, 0.8), (4, 10, 0.4), (4, 25, 0.7)]:
        src = rng.normal(size=(n, t))
        mix = np.eye(n) + leak * rng.normal(size=(n, n))
        z = (mix * np.arange(1, n + 1)[:, None]) @ src
        d, resid = solve(z, rng)
        cases.append({"n": n, "t": t, "z": z.ravel().tolist(), "d": d.tolist(), "residual": resid})
    out = {
        "generator": "testdata/connect/symmetric_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "cases": cases,
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "closest_orth.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
