#!/usr/bin/python3
"""Reference vectors for amplink/core/stats.

Run with Debian's python3 (python3-scipy, python3-numpy):

    /usr/bin/python3 testdata/stats/make_ref.py > testdata/stats/ref.json

Every value comes from scipy/numpy, independent of the Go code:
  - spearmanr / pearsonr: r and the t-approximation two-sided p;
  - t.sf: two-sided p from r and df;
  - exact permutation p: full enumeration of all n! pairings with itertools
    (the closed-form exact null distribution for small n);
  - partial correlation: residuals of numpy.linalg.lstsq, then pearsonr
    (ranked with rankdata first for the Spearman variant);
  - ttest_1samp and ttest_ind(equal_var=False);
  - Benjamini-Hochberg and Bonferroni written out in numpy from the
    definitions (scipy 1.10 has no false_discovery_control);
  - Fisher z intervals and comparisons with norm.ppf / norm.sf.
The data are seeded with numpy.random.default_rng so the file is reproducible.
"""
import itertools
import json
import math
import sys

import numpy as np
import scipy
from scipy import stats


def fl(a):
    return [float(v) for v in a]


def exact_p(x, y, rank):
    """Two-sided exact permutation p: share of the n! pairings with |r| >= |r_obs|."""
    x = np.asarray(x, float)
    y = np.asarray(y, float)
    if rank:
        x = stats.rankdata(x)
        y = stats.rankdata(y)
    xc = x - x.mean()
    yc = y - y.mean()
    obs = abs(np.dot(xc, yc))
    perms = np.array(list(itertools.permutations(range(len(y)))))
    vals = np.abs(yc[perms] @ xc)
    count = int(np.sum(vals >= obs * (1 - 1e-9)))
    return count / len(perms), count, len(perms)


