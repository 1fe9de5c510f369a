#!/usr/bin/python3
"""The standard trial-window workload in numpy/scipy, for speed and memory
comparison with `amplink run`, and a checker that both give the same r.

This is the script a skilled numpy user would write for the recipe that
`go run ./cmd/amplink-workload --out DIR` writes (DIR/recipe.json):

  * load the float32 epochs (DIR/workload.f32 + DIR/workload.json sidecar);
  * one real FFT per trial and channel, vectorised over all trials and
    channels, of length scipy.fft.next_fast_len(N + 2*H_max, real=True);
  * the wavelet spectra once per frequency, and only for the grid frequencies
    inside the seed and target bands;
  * per frequency, the inverse FFT of X*W (real and imaginary part of the
    complex Morlet as two real convolutions, so nothing is approximated),
    'same'-aligned, then the mean power over the window's samples;
  * scipy.stats.spearmanr across trials for all seed x target channel pairs
    in one call (2-D arrays give the whole rank correlation matrix).

The wavelet is amplitude-normalised as in REFERENCES.md:
    w[k] = 2*exp(i*2*pi*f*t_k)*g(t_k)/sum(g),  g(t) = exp(-t^2/(2*sigma_t^2)),
    sigma_t = n/(2*pi*f),  t_k = (k - H)/rate,  H = ceil(4*sigma_t*rate).
Frequencies f_i = low*(high/low)**(i/(steps-1)), cycles c_i = c0*(c1/c0)**(i/(steps-1)).

Usage:
  /usr/bin/python3 testdata/bench/compare_numpy.py DIR [--out numpy_results.csv] [--workers N]
        [--check amplink_results.csv]

--workers is passed to scipy.fft (default: every core, -1). --check compares
r (and p) with an amplink results.csv, prints max |dr| and exits non-zero
unless max |dr| < 1e-6 and the same seed/target pairs appear in both.
"""
import argparse
import csv
import json
import math
import os
import sys
import time

import numpy as np
import scipy
import scipy.fft
import scipy.stats

SUPPORT = 4


def kernel(rate, f, n):
    sigma_t = n / (2 * math.pi * f)
    half = math.ceil(SUPPORT * sigma_t * rate)
    t = (np.arange(2 * half + 1) - half) / rate
    g = np.exp(-t * t / (2 * sigma_t * sigma_t))
    return half, 2.0 * np.exp(1j * 2 * np.pi * f * t) * g / g.sum()


def grid(sp):
    low, high, steps = sp["low"], sp["high"], sp["steps"]
    c0, c1 = sp["cycles"]
    i = np.arange(steps)
    if sp.get("spacing", "log") == "log":
        f = low * (high / low) ** (i / (steps - 1))
    else:
        f = low + i * (high - low) / (steps - 1)
    f[-1] = high
    c = c0 * (c1 / c0) ** (i / (steps - 1))
    c[-1] = c1
    return f, c


def in_band(freqs, band):
    return np.nonzero((freqs >= band[0] * (1 - 1e-9)) & (freqs <= band[1] * (1 + 1e-9)))[0]


