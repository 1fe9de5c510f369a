#!/usr/bin/python3
"""Writes the f32 test files with numpy, independently of the Go code.

Run from this directory: /usr/bin/python3 make_ref.py
small.f32 holds value = 100*trial + 10*channel + sample/4 (0-based) as
little-endian float32 in [trial][channel][sample] order; small.ref.json lists
the same values as numpy reads them back, for the Go test to compare.
"""
import json
import numpy as np

T, C, S = 2, 3, 5
t, c, s = np.meshgrid(np.arange(T), np.arange(C), np.arange(S), indexing="ij")
vals = (100.0 * t + 10.0 * c + s / 4.0 - 0.1).astype("<f4")


def side(name, d, text=None):
    with open(name, "w") as f:
        f.write(text if text is not None else json.dumps(d, indent=1) + "\n")


base = {"sampleRate": 250, "channels": ["Fz", "Cz", "Pz"], "trials": T,
        "samples": S, "start": -0.008, "units": "uV"}

vals.tofile("small.f32")
side("small.json", base)
ref = {"source": "numpy %s, make_ref.py" % np.__version__,
       "shape": [T, C, S],
       "values": np.fromfile("small.f32", dtype="<f4").astype(float).tolist()}
side("small.ref.json", ref)

vals.tofile("types.f32")
side("types.json", dict(base, trialTypes=["tone", "noise"]))

# Broken copies.
vals[:, :, :4].tofile("invalid-size.f32")
side("invalid-size.json", base)
vals.tofile("invalid-missing.f32")
side("invalid-missing.json", {k: v for k, v in base.items() if k != "start"})
vals.tofile("invalid-unknown.f32")
side("invalid-unknown.json", dict(base, sampelRate=250))
nan = vals.copy()
nan[1, 2, 3] = np.nan
nan.tofile("invalid-nan.f32")
side("invalid-nan.json", base)
inf = vals.copy()
inf[0, 1, 0] = -np.inf
inf.tofile("invalid-inf.f32")
side("invalid-inf.json", base)
vals.tofile("invalid-syntax.f32")
side("invalid-syntax.json", None, '{"sampleRate": 250,\n "channels": ["Fz" "Cz"]}\n')
vals.tofile("invalid-types.f32")
side("invalid-types.json", dict(base, trialTypes=["tone"]))
vals.tofile("invalid-trials.f32")
side("invalid-trials.json", dict(base, trials=2.5))
