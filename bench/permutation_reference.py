#!/usr/bin/env python3
"""The reference side of the permutation benchmark: scikit-learn's permutation_test_score
(Debian's python3-sklearn) with GaussianNB on the same table and on exactly foldseal's folds
(read from `foldseal folds`), so both sides score the same observed cross-validation.
Timed as a whole process, like foldseal. Prints the observed accuracy and the p-value."""
import sys

import numpy as np
import pandas as pd
from sklearn.model_selection import permutation_test_score
from sklearn.naive_bayes import GaussianNB

data, folds, permutations, jobs = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
df = pd.read_csv(data)
y = df["class"].to_numpy()
X = df.drop(columns=["id", "class"]).to_numpy(dtype=float)
f = pd.read_csv(folds, dtype={"id": str}).set_index("id").loc[df["id"].astype(str), "fold"].to_numpy()
cv = [(np.flatnonzero(f != k), np.flatnonzero(f == k)) for k in sorted(set(f))]
score, _, p = permutation_test_score(
    GaussianNB(), X, y, cv=cv, n_permutations=permutations, n_jobs=jobs, random_state=0, scoring="accuracy"
)
print(f"{score:.6f} {p:.6f}")
