#!/usr/bin/python3
"""Reference values for amplink/core/report GroupRows (group level across recordings).

Run with Debian's python3 (python3-scipy, python3-numpy):

    /usr/bin/python3 testdata/group/make_ref.py > testdata/group/ref.json

Every expected value comes from scipy/numpy, independent of the Go code:
  - z = numpy.arctanh(r) with |r| clipped to 1 - 1e-15 (Fisher 1921);
  - pooled r = tanh(mean z);
  - scipy.stats.ttest_1samp(z, 0): t and the two-sided p, df = k - 1;
  - interval tanh(mean z -/+ c * sd(z, ddof=1)/sqrt(k)), c the (1 + level)/2
    quantile of t with k - 1 df: scipy 1.10.1's t.ppf (cdflib stdtrit) is only
    good to about 1e-8 (t.cdf(t.ppf(0.995, 3), 3) = 0.994999999976), so c is
    t.ppf refined by Newton steps on t.cdf / t.pdf until t.cdf(c) = the level;
  - scipy.stats.ttest_ind(zA, zB, equal_var=False): Welch (1947) t and p,
    with the Welch-Satterthwaite df written out from its definition.
Recordings with r = null (undefined) are left out. The case "merge fixture
a1 C4-P3" holds the r values of testdata/group/merge/out/*/results.csv
(written by testdata/group/merge/gen.py) for the `amplink merge` test.
"""
import json
import math

import numpy as np
import scipy
from scipy import stats

CLAMP = 1 - 1e-15


def fz(rs):
    return np.arctanh(np.clip(np.array([r for r in rs if r is not None], dtype=float), -CLAMP, CLAMP))


def tppf(q, df):
    c = stats.t.ppf(q, df)
    for _ in range(4):
        c -= (stats.t.cdf(c, df) - q) / stats.t.pdf(c, df)
    assert abs(stats.t.cdf(c, df) - q) < 1e-15
    return c


def pooled(z, level):
    k = len(z)
    out = {"n": k, "r": float(np.tanh(z.mean()))}
    res = stats.ttest_1samp(z, 0.0)
    sd = z.std(ddof=1)
    c = tppf((1 + level) / 2, k - 1)
    out.update(t=float(res.statistic), df=k - 1, p=float(res.pvalue),
               ci_lo=float(np.tanh(z.mean() - c * sd / math.sqrt(k))),
               ci_hi=float(np.tanh(z.mean() + c * sd / math.sqrt(k))))
    return out


def welch(za, zb):
    res = stats.ttest_ind(za, zb, equal_var=False)
    va, vb = za.var(ddof=1) / len(za), zb.var(ddof=1) / len(zb)
    df = (va + vb) ** 2 / (va ** 2 / (len(za) - 1) + vb ** 2 / (len(zb) - 1))
    return {"n": len(za) + len(zb), "diff_z": float(za.mean() - zb.mean()),
            "t": float(res.statistic), "df": float(df), "p": float(res.pvalue)}


CASES = [
    {"name": "six recordings, one undefined", "level": 0.95,
     "r": {"s01.edf": 0.42, "s02.edf": 0.31, "s03.edf": None, "s04.edf": 0.55, "s05.edf": 0.12, "s06.edf": 0.38}},
    {"name": "mixed signs, level 0.99", "level": 0.99,
     "r": {"a.csv": -0.2, "b.csv": 0.05, "c.csv": -0.41, "d.csv": -0.33}},
    {"name": "r = 1 is clamped", "level": 0.95,
     "r": {"x1.wav": 1.0, "x2.wav": 0.9, "x3.wav": 0.95}},
    {"name": "two groups", "level": 0.9,
     "r": {"p1.edf": 0.61, "p2.edf": 0.48, "p3.edf": 0.70, "p4.edf": 0.52, "p5.edf": None,
           "c1.edf": 0.21, "c2.edf": 0.35, "c3.edf": 0.05},
     "groups": {"p1.edf": "patient", "p2.edf": "patient", "p3.edf": "patient", "p4.edf": "patient",
                "p5.edf": "patient", "c1.edf": "control", "c2.edf": "control", "c3.edf": "control"}},
    {"name": "merge fixture a1 C4-P3", "level": 0.95,
     "r": {"sub-01_task-tone_eeg.edf": 0.42, "sub-02_task-tone_eeg.edf": 0.31,
           "sub-03_task-tone_eeg.edf": 0.55, "sub-04_task-tone_eeg.edf": 0.12},
     "groups": {"sub-01_task-tone_eeg.edf": "control", "sub-02_task-tone_eeg.edf": "control",
                "sub-03_task-tone_eeg.edf": "patient", "sub-04_task-tone_eeg.edf": "patient"}},
    {"name": "two groups, negative difference", "level": 0.95,
     "r": {"r1": -0.1, "r2": 0.15, "r3": 0.02, "r4": 0.44, "r5": 0.58, "r6": 0.37, "r7": 0.49},
     "groups": {"r1": "b", "r2": "b", "r3": "b", "r4": "a", "r5": "a", "r6": "a", "r7": "a"}},
]


def main():
    out = {"generator": "testdata/group/make_ref.py", "scipy": scipy.__version__, "numpy": np.__version__,
           "cases": []}
    for c in CASES:
        recs = list(c["r"].keys())
        case = {"name": c["name"], "level": c["level"], "recordings": recs,
                "r": [c["r"][k] for k in recs], "group": pooled(fz(c["r"].values()), c["level"])}
        if "groups" in c:
            case["groups"] = c["groups"]
            labels = sorted(set(c["groups"].values()))
            zs = []
            case["by_group"] = []
            for lab in labels:
                z = fz([c["r"][k] for k in recs if c["groups"][k] == lab])
                zs.append(z)
                g = pooled(z, c["level"])
                g["label"] = lab
                case["by_group"].append(g)
            case["diff"] = welch(zs[0], zs[1])
            case["diff"]["labels"] = labels
        out["cases"].append(case)
    print(json.dumps(out, indent=1))


main()
