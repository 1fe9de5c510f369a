#!/usr/bin/python3
"""Reference band signals for amplink/core/spectral's overlap-save route.

A seeded 6000-sample signal at 250 Hz (a 10 Hz carrier with a slow amplitude
drift, a 9 Hz one, white noise), rounded to float32. The band signal is the
mean over the band's wavelets of the 'same'-aligned linear convolution with
each amplitude-normalised complex Morlet kernel
    w[k] = 2 * exp(i*2*pi*f*t_k) * g(t_k) / sum(g),  g(t) = exp(-t^2 / (2*sigma_t^2)),
    sigma_t = n / (2*pi*f),  t_k = (k - H) / rate,  H = ceil(4 * sigma_t * rate)
(as in make_ref.py), computed twice: with scipy.signal.oaconvolve (scipy's
own overlap-add block convolution) and with scipy.signal.fftconvolve (one
transform). Both are written, every 3rd output sample, with their largest
difference. Writes band_ref.json next to this file.

Run: /usr/bin/python3 testdata/spectral/make_band_ref.py
"""
import json
import math
import os
import platform

import numpy as np
import scipy
import scipy.signal

SUPPORT = 4
RATE = 250.0
N = 6000
FREQS = [8.0, 9.0, 10.0, 11.0, 12.0]
CYCLES = [5.0, 5.5, 6.0, 6.5, 7.0]
STEP = 3


def kernel(rate, f, n):
    sigma_t = n / (2 * math.pi * f)
    half = math.ceil(SUPPORT * sigma_t * rate)
    t = (np.arange(2 * half + 1) - half) / rate
    g = np.exp(-t * t / (2 * sigma_t * sigma_t))
    w = 2.0 * np.exp(1j * 2 * np.pi * f * t) * g / g.sum()
    return half, w


def main():
    rng = np.random.default_rng(20261202)
    t = np.arange(N) / RATE
    drift = 1.0 + 0.5 * np.sin(2 * np.pi * 0.07 * t)
    x = drift * np.cos(2 * np.pi * 10.0 * t) + 0.7 * np.cos(2 * np.pi * 9.0 * t + 0.4) + 0.5 * rng.standard_normal(N)
    x = x.astype(np.float32).astype(np.float64)
    oa = np.zeros(N, dtype=complex)
    fc = np.zeros(N, dtype=complex)
    halves = []
    for f, n in zip(FREQS, CYCLES):
        h, w = kernel(RATE, f, n)
        halves.append(h)
        oa += scipy.signal.oaconvolve(x, w, mode="same")
        fc += scipy.signal.fftconvolve(x, w, mode="same")
    oa /= len(FREQS)
    fc /= len(FREQS)
    out = {
        "generator": "testdata/spectral/make_band_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "rate": RATE,
        "freqs": FREQS,
        "cycles": CYCLES,
        "halves": halves,
        "step": STEP,
        "x": x.tolist(),
        "oa_re": oa.real[::STEP].tolist(),
        "oa_im": oa.imag[::STEP].tolist(),
        "fft_re": fc.real[::STEP].tolist(),
        "fft_im": fc.imag[::STEP].tolist(),
        "max_abs_oa_minus_fft": float(np.max(np.abs(oa - fc))),
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "band_ref.json")
    with open(path, "w") as fh:
        json.dump(out, fh)
        fh.write("\n")


if __name__ == "__main__":
    main()
