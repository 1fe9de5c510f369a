#!/usr/bin/python3
"""Writes the CSV/TSV fixtures of amplink/core/format/csv and ref.json.

The valid files hold float32 values drawn with numpy (default_rng, fixed
seeds) and printed in numpy's shortest float32 form; ref.json lists, for each
valid file, the nominal sample rate and start used to make the time column,
the channel names, trial ids and the float32 values (as exact decimal
doubles) that numpy itself gets back from the text with np.loadtxt.
The invalid-*.csv files are small hand-made breakages of one rule each.

Run: /usr/bin/python3 testdata/csv/make_ref.py   (from the module root)
"""
import json
import os
import sys

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))


def f32(v, sci=False):
    v = np.float32(v)
    if sci:
        return np.format_float_scientific(v, unique=True, trim="-")
    return np.format_float_positional(v, unique=True, trim="-")


def write(name, text, bom=False, crlf=False):
    if crlf:
        text = text.replace("\n", "\r\n")
    data = text.encode("utf-8")
    if bom:
        data = b"\xef\xbb\xbf" + data
    with open(os.path.join(HERE, name), "wb") as f:
        f.write(data)
    return data


def epoched(name, seed, ids, chans, rate, start, ns, tfmt, sep=",", bom=False, crlf=False, hdr=None):
    rng = np.random.default_rng(seed)
    vals = rng.normal(0.0, 20.0, size=(len(ids), len(chans), ns)).astype(np.float32)
    vals[:, -1, :] *= np.float32(1e-6)  # last channel in scientific notation
    lines = [sep.join(hdr or (["trial", "time"] + chans))]
    for t, tid in enumerate(ids):
        for k in range(ns):
            row = [tid, tfmt % (start + k / rate)]
            for c in range(len(chans)):
                row.append(f32(vals[t, c, k], sci=(c == len(chans) - 1)))
            lines.append(sep.join(row))
    raw = write(name, "\n".join(lines) + "\n", bom=bom, crlf=crlf)
    back = reread(raw, sep, skip_cols=2)  # numpy's own reading of the text
    back = back.reshape(len(ids), ns, len(chans)).transpose(0, 2, 1)
    assert np.array_equal(back, vals)
    return {"kind": "epochs", "rate": rate, "start": float(tfmt % start), "channels": chans,
            "trials": ids, "nsamples": ns, "values": [float(v) for v in back.ravel()]}


def continuous(name, seed, chans, rate, start, ns, tfmt, sep=",", bom=False, crlf=False, hdr=None):
    rng = np.random.default_rng(seed)
    vals = rng.normal(0.0, 50.0, size=(len(chans), ns)).astype(np.float32)
    lines = [sep.join(hdr or (["time"] + chans))]
    for k in range(ns):
        lines.append(sep.join([tfmt % (start + k / rate)] + [f32(vals[c, k]) for c in range(len(chans))]))
    raw = write(name, "\n".join(lines) + "\n", bom=bom, crlf=crlf)
    back = reread(raw, sep, skip_cols=1).T
    assert np.array_equal(back, vals)
    return {"kind": "recording", "rate": rate, "start": float(tfmt % start), "channels": chans,
            "nsamples": ns, "values": [float(v) for v in back.ravel()]}


def reread(raw, sep, skip_cols):
    text = raw.decode("utf-8-sig").replace("\r\n", "\n").splitlines()[1:]
    rows = [",".join(line.split(sep)[skip_cols:]) for line in text if line.strip()]
    return np.loadtxt(rows, dtype=np.float32, delimiter=",", ndmin=2)


