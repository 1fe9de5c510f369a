#!/usr/bin/python3
"""Writes the per-recording tables the `amplink merge` tests read.

    cd testdata/group/merge && /usr/bin/python3 gen.py

The r values are made up for the test (they stand for four runs of
`amplink run --out out/$TASK_ID`). The expected group statistics of the
a1 C4-P3 test are computed with scipy in ../make_ref.py (case "merge
fixture a1 C4-P3"); the whole merged table is a golden file. out/4 lacks the C4-P4 test so that merge warns about it, and
sub-03's O1-O2 envelope r is undefined.
"""
import csv

COLS = ["analysis", "type", "seed", "target", "method", "n", "r", "p",
        "seed_from_s", "seed_to_s", "df", "p_method", "ci_lo", "ci_hi", "ci_level", "note", "recording"]
TESTS = [
    ("a1", "trial-window", "C4", "P3", "spearman"),
    ("a1", "trial-window", "C4", "P4", "spearman"),
    ("a2", "envelope", "O1", "O2", "pearson"),
    ("a3", "comodulogram", "C3", "C4", "pearson"),
]
R = {
    1: [0.42, 0.18, 0.61, 0.77],
    2: [0.31, -0.05, 0.48, 0.70],
    3: [0.55, 0.22, None, 0.81],
    4: [0.12, None, 0.52, 0.66],
}
for task, rs in R.items():
    rec = "sub-%02d_task-tone_eeg.edf" % task
    with open("out/%d/results.csv" % task, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(COLS)
        for (a, typ, s, t, m), r in zip(TESTS, rs):
            if task == 4 and t == "P4":
                continue
            tw = typ == "trial-window"
            note = ""
            if r is None:
                note = "undefined: an envelope has zero variance"
            w.writerow([a, typ, s, t, m, 40 if tw else 2400, "" if r is None else r,
                        "" if r is None or typ == "comodulogram" else 0.01 * task,
                        -0.5 if tw else "", -0.1 if tw else "", 38 if tw else "",
                        "t" if tw else "effective-n", "", "", 0.95 if tw else "", note, rec])
