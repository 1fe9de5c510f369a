#!/usr/bin/python3
"""Reference colour conversions for core/plot tests.

Run with Debian's python3 (numpy): /usr/bin/python3 make_ref.py > colour_ref.json

OKLab is computed by the route Ottosson (2020, "A perceptual color space
for image processing") gives for XYZ: sRGB -> linear (IEC 61966-2-1) ->
XYZ (sRGB D65 matrix, IEC 61966-2-1) -> LMS (M1, XYZ form) -> cube root ->
Lab (M2). The Go code uses the pre-multiplied linear-sRGB matrix instead,
so the two agree only if both routes are right.

The colour-vision-deficiency simulation applies the Machado et al. (2009)
severity-1.0 matrices (the paper's table, as core/plot/color.go names) to linear
sRGB and clips to [0, 1].
"""
import json
import numpy as np

SRGB_TO_XYZ = np.array([
    [0.4124, 0.3576, 0.1805],
    [0.2126, 0.7152, 0.0722],
    [0.0193, 0.1192, 0.9505],
])
M1 = np.array([
    [0.8189330101, 0.3618667424, -0.1288597137],
    [0.0329845436, 0.9293118715, 0.0361456387],
    [0.0482003018, 0.2643662691, 0.6338517070],
])
M2 = np.array([
    [0.2104542553, 0.7936177850, -0.0040720468],
    [1.9779984951, -2.4285922050, 0.4505937099],
    [0.0259040371, 0.7827717662, -0.8086757660],
])
DEUTAN = np.array([
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.011820, 0.042940, 0.968881],
])
PROTAN = np.array([
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
])


def to_linear(v):
    v = np.asarray(v, dtype=float)
    return np.where(v <= 0.04045, v / 12.92, ((v + 0.055) / 1.055) ** 2.4)


def to_srgb(v):
    v = np.asarray(v, dtype=float)
    return np.where(v <= 0.0031308, 12.92 * v, 1.055 * np.power(v, 1 / 2.4) - 0.055)


def hex_to_rgb(h):
    return np.array([int(h[i:i + 2], 16) / 255 for i in (1, 3, 5)])


def oklab(h):
    xyz = SRGB_TO_XYZ @ to_linear(hex_to_rgb(h))
    return M2 @ np.cbrt(M1 @ xyz)


def simulate(h, m):
    return to_srgb(np.clip(m @ to_linear(hex_to_rgb(h)), 0, 1))


colours = ["#ffffff", "#000000", "#ff0000", "#00ff00", "#0000ff", "#808080",
           "#2a5d8f", "#c0561b", "#f2e6c9", "#123456"]
out = {
    "source": "testdata/plot/make_ref.py",
    "numpy": np.__version__,
    "oklab": [{"hex": h, "lab": [round(float(x), 6) for x in oklab(h)]} for h in colours],
    "deuteranope": [{"hex": h, "rgb": [round(float(x), 6) for x in simulate(h, DEUTAN)]} for h in colours],
    "protanope": [{"hex": h, "rgb": [round(float(x), 6) for x in simulate(h, PROTAN)]} for h in colours],
}
print(json.dumps(out, indent=1))
