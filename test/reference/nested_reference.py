#!/usr/bin/env python3
"""Outside reference for foldseal's nested tuning: scikit-learn's grid search (Debian's
python3-sklearn 1.2.1) inside each outer fold, on the outer and inner folds foldseal exports
(`foldseal folds`, `foldseal folds --inner`). It writes, per outer fold, the mean inner score
of every candidate, the chosen candidate and the outer test probabilities.

Usage: /usr/bin/python3 nested_reference.py CASE.json OUTER.csv INNER.csv > result.json

CASE.json: {"data", "label", "positive", "top": [...], "by": "f-test", "k": [...],
            "metric": "accuracy" | "roc-auc", "prefer": [["select.top", "smallest"], ...]}
Pipeline: StandardScaler → SelectKBest(f_classif, k=top) → KNeighborsClassifier(n_neighbors=k,
algorithm="brute"), the mapping sklearn_reference.py documents for standardize, select f-test
and knn.

The tie rule: GridSearchCV ranks equal mean scores equally and takes the first candidate of
its grid among the best; the grid is given as single-point candidates sorted by the protocol's
prefer order (computed here from the values, independently of foldseal), so its first best is
the preferred one.
"""
import json
import sys

import numpy as np
import pandas as pd
from sklearn.feature_selection import SelectKBest, f_classif
from sklearn.model_selection import GridSearchCV
from sklearn.neighbors import KNeighborsClassifier
from sklearn.pipeline import Pipeline
from sklearn.preprocessing import StandardScaler


def utf8(s):
    return s.encode("utf-8")


def main(case_path, outer_path, inner_path):
    case = json.load(open(case_path))
    df = pd.read_csv(case["data"], dtype={"id": str}, float_precision="round_trip")
    ids = df["id"].to_numpy()
    y = df[case["label"]].to_numpy().astype(str)
    X = df[[c for c in df.columns if c not in ("id", case["label"])]].to_numpy(dtype=float)
    row = {i: r for r, i in enumerate(ids)}
    outer = pd.read_csv(outer_path, dtype={"id": str})
    inner = pd.read_csv(inner_path, dtype={"id": str})

    # foldseal's candidate order: the first tuned setting varies slowest.
    grid = [{"select.top": t, "model.k": k} for t in case["top"] for k in case["k"]]
    listed = {"select.top": case["top"], "model.k": case["k"]}

    def preference(c):
        key = []
        for name, order in case["prefer"]:
            v = c[name]
            key.append(v if order == "smallest" else -v if order == "largest" else listed[name].index(v))
        return tuple(key)

    by_preference = sorted(range(len(grid)), key=lambda i: preference(grid[i]))
    param_grid = [{"select__k": [grid[i]["select.top"]], "model__n_neighbors": [grid[i]["model.k"]]} for i in by_preference]
    scoring = {"accuracy": "accuracy", "roc-auc": "roc_auc"}[case["metric"]]
    pipe = Pipeline([("scale", StandardScaler()), ("select", SelectKBest(f_classif)), ("model", KNeighborsClassifier(algorithm="brute"))])

    out = {"reference": "scikit-learn " + __import__("sklearn").__version__, "folds": []}
    for rep in sorted(outer["repeat"].unique()):
        fold_of = dict(zip(outer[outer["repeat"] == rep]["id"], outer[outer["repeat"] == rep]["fold"]))
        for f in sorted(set(fold_of.values())):
            # Rows in id byte order, as the spec orders them (the order changes no result here).
            train = sorted((i for i in ids if fold_of[i] != f), key=utf8)
            test = sorted((i for i in ids if fold_of[i] == f), key=utf8)
            part = inner[(inner["outer-repeat"] == rep) & (inner["outer-fold"] == f)]
            assert sorted(part["id"], key=utf8) == sorted(set(part["id"]), key=utf8) == train
            pos = {i: n for n, i in enumerate(train)}
            splits = []
            for r in sorted(part["repeat"].unique()):
                of = dict(zip(part[part["repeat"] == r]["id"], part[part["repeat"] == r]["fold"]))
                for g in sorted(set(of.values())):
                    te = np.array([pos[i] for i in train if of[i] == g])
                    tr = np.array([pos[i] for i in train if of[i] != g])
                    splits.append((tr, te))
            Xtr = X[[row[i] for i in train]]
            ytr = y[[row[i] for i in train]]
            search = GridSearchCV(pipe, param_grid, scoring=scoring, cv=splits, refit=True).fit(Xtr, ytr)
            means = search.cv_results_["mean_test_score"]
            scores = [None] * len(grid)
            for j, i in enumerate(by_preference):
                scores[i] = float(means[j])
            best = by_preference[search.best_index_]
            proba = search.best_estimator_.predict_proba(X[[row[i] for i in test]])
            out["folds"].append({
                "repeat": int(rep),
                "fold": int(f),
                "scores": scores,
                "chosen": grid[best],
                "ids": test,
                "classes": [str(c) for c in search.best_estimator_.classes_],
                "proba": proba.tolist(),
            })
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main(*sys.argv[1:4])
