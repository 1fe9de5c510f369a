#!/usr/bin/python3
"""Reference values for amplink/core/stats.PermSE.

The Monte-Carlo standard error of a permutation p estimated from n draws is
the standard deviation of a binomial fraction, scipy.stats.binom(n, p).std()/n.
Writes permse_ref.json next to this file with the library versions.

Run: /usr/bin/python3 testdata/stats/permse_ref.py
"""
import json
import os
import platform

import numpy as np
import scipy
import scipy.stats

CASES = [(0.05, 199), (0.05, 9999), (0.01, 99), (0.5, 1000), (0.2, 19), (1.0, 50)]


def main():
    out = {
        "generator": "testdata/stats/permse_ref.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "cases": [{"p": p, "n": n, "se": float(scipy.stats.binom(n, p).std() / n)} for p, n in CASES],
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "permse_ref.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
