#!/usr/bin/python3
"""Reference binned envelopes for amplink/core/connect (Envelope, OrthEnvelope).

Two seeded complex series x, y of 40 samples are split into segments of 23
and 17 samples; inside each segment, bins of 5 samples are formed from the
start and the remainder (3 and 2 samples) is left out. Per bin:
  amp_x     = mean |x|
  logpow_x  = ln(mean |x|^2)                          (natural log)
  amp_yx    = mean |Im(y*conj(x))| / |x|              (Hipp et al. 2012, Nat Neurosci 15:884)
  logpow_yx = ln(mean (Im(y*conj(x)) / |x|)^2)
computed with numpy. Writes logpower_ref.json next to this file with the
library versions.

Run: /usr/bin/python3 testdata/connect/logpower_ref.py
"""
import json
import os
import platform

import numpy as np

SEGS = [23, 17]
BIN = 5


def bins(v):
    out, off = [], 0
    for l in SEGS:
        k = l // BIN
        out.append(v[off:off + k * BIN].reshape(k, BIN))
        off += l
    return np.concatenate(out)


def main():
    rng = np.random.default_rng(7)
    n = sum(SEGS)
    x = rng.normal(size=n) + 1j * rng.normal(size=n)
    y = rng.normal(size=n) + 1j * rng.normal(size=n)
    orth = np.abs(np.imag(y * np.conj(x))) / np.abs(x)
    out = {
        "generator": "testdata/connect/logpower_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "segs": SEGS,
        "bin": BIN,
        "x_re": x.real.tolist(), "x_im": x.imag.tolist(),
        "y_re": y.real.tolist(), "y_im": y.imag.tolist(),
        "amp_x": bins(np.abs(x)).mean(axis=1).tolist(),
        "logpow_x": np.log(bins(np.abs(x) ** 2).mean(axis=1)).tolist(),
        "amp_yx": bins(orth).mean(axis=1).tolist(),
        "logpow_yx": np.log(bins(orth ** 2).mean(axis=1)).tolist(),
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "logpower_ref.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
