#!/usr/bin/python3
"""Reference values for the envelope analysis of amplink/core/connect.

Builds two seeded signals of 2000 samples at 200 Hz:
  x: a 10 Hz carrier whose amplitude is a slow random envelope a(t),
  y: a 10 Hz carrier with an independent, slowly drifting phase whose
     amplitude 0.6*a(t) + 0.4*b(t) + const is correlated with a(t),
plus white noise on both. The values are rounded to float32, so that the Go
test can feed them as []float32 or []float64 alike.

Kernels are the project's amplitude-normalised complex Morlet wavelets
    w[k] = 2 * exp(i*2*pi*f*t_k) * g(t_k) / sum(g),  g(t) = exp(-t^2 / (2*sigma_t^2)),
    sigma_t = n / (2*pi*f),  t_k = (k - H) / rate,  H = ceil(4 * sigma_t * rate)
(REFERENCES.md, "Complex Morlet wavelet"). The band signal is the mean over
the grid frequencies inside the band of scipy.signal.fftconvolve(x, w,
mode="same"); `half` samples (the largest H among the band's wavelets) are
discarded at each end. Then
  (a) aec  = numpy.corrcoef(|X|, |Y|)[0, 1]
  (b) orth = 0.5 * (corr(|X|, |Im(Y*conj(X))/|X||) + corr(|Y|, |Im(X*conj(Y))/|Y||))
(Hipp et al. 2012, Nat Neurosci 15:884). Writes envelope_ref.json next to
this file, with the library versions.

Run: /usr/bin/python3 testdata/connect/make_ref.py
"""
import json
import math
import os
import platform

import numpy as np
import scipy
import scipy.signal

SUPPORT = 4
RATE = 200.0
N = 2000
FREQS = [6.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0, 13.0, 14.0]
CYCLES = [4.0, 4.5, 5.0, 5.5, 6.0, 6.5, 7.0, 7.5, 8.0]
BAND = (8.0, 12.0)


def kernel(rate, f, n):
    sigma_t = n / (2 * math.pi * f)
    half = math.ceil(SUPPORT * sigma_t * rate)
    t = (np.arange(2 * half + 1) - half) / rate
    g = np.exp(-t * t / (2 * sigma_t * sigma_t))
    w = 2.0 * np.exp(1j * 2 * np.pi * f * t) * g / g.sum()
    return half, w


def slow(rng, n, width):
    """Smoothed white noise, scaled to unit standard deviation."""
    v = np.convolve(rng.standard_normal(n + 2 * width), np.hanning(2 * width + 1), mode="same")[width:-width]
    return v / v.std()


def corr(a, b):
    return float(np.corrcoef(a, b)[0, 1])


def main():
    rng = np.random.default_rng(20261202)
    t = np.arange(N) / RATE
    a = slow(rng, N, 60)
    b = slow(rng, N, 60)
    phase = np.cumsum(rng.standard_normal(N)) * 0.05 + 1.1
    x = (1.5 + 0.6 * a) * np.cos(2 * np.pi * 10.0 * t) + 0.3 * rng.standard_normal(N)
    y = (1.2 + 0.36 * a + 0.24 * b) * np.cos(2 * np.pi * 10.0 * t + phase) + 0.3 * rng.standard_normal(N)
    x = x.astype(np.float32).astype(np.float64)
    y = y.astype(np.float32).astype(np.float64)

    band = [i for i, f in enumerate(FREQS) if BAND[0] <= f <= BAND[1]]
    halves = []
    zx = np.zeros(N, dtype=complex)
    zy = np.zeros(N, dtype=complex)
    for i in band:
        h, w = kernel(RATE, FREQS[i], CYCLES[i])
        halves.append(h)
        zx += scipy.signal.fftconvolve(x, w, mode="same")
        zy += scipy.signal.fftconvolve(y, w, mode="same")
    zx /= len(band)
    zy /= len(band)
    half = max(halves)
    zx = zx[half:N - half]
    zy = zy[half:N - half]
    ax, ay = np.abs(zx), np.abs(zy)
    y_orth_x = np.abs(np.imag(zy * np.conj(zx)) / ax)
    x_orth_y = np.abs(np.imag(zx * np.conj(zy)) / ay)
    orth_xy = corr(ax, y_orth_x)
    orth_yx = corr(ay, x_orth_y)
    out = {
        "generator": "testdata/connect/make_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "rate": RATE,
        "freqs": FREQS,
        "cycles": CYCLES,
        "band": list(BAND),
        "band_index": band,
        "half": half,
        "x": x.tolist(),
        "y": y.tolist(),
        # every 25th envelope sample after the edge discard, from index 0
        "env_step": 25,
        "env_x": ax[::25].tolist(),
        "env_y": ay[::25].tolist(),
        "raw_corr": corr(x, y),
        "aec": corr(ax, ay),
        "orth_xy": orth_xy,
        "orth_yx": orth_yx,
        "orth": 0.5 * (orth_xy + orth_yx),
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "envelope_ref.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
