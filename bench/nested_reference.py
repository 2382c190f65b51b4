#!/usr/bin/env python3
"""The reference side of the nested-tuning benchmark: scikit-learn's GridSearchCV (Debian's
python3-sklearn) inside each outer fold, on exactly foldseal's outer and inner folds (read from
`foldseal folds` and `foldseal folds --inner`): StandardScaler → SelectKBest(f_classif) →
GaussianNB, the grid of `top` × `var_smoothing` given on the command line, scored by ROC AUC.
The grid is listed in foldseal's tie order (fewest features, then the largest smoothing), so
GridSearchCV's first-best is the candidate foldseal's `prefer` picks. Timed as a whole process,
like foldseal. Prints one line per outer fold: fold, chosen top, chosen smoothing."""
import sys

import numpy as np
import pandas as pd
from sklearn.feature_selection import SelectKBest, f_classif
from sklearn.model_selection import GridSearchCV
from sklearn.naive_bayes import GaussianNB
from sklearn.pipeline import Pipeline
from sklearn.preprocessing import StandardScaler

data, outer_path, inner_path, tops, floors, jobs = sys.argv[1:7]
tops = [int(v) for v in tops.split(",")]
floors = [float(v) for v in floors.split(",")]
df = pd.read_csv(data)
ids = df["id"].astype(str).to_numpy()
y = df["class"].to_numpy()
X = df.drop(columns=["id", "class"]).to_numpy(dtype=float)
row = {i: r for r, i in enumerate(ids)}
outer = pd.read_csv(outer_path, dtype={"id": str})
inner = pd.read_csv(inner_path, dtype={"id": str})
grid = [{"select__k": [t], "model__var_smoothing": [v]} for t in sorted(tops) for v in sorted(floors, reverse=True)]
pipe = Pipeline([("scale", StandardScaler()), ("select", SelectKBest(f_classif)), ("model", GaussianNB())])
fold_of = dict(zip(outer["id"], outer["fold"]))
oof = np.zeros((len(ids), 2))
for f in sorted(set(fold_of.values())):
    part = inner[inner["outer-fold"] == f]
    train = list(part[part["repeat"] == 1]["id"])
    pos = {i: n for n, i in enumerate(train)}
    of = dict(zip(part["id"], part["fold"]))
    splits = [(np.array([pos[i] for i in train if of[i] != g]), np.array([pos[i] for i in train if of[i] == g])) for g in sorted(set(of.values()))]
    search = GridSearchCV(pipe, grid, scoring="roc_auc", cv=splits, n_jobs=int(jobs), refit=True)
    search.fit(X[[row[i] for i in train]], y[[row[i] for i in train]])
    test = [i for i in ids if fold_of[i] == f]
    oof[[row[i] for i in test]] = search.best_estimator_.predict_proba(X[[row[i] for i in test]])
    best = search.best_params_
    print(f, best["select__k"], best["model__var_smoothing"])
pd.DataFrame({"id": ids, "p0": oof[:, 0], "p1": oof[:, 1]}).to_csv(sys.argv[7] if len(sys.argv) > 7 else "/dev/null", index=False)