def main():
    rng = np.random.default_rng(20260101)
    out = {
        "generator": "testdata/stats/make_ref.py",
        "python": sys.version.split()[0],
        "scipy": scipy.__version__,
        "numpy": np.__version__,
    }

    # Spearman and Pearson, t-approximation p.
    corr = []

    def add_corr(name, x, y):
        rs = stats.spearmanr(x, y)
        rp = stats.pearsonr(x, y)
        corr.append({
            "name": name, "x": fl(x), "y": fl(y),
            "spearman_r": float(rs.correlation), "spearman_p": float(rs.pvalue),
            "pearson_r": float(rp[0]), "pearson_p": float(rp[1]),
            "ranks_x": fl(stats.rankdata(x)), "ranks_y": fl(stats.rankdata(y)),
        })

    add_corr("ties-REFERENCES", [1, 2, 2, 3, 4, 5], [2, 1, 3, 3, 5, 4])
    add_corr("pairs-swapped-REFERENCES", list(range(1, 11)), [2, 1, 4, 3, 6, 5, 8, 7, 10, 9])
    for n in (8, 25, 60, 200):
        x = rng.normal(size=n)
        y = 0.4 * x + rng.normal(size=n)
        add_corr(f"normal-n{n}", x, y)
    for n in (15, 40):
        # Heavy ties: small integer values.
        x = rng.integers(0, 5, size=n).astype(float)
        y = np.round(x + rng.normal(scale=1.5, size=n))
        add_corr(f"ties-n{n}", x, y)
    x = rng.lognormal(size=50)
    y = x * rng.lognormal(size=50)
    add_corr("lognormal-n50", x, y)
    out["corr"] = corr

    # t-approximation p from r and df.
    tcases = []
    for r, df in [(0.1, 10), (0.5, 28), (-0.7, 5), (0.93939, 8), (0.999, 3),
                  (0.3, 198), (-0.05, 1000), (0.8, 1.5)]:
        t = r * math.sqrt(df / (1 - r * r))
        tcases.append({"r": r, "df": df, "t": t, "p": float(2 * stats.t.sf(abs(t), df))})
    out["pvalue_t"] = tcases

    # Exact permutation p by full enumeration.
    ex = []
    for name, x, y in [
        ("n5-a", [1, 2, 3, 4, 5], [2, 1, 4, 3, 5]),
        ("n5-b", [1, 2, 3, 4, 5], [5, 3, 4, 1, 2]),
        ("n5-ties", [1, 2, 2, 3, 4], [1, 3, 2, 2, 5]),
        ("n6-normal", fl(rng.normal(size=6)), fl(rng.normal(size=6))),
        ("n7-c", [1, 2, 3, 4, 5, 6, 7], [3, 2, 1, 5, 4, 7, 6]),
        ("n7-ties", [1, 1, 2, 3, 3, 4, 5], [2, 1, 1, 4, 3, 5, 5]),
        ("n8-normal", fl(rng.normal(size=8)), fl(rng.normal(size=8))),
    ]:
        ps, cs, ts = exact_p(x, y, True)
        pp, cp, tp = exact_p(x, y, False)
        ex.append({"name": name, "x": fl(x), "y": fl(y),
                   "spearman_p": ps, "spearman_count": cs,
                   "pearson_p": pp, "pearson_count": cp, "total": ts})
    out["exact"] = ex

    # Partial correlation by least-squares residuals.
    part = []
    for n, k in [(30, 1), (50, 2), (80, 3)]:
        covs = rng.normal(size=(k, n))
        x = covs.sum(axis=0) + rng.normal(size=n)
        y = 0.5 * x + covs[0] - rng.normal(size=n)
        for spear in (False, True):
            xs, ys, cs = x, y, covs
            if spear:
                xs = stats.rankdata(x)
                ys = stats.rankdata(y)
                cs = np.array([stats.rankdata(c) for c in covs])
            a = np.column_stack([np.ones(n)] + list(cs))
            rx = xs - a @ np.linalg.lstsq(a, xs, rcond=None)[0]
            ry = ys - a @ np.linalg.lstsq(a, ys, rcond=None)[0]
            r = float(stats.pearsonr(rx, ry)[0])
            df = n - 2 - k
            t = r * math.sqrt(df / (1 - r * r))
            part.append({"n": n, "k": k, "spearman": spear, "x": fl(x), "y": fl(y),
                         "covs": [fl(c) for c in covs], "r": r, "df": df,
                         "p": float(2 * stats.t.sf(abs(t), df))})
    out["partial"] = part

    # t tests.
    tt = []
    for n in (5, 12, 40):
        x = rng.normal(loc=0.4, size=n)
        res = stats.ttest_1samp(x, 0.0)
        tt.append({"kind": "one", "x": fl(x), "t": float(res.statistic),
                   "df": n - 1, "p": float(res.pvalue)})
    for nx, ny, sy in [(6, 9, 3.0), (20, 15, 0.5), (40, 41, 1.0)]:
        x = rng.normal(size=nx)
        y = rng.normal(loc=0.5, scale=sy, size=ny)
        res = stats.ttest_ind(x, y, equal_var=False)
        vx = x.var(ddof=1) / nx
        vy = y.var(ddof=1) / ny
        df = (vx + vy) ** 2 / (vx ** 2 / (nx - 1) + vy ** 2 / (ny - 1))
        tt.append({"kind": "welch", "x": fl(x), "y": fl(y), "t": float(res.statistic),
                   "df": float(df), "p": float(res.pvalue)})
    out["ttest"] = tt

    # Multiple comparisons.
    def bh(p):
        p = np.asarray(p, float)
        q = np.full(p.shape, np.nan)
        ok = ~np.isnan(p)
        pv = p[ok]
        m = len(pv)
        order = np.argsort(pv, kind="stable")
        adj = pv[order] * m / np.arange(1, m + 1)
        adj = np.minimum.accumulate(adj[::-1])[::-1]
        adj = np.minimum(adj, 1.0)
        qq = np.empty(m)
        qq[order] = adj
        q[ok] = qq
        return q

    def bonf(p):
        p = np.asarray(p, float)
        m = int(np.sum(~np.isnan(p)))
        return np.minimum(p * m, 1.0)

    def js(a):
        return [None if math.isnan(v) else float(v) for v in a]

    mc = []
    bh95 = [.0001, .0004, .0019, .0095, .0201, .0278, .0298, .0344, .0459,
            .3240, .4262, .5719, .6528, .7590, 1.0]
    shuffled = list(rng.permutation(bh95))
    withnan = [0.01, float("nan"), 0.04, 0.03, float("nan"), 0.2, 0.001]
    unif = fl(rng.uniform(size=40) ** 2)
    for name, p in [("bh1995", bh95), ("bh1995-shuffled", fl(shuffled)),
                    ("with-nan", withnan), ("uniform-squared", unif)]:
        mc.append({"name": name, "p": js(p), "bh": js(bh(p)), "bonferroni": js(bonf(p))})
    out["multiple"] = mc

    # Fisher z.
    fz = []
    for r, n, level in [(0.5, 50, 0.95), (-0.3, 20, 0.99), (0.8, 200, 0.9), (0.0, 10, 0.95)]:
        z = math.atanh(r)
        zc = stats.norm.ppf(1 - (1 - level) / 2)
        se = 1 / math.sqrt(n - 3)
        ses = math.sqrt((1 + r * r / 2) / (n - 3))
        fz.append({"r": r, "n": n, "level": level,
                   "lo": math.tanh(z - zc * se), "hi": math.tanh(z + zc * se),
                   "lo_s": math.tanh(z - zc * ses), "hi_s": math.tanh(z + zc * ses)})
    out["fisher_ci"] = fz

    ind = []
    for r1, n1, r2, n2 in [(0.5, 50, 0.3, 60), (0.1, 30, 0.6, 25), (-0.2, 100, 0.2, 100)]:
        for spear in (False, True):
            v1 = (1 + r1 * r1 / 2 if spear else 1.0) / (n1 - 3)
            v2 = (1 + r2 * r2 / 2 if spear else 1.0) / (n2 - 3)
            z = (math.atanh(r1) - math.atanh(r2)) / math.sqrt(v1 + v2)
            ind.append({"r1": r1, "n1": n1, "r2": r2, "n2": n2, "spearman": spear,
                        "z": z, "p": float(2 * stats.norm.sf(abs(z)))})
    out["compare_independent"] = ind

    dep = []
    for rjk, rjh, rkh, n in [(0.5, 0.3, 0.4, 100), (0.2, 0.6, 0.1, 40), (-0.3, 0.3, 0.7, 60)]:
        # Steiger (1980) eq. 14 with the pooled r.
        rb = (rjk + rjh) / 2
        psi = rkh * (1 - 2 * rb * rb) - 0.5 * rb * rb * (1 - 2 * rb * rb - rkh * rkh)
        s = psi / (1 - rb * rb) ** 2
        z = (math.atanh(rjk) - math.atanh(rjh)) * math.sqrt(n - 3) / math.sqrt(2 - 2 * s)
        dep.append({"rjk": rjk, "rjh": rjh, "rkh": rkh, "n": n,
                    "z": z, "p": float(2 * stats.norm.sf(abs(z)))})
    out["compare_dependent"] = dep

    json.dump(out, sys.stdout, indent=1, sort_keys=True, allow_nan=False)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
