#!/usr/bin/env python3
"""The reference side of the benchmark: scikit-learn (Debian's python3-sklearn) doing the same
job as `foldseal run` — read the CSV, cross-validate with the pipeline fitted inside the folds,
score, and write the out-of-fold predictions. Timed as a whole process, like foldseal."""
import sys

import numpy as np
import pandas as pd
from sklearn.feature_selection import SelectKBest, f_classif
from sklearn.metrics import accuracy_score, log_loss, roc_auc_score
from sklearn.model_selection import RepeatedStratifiedKFold, StratifiedKFold
from sklearn.naive_bayes import GaussianNB
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import StandardScaler

case, data, out = sys.argv[1:4]
df = pd.read_csv(data)
y = df["class"].to_numpy()
X = df.drop(columns=["id", "class"]).to_numpy(dtype=float)
if case == "a":
    splitter, make = StratifiedKFold(n_splits=10, shuffle=True, random_state=1), lambda: GaussianNB()
elif case in ("c", "d"):
    splitter, make = StratifiedKFold(n_splits=5, shuffle=True, random_state=3), lambda: GaussianNB()
else:
    splitter = RepeatedStratifiedKFold(n_splits=5, n_repeats=10, random_state=2)
    make = lambda: make_pipeline(StandardScaler(), SelectKBest(f_classif, k=100), GaussianNB())
rows = []
for k, (train, test) in enumerate(splitter.split(X, y)):
    model = make().fit(X[train], y[train])
    p = model.predict_proba(X[test])
    accuracy_score(y[test], model.classes_[p.argmax(axis=1)])
    roc_auc_score(y[test] == model.classes_[1], p[:, 1])
    log_loss(y[test], p, labels=model.classes_)
    rows.append(pd.DataFrame({"id": df["id"].to_numpy()[test], "fold": k, "p0": p[:, 0], "p1": p[:, 1]}))
pd.concat(rows).to_csv(out, index=False)