def channels(sel, names):
    if sel == "*" or sel == ["*"]:
        return list(range(len(names)))
    if isinstance(sel, str):
        sel = [sel]
    return [names.index(s) for s in sel]


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("dir")
    ap.add_argument("--out", default="numpy_results.csv")
    ap.add_argument("--workers", type=int, default=-1)
    ap.add_argument("--check", default=None)
    args = ap.parse_args()
    t0 = time.perf_counter()
    lap = {}

    with open(os.path.join(args.dir, "workload.json")) as fh:
        side = json.load(fh)
    with open(os.path.join(args.dir, "recipe.json")) as fh:
        recipe = json.load(fh)
    names = side["channels"]
    rate, start = float(side["sampleRate"]), float(side["start"])
    ntr, nch, ns = side["trials"], len(names), side["samples"]
    x = np.fromfile(os.path.join(args.dir, "workload.f32"), dtype="<f4").reshape(ntr, nch, ns)
    lap["load"] = time.perf_counter() - t0

    freqs, cycles = grid(recipe["spectral"])
    an = [a for a in recipe["analyses"] if a["type"] == "trial-window"][0]
    times = start + np.arange(ns) / rate
    sides = []
    for key in ("seed", "target"):
        w = an[key]
        k = np.nonzero((times >= w["time"][0] - 1e-9) & (times <= w["time"][1] + 1e-9))[0]
        sides.append({"chans": channels(w["channel"], names), "from": k[0], "to": k[-1] + 1,
                      "freqs": in_band(freqs, w["freq"])})
    need = sorted(set(sides[0]["freqs"]) | set(sides[1]["freqs"]))
    kernels = {i: kernel(rate, freqs[i], cycles[i]) for i in need}
    hmax = max(h for h, _ in kernels.values())
    nfft = scipy.fft.next_fast_len(ns + 2 * hmax, real=True)

    t1 = time.perf_counter()
    # float64, as amplink computes (scipy.fft would keep float32 input in single precision).
    X = scipy.fft.rfft(x.astype(np.float64), n=nfft, axis=-1, workers=args.workers)  # (trials, channels, nfft//2+1)
    del x
    lap["rfft"] = time.perf_counter() - t1

    t1 = time.perf_counter()
    power = [np.zeros((ntr, nch)) for _ in sides]
    for i in need:
        h, w = kernels[i]
        wr = scipy.fft.rfft(w.real, n=nfft)
        wi = scipy.fft.rfft(w.imag, n=nfft)
        users = [s for s, sd in enumerate(sides) if i in sd["freqs"]]
        lo = min(sides[s]["from"] for s in users) + h
        hi = max(sides[s]["to"] for s in users) + h
        p = None
        for wpart in (wr, wi):
            y = scipy.fft.irfft(X * wpart, n=nfft, axis=-1, workers=args.workers)[..., lo:hi]
            p = y * y if p is None else p + y * y
            del y
        for s in users:
            a, b = sides[s]["from"] + h - lo, sides[s]["to"] + h - lo
            power[s] += p[..., a:b].mean(axis=-1) / len(sides[s]["freqs"])
    del X
    lap["per-frequency"] = time.perf_counter() - t1

    t1 = time.perf_counter()
    sc, tc = sides[0]["chans"], sides[1]["chans"]
    seed, targ = power[0][:, sc], power[1][:, tc]  # (trials, channels)
    rho, pval = scipy.stats.spearmanr(seed, targ)  # (ns+nt) x (ns+nt) matrices
    r = rho[:len(sc), len(sc):]
    p = pval[:len(sc), len(sc):]
    lap["spearman"] = time.perf_counter() - t1

    with open(args.out, "w", newline="") as fh:
        wtr = csv.writer(fh)
        wtr.writerow(["seed", "target", "n", "r", "p"])
        for a, ci in enumerate(sc):
            for b, cj in enumerate(tc):
                wtr.writerow([names[ci], names[cj], ntr, repr(float(r[a, b])), repr(float(p[a, b]))])
    lap["total"] = time.perf_counter() - t0
    print("numpy %s scipy %s nfft %d, %d frequencies, %d rows; " % (np.__version__, scipy.__version__, nfft, len(need), r.size)
          + ", ".join("%s %.3fs" % kv for kv in lap.items()), file=sys.stderr)

    if args.check:
        sys.exit(check(args.check, an["id"], {(names[ci], names[cj]): (r[a, b], p[a, b])
                                               for a, ci in enumerate(sc) for b, cj in enumerate(tc)}))


def check(path, analysis, ours):
    theirs = {}
    with open(path, newline="") as fh:
        for row in csv.DictReader(fh):
            if row["analysis"] == analysis:
                theirs[(row["seed"], row["target"])] = (float(row["r"]), float(row["p"]))
    if set(theirs) != set(ours):
        print("check: %s has %d pairs for %s, numpy has %d; they differ" % (path, len(theirs), analysis, len(ours)))
        return 1
    dr = max(abs(theirs[k][0] - ours[k][0]) for k in ours)
    dp = max(abs(theirs[k][1] - ours[k][1]) / max(ours[k][1], 1e-300) for k in ours)
    print("check: %d pairs, max |dr| = %.3g, max relative |dp| = %.3g" % (len(ours), dr, dp))
    if not dr < 1e-6:
        print("check: FAIL, max |dr| must be < 1e-6")
        return 1
    print("check: ok")
    return 0


if __name__ == "__main__":
    main()
