#!/usr/bin/env python3
"""The by-hand run of a command model (docs/command-models.md), written from the document:
for every fold of `foldseal folds`, the training table, the request and the rows are made here
(the Python standard library only: csv, json, hashlib), the example program is called exactly as
the contract says, and the out-of-fold probabilities are printed as JSON {id: [p...]}. The
per-fold seed is computed here from its definition, independently of foldseal.

Usage: python3 command_by_hand.py DATA.csv FOLDS.csv LABEL SPLIT_SEED OPTIONS_JSON TESTED PROGRAM...
TESTED: `all` (every fold is a test part) or `1` (holdout: fold 1 is tested, fold 2 trains)
(no preprocessing: the protocol this checks has none, so the tables hold the data's own values)
"""
import csv
import hashlib
import json
import os
import subprocess
import sys
import tempfile


def fold_seed(split_seed, repeat, fold):
    digest = hashlib.sha256(f"foldseal/model-seed-v1\0{split_seed}\0{repeat}\0{fold}".encode()).digest()
    return int.from_bytes(digest[:4], "big") >> 1


def main(data, folds_path, label, split_seed, options, tested, program):
    with open(data, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    header, body = rows[0], rows[1:]
    li = header.index(label)
    features = [i for i in range(1, len(header)) if i != li]
    classes = sorted({r[li] for r in body}, key=lambda s: s.encode("utf-8"))
    with open(folds_path, newline="", encoding="utf-8") as f:
        folds = list(csv.DictReader(f))
    out = {}
    for repeat in sorted({int(r["repeat"]) for r in folds}):
        fold_of = {r["id"]: int(r["fold"]) for r in folds if int(r["repeat"]) == repeat}
        for k in sorted(set(fold_of.values())) if tested == "all" else [int(tested)]:
            # Rows in id byte order, as foldseal's spec visits them.
            train = sorted((r for r in body if fold_of[r[0]] != k), key=lambda r: r[0].encode("utf-8"))
            test = sorted((r for r in body if fold_of[r[0]] == k), key=lambda r: r[0].encode("utf-8"))
            with tempfile.TemporaryDirectory() as d:
                os.mkdir(os.path.join(d, "model"))
                names = [header[i] for i in features]
                with open(os.path.join(d, "train.csv"), "w", newline="", encoding="utf-8") as f:
                    w = csv.writer(f, lineterminator="\n")
                    w.writerow(["id", "label"] + names)
                    for r in train:
                        w.writerow([r[0], r[li]] + [repr(float(r[i])) for i in features])
                request = {"contract": "foldseal-command-v1", "mode": "fit", "classes": classes, "options": options,
                           "repeat": repeat, "fold": k, "seed": fold_seed(split_seed, repeat, k), "rows": len(train), "features": len(names)}
                with open(os.path.join(d, "request.json"), "w", encoding="utf-8") as f:
                    json.dump(request, f)
                subprocess.run(program + ["fit", d], check=True)
                with open(os.path.join(d, "rows.csv"), "w", newline="", encoding="utf-8") as f:
                    w = csv.writer(f, lineterminator="\n")
                    w.writerow(["id"] + names)
                    for r in test:
                        w.writerow([r[0]] + [repr(float(r[i])) for i in features])
                request.update(mode="predict", rows=len(test))
                with open(os.path.join(d, "request.json"), "w", encoding="utf-8") as f:
                    json.dump(request, f)
                subprocess.run(program + ["predict", d], check=True)
                with open(os.path.join(d, "proba.csv"), newline="", encoding="utf-8") as f:
                    got = list(csv.reader(f))
                assert got[0] == ["id"] + ["p_" + c for c in classes], got[0]
                for r in got[1:]:
                    out[f"{repeat}/{r[0]}"] = [float(v) for v in r[1:]]
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1], sys.argv[2], sys.argv[3], sys.argv[4], json.loads(sys.argv[5]), sys.argv[6], sys.argv[7:])
