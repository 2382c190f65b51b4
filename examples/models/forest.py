#!/usr/bin/env python3
"""A command model for foldseal (docs/command-models.md): scikit-learn's random forest.

    python3 forest.py fit FOLDER       reads FOLDER/request.json and FOLDER/train.csv,
                                       writes the fitted forest into FOLDER/model/
    python3 forest.py predict FOLDER   reads FOLDER/model/, FOLDER/request.json and FOLDER/rows.csv,
                                       writes FOLDER/proba.csv (id,p_<class>... in request order)

Options (protocol model.options): trees (default 200), min-leaf (default 1). The seed comes
from the request, one per fold. Only the standard library, NumPy and scikit-learn are used.
"""
import csv
import json
import os
import pickle
import platform
import sys

import numpy as np
import sklearn
from sklearn.ensemble import RandomForestClassifier


def read_table(path, labelled):
    with open(path, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    skip = 2 if labelled else 1
    ids = [r[0] for r in rows[1:]]
    labels = [r[1] for r in rows[1:]] if labelled else None
    X = np.array([[float(v) for v in r[skip:]] for r in rows[1:]], dtype=float).reshape(len(ids), len(rows[0]) - skip)
    return ids, labels, X


def main(mode, folder):
    with open(os.path.join(folder, "request.json"), encoding="utf-8") as f:
        request = json.load(f)
    options = request["options"]
    model_dir = os.path.join(folder, "model")
    if mode == "fit":
        _, labels, X = read_table(os.path.join(folder, "train.csv"), True)
        forest = RandomForestClassifier(
            n_estimators=int(options.get("trees", 200)),
            min_samples_leaf=int(options.get("min-leaf", 1)),
            random_state=request["seed"],
            n_jobs=1,
        ).fit(X, np.array(labels))
        with open(os.path.join(model_dir, "forest.pkl"), "wb") as f:
            pickle.dump(forest, f)
        with open(os.path.join(model_dir, "versions.json"), "w", encoding="utf-8") as f:
            json.dump({"python": platform.python_version(), "scikit-learn": sklearn.__version__, "numpy": np.__version__}, f)
    elif mode == "predict":
        with open(os.path.join(model_dir, "forest.pkl"), "rb") as f:
            forest = pickle.load(f)
        ids, _, X = read_table(os.path.join(folder, "rows.csv"), False)
        P = forest.predict_proba(X)
        # The columns in the request's class order; a class the training part lacked gets 0.
        known = list(forest.classes_)
        out = np.zeros((len(ids), len(request["classes"])))
        for j, c in enumerate(request["classes"]):
            if c in known:
                out[:, j] = P[:, known.index(c)]
        with open(os.path.join(folder, "proba.csv"), "w", newline="", encoding="utf-8") as f:
            w = csv.writer(f, lineterminator="\n")
            w.writerow(["id"] + ["p_" + c for c in request["classes"]])
            for i, row in zip(ids, out):
                w.writerow([i] + [repr(float(v)) for v in row])
    else:
        sys.exit(f"unknown mode {mode!r}: expected fit or predict")


if __name__ == "__main__":
    main(sys.argv[1], sys.argv[2])
