#!/usr/bin/python3
"""Independent reference for the trial-window analysis of small.csv.

Written directly from the definitions (REFERENCES.md, DESIGN.md), with numpy
and scipy only: log-spaced grid, cycles growing geometrically, the
amplitude-normalised Morlet w = 2*exp(i2πft)*g/Σg truncated at ±4σt,
scipy.signal.fftconvolve(x, w, mode="same") on the WHOLE epoch (no cropping),
window power = mean |y|² over band frequencies and window samples, then
scipy.stats.spearmanr across trials.

Run: /usr/bin/python3 testdata/cli/make_ref.py  (writes small_ref.json)
"""
import json, math, os
import numpy as np
import scipy
from scipy.signal import fftconvolve
from scipy.stats import spearmanr

here = os.path.dirname(os.path.abspath(__file__))
raw = np.genfromtxt(os.path.join(here, "small.csv"), delimiter=",", names=True, dtype=None, encoding="utf-8")
chans = ["S", "T", "U"]
trials = sorted(set(raw["trial"]))
rate = 100.0
low, high, steps, c0, c1 = 3.0, 30.0, 16, 3.0, 6.0
freqs = low * (high / low) ** (np.arange(steps) / (steps - 1))
cycles = c0 * (c1 / c0) ** (np.arange(steps) / (steps - 1))

def kernel(f, n):
    st = n / (2 * math.pi * f)
    h = math.ceil(4 * st * rate)
    t = (np.arange(2 * h + 1) - h) / rate
    g = np.exp(-t**2 / (2 * st**2))
    return 2 * np.exp(2j * math.pi * f * t) * g / g.sum()

data = {c: np.array([raw[c][raw["trial"] == tr] for tr in trials], dtype=np.float64) for c in chans}
time = raw["time"][raw["trial"] == trials[0]].astype(np.float64)

def window_power(x, trange, frange):
    ks = np.where((time >= trange[0] - 1e-9) & (time <= trange[1] + 1e-9))[0]
    fs = np.where((freqs >= frange[0]) & (freqs <= frange[1]))[0]
    out = np.zeros(x.shape[0])
    for tr in range(x.shape[0]):
        acc = 0.0
        for fi in fs:
            y = fftconvolve(x[tr], kernel(freqs[fi], cycles[fi]), mode="same")
            acc += np.mean(np.abs(y[ks])**2)
        out[tr] = acc / len(fs)
    return out

seed = window_power(data["S"], (-0.6, -0.2), (10, 14))
rows = []
for c in chans:
    tgt = window_power(data[c], (0.3, 0.7), (3, 5))
    rho, p = spearmanr(seed, tgt)
    rows.append({"seed": "S", "target": c, "r": float(rho), "p": float(p), "n": len(seed)})
out = {"source": "testdata/cli/make_ref.py", "numpy": np.__version__, "scipy": scipy.__version__, "rows": rows}
with open(os.path.join(here, "small_ref.json"), "w") as f:
    json.dump(out, f, indent=1)
print(json.dumps(out, indent=1))
