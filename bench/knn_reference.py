#!/usr/bin/env python3
"""Reference for bench/knn.mjs: scikit-learn's KNeighborsClassifier (Debian's python3-sklearn;
brute force, Euclidean) on foldseal's exported folds. Timed as a whole process (reading the CSV
included), like foldseal. Prints the largest out-of-fold probability difference from foldseal's
predictions.csv (ties between equally distant neighbours may be broken differently)."""
import sys

import numpy as np
import pandas as pd
from sklearn.neighbors import KNeighborsClassifier

data, folds, predictions, k = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
df = pd.read_csv(data)
ids = df["id"].astype(str).to_numpy()
X = df.drop(columns=["id", "label"]).to_numpy(dtype=float)
y = df["label"].to_numpy()
fold_of = pd.read_csv(folds).query("repeat == 1").set_index("id")["fold"].reindex(ids).to_numpy()
p = np.empty(len(ids))
for f in sorted(set(fold_of)):
    test, train = fold_of == f, fold_of != f
    model = KNeighborsClassifier(n_neighbors=k, algorithm="brute").fit(X[train], y[train])
    p[test] = model.predict_proba(X[test])[:, list(model.classes_).index("b")]
ours = pd.read_csv(predictions).query("repeat == 1").set_index("id")["p_b"].reindex(ids).to_numpy()
print(f"{np.max(np.abs(ours - p)):.3e}")
