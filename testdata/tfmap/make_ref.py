#!/usr/bin/python3
"""Reference vectors for the tf-map analysis (core/connect/tfpower.go and
core/recipe/tfmap.go).

1. "pixels": single-trial power maps |x*w|^2 at map pixels, with
   w[k] = 2 * exp(i*2*pi*f*t_k) * g(t_k) / sum(g),  g(t) = exp(-t^2 / (2*sigma_t^2)),
   sigma_t = n / (2*pi*f),  t_k = (k - H) / rate,  H = ceil(4 * sigma_t * rate),
   and x*w = scipy.signal.fftconvolve(x, w, mode='same'), read at samples
   from, from+step, ... < to.
2. "clusters": the observed stage of a cluster-based permutation test
   (Maris & Oostenveld 2007) on a seeded trials x pixels matrix: per-pixel
   scipy.stats.spearmanr / pearsonr (r and the t-approximation p),
   t = r*sqrt((n-2)/(1-r^2)), the two-sided critical value
   scipy.stats.t.ppf(1 - alpha/2, n-2), and clusters of pixels with t > tcrit
   or t < -tcrit from scipy.ndimage.label with its default (4-connected) structure,
   each with the sum of t over its pixels.

Run: /usr/bin/python3 testdata/tfmap/make_ref.py   (writes ref.json next to it)
"""
import json
import math
import os
import platform
import warnings

import numpy as np
import scipy
import scipy.ndimage
import scipy.signal
import scipy.stats

SUPPORT = 4


def kernel(rate, f, n):
    sigma_t = n / (2 * math.pi * f)
    half = math.ceil(SUPPORT * sigma_t * rate)
    t = (np.arange(2 * half + 1) - half) / rate
    g = np.exp(-t * t / (2 * sigma_t * sigma_t))
    return half, 2.0 * np.exp(1j * 2 * np.pi * f * t) * g / g.sum()


def pixels(rng):
    rate, nsamp, trials = 250.0, 300, 3
    freqs, cycles = [6.0, 20.0], [4.0, 7.0]
    frm, to, step = 80, 221, 7
    t = np.arange(nsamp) / rate
    xs, power = [], []
    for tr in range(trials):
        x = rng.standard_normal(nsamp) + (1 + tr) * np.cos(2 * np.pi * 6.0 * t + tr) + np.cos(2 * np.pi * 20.0 * t)
        x = x.astype(np.float32).astype(np.float64)  # the Go test feeds float32 samples
        xs.append(x.tolist())
        rows = []
        for f, n in zip(freqs, cycles):
            _, w = kernel(rate, f, n)
            y = scipy.signal.fftconvolve(x, w, mode="same")
            rows.append((np.abs(y[frm:to:step]) ** 2).tolist())
        power.append(rows)
    return {"rate": rate, "freqs": freqs, "cycles": cycles, "from": frm, "to": to, "step": step,
            "x": xs, "power": power}


def clusters(rng, method):
    n, rows, cols, alpha = 25, 5, 8, 0.05
    seed = np.exp(rng.standard_normal(n))
    z = (np.log(seed) - np.log(seed).mean()) / np.log(seed).std()
    pix = np.exp(rng.standard_normal((rows, cols, n)))
    pix[1:3, 2:6, :] = np.exp(0.9 * z + 0.45 * rng.standard_normal((2, 4, n)))
    pix[3:5, 0:2, :] = np.exp(-0.9 * z + 0.45 * rng.standard_normal((2, 2, n)))
    pix[0, 7, :] = 2.0  # constant: r undefined
    r = np.full((rows, cols), np.nan)
    p = np.full((rows, cols), np.nan)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for i in range(rows):
            for j in range(cols):
                if np.all(pix[i, j] == pix[i, j, 0]):
                    continue
                if method == "spearman":
                    res = scipy.stats.spearmanr(seed, pix[i, j])
                else:
                    res = scipy.stats.pearsonr(seed, pix[i, j])
                r[i, j], p[i, j] = res[0], res[1]
    df = n - 2
    t = r * np.sqrt(df / (1 - r * r))
    tcrit = float(scipy.stats.t.ppf(1 - alpha / 2, df))
    out = []
    for sign in (1, -1):
        with np.errstate(invalid="ignore"):
            mask = (sign * t) > tcrit
        lab, k = scipy.ndimage.label(mask)
        for c in range(1, k + 1):
            idx = np.argwhere(lab == c)
            out.append({"sign": sign, "pixels": idx.tolist(), "sum": float(t[lab == c].sum())})
    nan = lambda a: [[None if math.isnan(v) else float(v) for v in row] for row in a]
    return {"method": method, "n": n, "rows": rows, "cols": cols, "alpha": alpha,
            "seed": seed.tolist(),
            "pixels": pix.reshape(rows * cols, n).tolist(),  # row-major pixels, each a vector over trials
            "r": nan(r), "p": nan(p), "t": nan(t), "tcrit": tcrit, "clusters": out}


def main():
    rng = np.random.default_rng(20261202)
    out = {
        "generator": "testdata/tfmap/make_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "pixels": pixels(rng),
        "clusters": [clusters(rng, "spearman"), clusters(rng, "pearson")],
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
