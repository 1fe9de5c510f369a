#!/usr/bin/python3
"""Writes the BIDS sidecar fixtures of amplink/core/format/bids and ref.json.

ref.json holds what Python's own csv module (delimiter tab) and float() read
from each valid file, following the BIDS rules (Gorgolewski et al. 2016;
Pernet et al. 2019): onset and duration in seconds, "n/a" for missing
(duration n/a -> 0), trial_type optional, all other columns kept as text;
channels.tsv needs name, type and units, status is good or bad.
The invalid-*.tsv files break one rule each.

Run: /usr/bin/python3 testdata/bids/make_ref.py   (from the module root)
"""
import csv
import io
import json
import os
import sys

HERE = os.path.dirname(os.path.abspath(__file__))

FILES = {
    # In the style of the events.tsv example of the BIDS specification (from memory).
    "events.tsv": "onset\tduration\ttrial_type\tresponse_time\tstim_file\n"
                  "1.2\t0.6\tgo\t1.435\timages/red_square.jpg\n"
                  "5.6\t0.6\tstop\t1.739\timages/blue_square.jpg\n"
                  "9.25\tn/a\tgo\tn/a\tn/a\n"
                  "12.0\t0\tstop\t0.512\timages/blue_square.jpg\n",
    "events-minimal.tsv": "onset\tduration\n0.5\tn/a\n1.5\t0.25\n-0.1\t0\n",
    "events-crlf.tsv": "\ufeffOnset\tDuration\tTrial_Type\r\n3\t1\ttone\r\n\r\n4.5\t1\ttone\r\n",
    "events-header-only.tsv": "onset\tduration\ttrial_type\n",
    "channels.tsv": "name\ttype\tunits\tlow_cutoff\thigh_cutoff\tstatus\tstatus_description\n"
                    "Fp1\tEEG\tuV\t0.1\t100\tgood\tn/a\n"
                    "Cz\tEEG\tuV\t0.1\t100\tbad\tflat line after 300 s\n"
                    "VEOG\tVEOG\tuV\t0.1\t100\tn/a\tn/a\n"
                    "FDI\tEMG\tuV\t10\t500\tBAD\tn/a\n",
    "channels-minimal.tsv": "name\ttype\tunits\nMEG0111\tMEGMAG\tfT\nMEG0112\tMEGGRADPLANAR\tfT/cm\n",
    # In the style of the participants.tsv example of the BIDS specification (from memory).
    "participants.tsv": "participant_id\tage\tsex\tgroup\n"
                        "sub-01\t34\tF\tcontrol\n"
                        "sub-02\tn/a\tM\tpatient\n"
                        "sub-03\t29\tn/a\tpatient\n",
    "participants-header-only.tsv": "participant_id\n",
    "participants-crlf.tsv": "\ufeffparticipant_id\tGroup\r\nsub-01\tA\r\n\r\nsub-02\tB\r\n",
}

INVALID = {
    "invalid-events-empty.tsv": "",
    "invalid-events-no-onset.tsv": "time\tduration\ttrial_type\n1\t0\tgo\n",
    "invalid-events-commas.tsv": "onset,duration,trial_type\n1,0,go\n",
    "invalid-events-onset.tsv": "onset\tduration\n1.0\t0\nsoon\t0\n",
    "invalid-events-onset-na.tsv": "onset\tduration\nn/a\t0\n",
    "invalid-events-duration.tsv": "onset\tduration\n1.0\tlong\n",
    "invalid-events-negative.tsv": "onset\tduration\n1.0\t-0.5\n",
    "invalid-events-ragged.tsv": "onset\tduration\ttrial_type\n1.0\t0\tgo\n2.0\t0\n",
    "invalid-events-dup-column.tsv": "onset\tduration\tOnset\n1\t0\t2\n",
    "invalid-channels-no-units.tsv": "name\ttype\nFz\tEEG\n",
    "invalid-channels-status.tsv": "name\ttype\tunits\tstatus\nFz\tEEG\tuV\tok\n",
    "invalid-channels-dup.tsv": "name\ttype\tunits\nFz\tEEG\tuV\nCz\tEEG\tuV\nFz\tEOG\tuV\n",
    "invalid-channels-ragged.tsv": "name\ttype\tunits\nFz\tEEG\tuV\textra\n",
    "invalid-channels-name.tsv": "name\ttype\tunits\nn/a\tEEG\tuV\n",
    "invalid-participants-first.tsv": "age\tparticipant_id\n30\tsub-01\n",
    "invalid-participants-dup.tsv": "participant_id\tgroup\nsub-01\tA\nsub-01\tB\n",
    "invalid-participants-id.tsv": "participant_id\tgroup\n01\tA\n",
    "invalid-participants-label.tsv": "participant_id\tgroup\nsub-01_a\tA\n",
    "invalid-participants-ragged.tsv": "participant_id\tgroup\nsub-01\tA\textra\n",
}


def read_table(text):
    text = text.lstrip("\ufeff")
    rows = [r for r in csv.reader(io.StringIO(text, newline=""), delimiter="\t") if r]
    return rows[0], rows[1:]


def events(text):
    hdr, rows = read_table(text)
    low = [h.lower() for h in hdr]
    out = []
    for r in rows:
        ev = {"onset": float(r[low.index("onset")]), "duration": 0.0, "type": "", "extra": {}}
        if "duration" in low and r[low.index("duration")] not in ("n/a", ""):
            ev["duration"] = float(r[low.index("duration")])
        if "trial_type" in low:
            ev["type"] = r[low.index("trial_type")]
        for h, v in zip(hdr, r):
            if h.lower() not in ("onset", "duration", "trial_type"):
                ev["extra"][h] = v
        out.append(ev)
    return out


def channels(text):
    hdr, rows = read_table(text)
    out = []
    for r in rows:
        d = dict(zip(hdr, r))
        st = d.get("status", "n/a").lower()
        out.append({"name": d["name"], "type": d["type"], "units": d["units"],
                    "status": "" if st == "n/a" else st,
                    "status_description": "" if d.get("status_description", "n/a") == "n/a" else d["status_description"],
                    "extra": {h: v for h, v in d.items()
                              if h not in ("name", "type", "units", "status", "status_description")}})
    return out


def participants(text):
    """participant_id first; labels without "sub-"; n/a and empty cells left out."""
    hdr, rows = read_table(text)
    out = {"columns": hdr[1:], "labels": [], "values": {}}
    for r in rows:
        label = r[0][len("sub-"):]
        out["labels"].append(label)
        out["values"][label] = {h: v for h, v in zip(hdr[1:], r[1:]) if v not in ("n/a", "")}
    return out


def main():
    ref = {"generator": "testdata/bids/make_ref.py", "python": sys.version.split()[0],
           "events": {}, "channels": {}, "participants": {}}
    for name, text in {**FILES, **INVALID}.items():
        with open(os.path.join(HERE, name), "wb") as f:
            f.write(text.encode("utf-8"))
    for name, text in FILES.items():
        if name.startswith("events"):
            ref["events"][name] = events(text)
        elif name.startswith("participants"):
            ref["participants"][name] = participants(text)
        else:
            ref["channels"][name] = channels(text)
    with open(os.path.join(HERE, "ref.json"), "w") as f:
        json.dump(ref, f, indent=1, sort_keys=True, ensure_ascii=False)
        f.write("\n")


main()
