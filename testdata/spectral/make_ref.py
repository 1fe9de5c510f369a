#!/usr/bin/python3
"""Reference vectors for amplink/core/spectral.

Builds the amplitude-normalised complex Morlet kernel
    w[k] = 2 * exp(i*2*pi*f*t_k) * g(t_k) / sum(g),  g(t) = exp(-t^2 / (2*sigma_t^2)),
    sigma_t = n / (2*pi*f),  t_k = (k - H) / rate,  H = ceil(4 * sigma_t * rate),
in numpy, and convolves a short seeded signal with it using
scipy.signal.fftconvolve(x, w, mode='same'). Also records frequency and cycle
grids (numpy.geomspace/linspace) and 5-smooth FFT lengths
(scipy.fft.next_fast_len(n, real=True)). Writes ref.json next to this file.

Run: /usr/bin/python3 testdata/spectral/make_ref.py
"""
import json
import math
import os
import platform

import numpy as np
import scipy
import scipy.fft
import scipy.signal

SUPPORT = 4
RATE = 250.0
N = 300
CASES = [(6.0, 4.0), (6.0, 7.0), (20.0, 4.0), (20.0, 7.0)]


def kernel(rate, f, n):
    sigma_t = n / (2 * math.pi * f)
    half = math.ceil(SUPPORT * sigma_t * rate)
    t = (np.arange(2 * half + 1) - half) / rate
    g = np.exp(-t * t / (2 * sigma_t * sigma_t))
    w = 2.0 * np.exp(1j * 2 * np.pi * f * t) * g / g.sum()
    return half, w


def main():
    rng = np.random.default_rng(20261201)
    t = np.arange(N) / RATE
    x = rng.standard_normal(N) + 2.0 * np.cos(2 * np.pi * 6.0 * t) + np.cos(2 * np.pi * 20.0 * t + 0.3)
    # Round to float32 so that the Go test can feed the same values as []float32.
    x = x.astype(np.float32).astype(np.float64)
    cases = []
    for f, n in CASES:
        half, w = kernel(RATE, f, n)
        y = scipy.signal.fftconvolve(x, w, mode="same")
        cases.append({
            "freq": f,
            "cycles": n,
            "half": half,
            "kernel_re": w.real.tolist(),
            "kernel_im": w.imag.tolist(),
            "same_re": y.real.tolist(),
            "same_im": y.imag.tolist(),
        })
    grids = []
    for low, high, steps in [(3.0, 40.0, 28), (2.0, 32.0, 5), (1.0, 100.0, 7), (4.0, 4.5, 2)]:
        grids.append({
            "low": low, "high": high, "steps": steps,
            "log": np.geomspace(low, high, steps).tolist(),
            "linear": np.linspace(low, high, steps).tolist(),
        })
    cycles = []
    for n, c0, c1 in [(28, 3.0, 9.0), (5, 4.0, 12.0), (3, 7.0, 7.0), (10, 10.0, 3.0)]:
        # c_i = c0*(c1/c0)**(i/(n-1)) is numpy.geomspace(c0, c1, n).
        cycles.append({"n": n, "c0": c0, "c1": c1, "values": np.geomspace(c0, c1, n).tolist()})
    sizes = [1, 2, 7, 11, 13, 17, 97, 121, 300, 511, 1001, 1250, 1537, 4097, 9999, 123457]
    good = [{"n": n, "good": int(scipy.fft.next_fast_len(n, real=True))} for n in sizes]
    out = {
        "generator": "testdata/spectral/make_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "rate": RATE,
        "x": x.tolist(),
        "cases": cases,
        "frequencies": grids,
        "cycles": cycles,
        "next_fast_len_real": good,
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
