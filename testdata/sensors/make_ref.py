#!/usr/bin/python3
"""Reference values for the spherical-spline interpolation in core/sensors.

Perrin, Pernier, Bertrand & Echallier (1989), Electroencephalogr Clin
Neurophysiol 72:184: g(x) = 1/(4 pi) sum_{n=1}^{N} (2n+1)/(n(n+1))^m P_n(x),
and the interpolant U(r) = c0 + sum_i c_i g(r . r_i) with
[G + lambda I, 1; 1^T, 0] [c; c0] = [V; 0].

The montage is six points given by their polar angle theta from the
vertex and azimuth phi (degrees), in a right-anterior-superior frame:
(x, y, z) = (sin t sin p, sin t cos p, cos t). Legendre polynomials come
from scipy.special.eval_legendre, the system from numpy.linalg.solve.
Run: /usr/bin/python3 make_ref.py > ref.json
"""
import json
import numpy as np
import scipy
import scipy.special

M, N = 4, 50


def g(x):
    n = np.arange(1, N + 1)
    return float(np.sum((2 * n + 1) / (n * (n + 1)) ** M * scipy.special.eval_legendre(n, x)) / (4 * np.pi))


def unit(theta, phi):
    t, p = np.radians(theta), np.radians(phi)
    return np.array([np.sin(t) * np.sin(p), np.sin(t) * np.cos(p), np.cos(t)])


montage = [(0, 0), (36, 0), (72, -90), (72, 90), (36, 180), (72, 180)]
values = [0.1, -0.3, 0.25, 0.4, 0.9, 0.5]
queries = [(0, 0), (18, 45), (54, -120), (60, 160), (90, 0), (45, 270)]

cases = []
for lam in (0.0, 1e-3):
    P = np.array([unit(*a) for a in montage])
    k = len(P)
    A = np.zeros((k + 1, k + 1))
    for i in range(k):
        for j in range(k):
            A[i, j] = g(float(np.clip(P[i] @ P[j], -1, 1)))
        A[i, i] += lam
    A[:k, k] = 1
    A[k, :k] = 1
    b = np.concatenate([values, [0.0]])
    sol = np.linalg.solve(A, b)
    c, c0 = sol[:k], sol[k]
    out = []
    for q in queries:
        r = unit(*q)
        out.append(float(c0 + sum(c[i] * g(float(np.clip(r @ P[i], -1, 1))) for i in range(k))))
    cases.append({"lambda": lam, "c0": float(c0), "c": [float(v) for v in c], "at": out})

xs = [-1.0, -0.5, 0.0, 0.3, 0.8, 0.99, 1.0]
print(json.dumps({
    "source": "make_ref.py: Perrin et al. 1989 spherical splines, m=4, N=50, scipy.special.eval_legendre + numpy.linalg.solve",
    "numpy": np.__version__, "scipy": scipy.__version__,
    "m": M, "terms": N,
    "g": [{"x": x, "g": g(x)} for x in xs],
    "montage": [{"theta": a[0], "phi": a[1]} for a in montage],
    "values": values,
    "queries": [{"theta": a[0], "phi": a[1]} for a in queries],
    "cases": cases,
}, indent=1))
