#!/usr/bin/env python3
"""Reference for bench/logistic.mjs: scikit-learn's L2 logistic regression (Debian's
python3-sklearn) on the folds foldseal exported, standardized inside each fold. Prints the
wall time of the fits and the largest difference of the out-of-fold probabilities from
foldseal's predictions.csv. Solver: lbfgs (the library's default), or the one named after the
tolerance (newton-cholesky converges to the floor). Objective: sum of log-losses + (l2/2)·||w||², i.e. C = 1/l2."""
import sys
import time

import numpy as np
import pandas as pd
from sklearn.linear_model import LogisticRegression
from sklearn.preprocessing import StandardScaler

data, folds, predictions, tol = sys.argv[1], sys.argv[2], sys.argv[3], float(sys.argv[4])
solver = sys.argv[5] if len(sys.argv) > 5 else "lbfgs"
df = pd.read_csv(data)
ids = df["id"].astype(str).to_numpy()
X = df.drop(columns=["id", "label"]).to_numpy(dtype=float)
y = (df["label"] == "b").to_numpy().astype(int)
fold_of = pd.read_csv(folds).query("repeat == 1").set_index("id")["fold"].reindex(ids).to_numpy()
start = time.perf_counter()
p1 = np.empty(len(ids))
for f in sorted(set(fold_of)):
    test, train = fold_of == f, fold_of != f
    scaler = StandardScaler().fit(X[train])
    model = LogisticRegression(C=1.0, tol=tol, max_iter=100000, solver=solver).fit(scaler.transform(X[train]), y[train])
    p1[test] = model.predict_proba(scaler.transform(X[test]))[:, 1]
elapsed = time.perf_counter() - start
ours = pd.read_csv(predictions).query("repeat == 1").set_index("id")["p_b"].reindex(ids).to_numpy()
print(f"{elapsed:.2f} {np.max(np.abs(ours - p1)):.3e}")