def main():
    files = {}
    files["epoched.csv"] = epoched("epoched.csv", 1, ["1", "2", "3"], ["Fz", "Cz", "Pz"], 250.0, -0.02, 25, "%.3f")
    files["continuous.csv"] = continuous("continuous.csv", 2, ["C3", "C4"], 500.0, 0.0, 40, "%.4f")
    files["tabs.tsv"] = epoched("tabs.tsv", 3, ["go-1", "stop 2", "go-3", "go-4"], ["EEG Fz", "O1,ref"], 100.0, -0.5, 12, "%.2f", sep="\t")
    files["bom.csv"] = continuous("bom.csv", 4, ["Fp1", "Fp2", "Oz"], 200.0, 1.5, 30, "%.3f", bom=True)
    files["crlf.csv"] = epoched("crlf.csv", 5, ["x", "y"], ["A1", "A2"], 1000.0, 0.0, 16, "%.3f", crlf=True,
                                hdr=[" TRIAL ", "Time", " A1", "A2 "])
    files["rate1024.csv"] = continuous("rate1024.csv", 6, ["LFP1"], 1024.0, 0.0, 64, "%.6f")
    files["rate1024.csv"]["rate_rtol"] = 1e-4  # times rounded to 1 µs
    # quoted header names (RFC 4180) and a BOM with CRLF together
    files["quoted.csv"] = continuous("quoted.csv", 7, ['say "hi"', "a,b"], 128.0, 0.0, 10, "%.10f", bom=True, crlf=True,
                                     hdr=["time", '"say ""hi"""', ' "a,b" '])

    invalid = {
        "invalid-empty.csv": "",
        "invalid-blank.csv": "\n  \n\t\n",
        "invalid-header-only.csv": "time,Fz,Cz\n",
        "invalid-no-channels.csv": "time\n0\n0.1\n",
        "invalid-first-column.csv": "t,Fz\n0,1\n",
        "invalid-second-column.csv": "trial,Fz,Cz\n1,2,3\n",
        "invalid-events.csv": "onset\tduration\ttrial_type\n1.0\t0\tgo\n",
        "invalid-dup-channel.csv": "time,Fz,Cz,Fz\n0,1,2,3\n",
        "invalid-empty-name.csv": "time,Fz,,Cz\n0,1,2,3\n",
        "invalid-ragged-short.csv": "time,Fz,Cz\n0,1,2\n0.01,3\n",
        "invalid-ragged-long.csv": "time,Fz,Cz\n0,1,2\n0.01,3,4,5\n",
        "invalid-number.csv": "trial,time,Fz,Cz\n1,0,1,2\n1,0.5,abc,3\n",
        "invalid-empty-value.csv": "time,Fz,Cz\n0,1,\n0.5,1,2\n",
        "invalid-nan.csv": "time,Fz,Cz\n0,1,2\n0.5,NaN,3\n",
        "invalid-inf.csv": "time,Fz,Cz\n0,1,2\n0.5,3,-Inf\n",
        "invalid-range.csv": "time,Fz\n0,1\n0.5,1e39\n",
        "invalid-time.csv": "time,Fz\n0,1\nlater,2\n",
        "invalid-decreasing.csv": "time,Fz\n0,1\n0.1,2\n0.1,3\n",
        "invalid-uneven.csv": "time,Fz\n0,1\n0.1,2\n0.2,3\n0.35,4\n",
        "invalid-one-sample.csv": "time,Fz\n0,1\n",
        "invalid-unequal-trials.csv": "trial,time,Fz\n1,0,1\n1,0.1,2\n1,0.2,3\n2,0,4\n2,0.1,5\n3,0,6\n3,0.1,7\n3,0.2,8\n",
        "invalid-last-trial-short.csv": "trial,time,Fz\n1,0,1\n1,0.1,2\n1,0.2,3\n2,0,4\n2,0.1,5\n",
        "invalid-long-trial.csv": "trial,time,Fz\n1,0,1\n1,0.1,2\n2,0,4\n2,0.1,5\n2,0.2,6\n",
        "invalid-trial-times.csv": "trial,time,Fz\n1,0,1\n1,0.1,2\n2,0.05,4\n2,0.15,5\n",
        "invalid-trial-again.csv": "trial,time,Fz\n1,0,1\n1,0.1,2\n2,0,4\n2,0.1,5\n1,0,6\n1,0.1,7\n",
        "invalid-trial-id.csv": "trial,time,Fz\n1,0,1\n1,0.1,2\n,0,4\n",
        "invalid-quote.csv": "time,\"Fz,Cz\n0,1\n",
        "invalid-bare-quote.csv": "time,F\"z\n0,1\n",
        "invalid-after-quote.csv": "time,\"Fz\"x\n0,1\n",
    }
    for name, text in invalid.items():
        write(name, text)
    with open(os.path.join(HERE, "invalid-utf16.csv"), "wb") as f:
        f.write("time,Fz\n0,1\n0.5,2\n".encode("utf-16"))  # with its BOM

    write("trials.csv", "trial,rt,condition\n1,0.412,easy\n2,n/a,\"hard, late\"\n3,0.388,easy\n")
    write("trials-invalid-dup.csv", "trial,rt\n1,0.4\n2,0.5\n1,0.6\n")
    write("trials-invalid-header.csv", "id,rt\n1,0.4\n")

    ref = {"generator": "testdata/csv/make_ref.py", "python": sys.version.split()[0],
           "numpy": np.__version__, "files": files}
    with open(os.path.join(HERE, "ref.json"), "w") as f:
        json.dump(ref, f, indent=1, sort_keys=True)
        f.write("\n")


main()
