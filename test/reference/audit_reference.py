"""Outside references for the leakage audit (Debian's python3-pandas, -sklearn, -scipy, numpy).

Prints JSON: duplicated rows of iris (pandas), per-feature ROC AUC of breast-cancer (scikit-learn),
pairs of breast-cancer rows whose standardized profiles correlate >= 0.95 (numpy), and the
chi-square test and Cramer's V of iris species against binned sepal length (scipy).
Run: /usr/bin/python3 test/reference/audit_reference.py > test/reference/fixtures/audit.json
"""
import json
import os
import sys

import numpy as np
import pandas as pd
from scipy.stats import chi2_contingency
from scipy.stats.contingency import association
from sklearn.metrics import roc_auc_score

here = os.path.join(os.path.dirname(os.path.abspath(__file__)), "data")
iris = pd.read_csv(os.path.join(here, "iris.csv"))
features = ["sepal_length", "sepal_width", "petal_length", "petal_width"]
dup = iris[iris[features].duplicated(keep=False)]["id"].tolist()

bc = pd.read_csv(os.path.join(here, "breast-cancer.csv"))
cols = [c for c in bc.columns if c not in ("id", "diagnosis")]
classes = sorted(bc["diagnosis"].unique())
# foldseal's pairwise separation: max(AUC, 1 - AUC) with the first class (UTF-8 order) as positive.
auc = {c: max(roc_auc_score(bc["diagnosis"] == classes[0], bc[c]), 1 - roc_auc_score(bc["diagnosis"] == classes[0], bc[c])) for c in cols}

X = bc[cols].to_numpy()
Z = (X - X.mean(0)) / X.std(0, ddof=1)
C = np.corrcoef(Z)
iu = np.triu_indices(len(C), 1)
sel = C[iu] >= 0.95
pairs = sorted([[int(i), int(j), float(r)] for i, j, r in zip(iu[0][sel], iu[1][sel], C[iu][sel])])

bins = np.digitize(iris["sepal_length"], [5.0, 5.8, 6.5])
table = pd.crosstab(bins, iris["species"]).to_numpy()
chi2, p, df, _ = chi2_contingency(table, correction=False)
v = association(table, method="cramer")

json.dump(
    {
        "source": "pandas " + pd.__version__ + ", scikit-learn, scipy, numpy " + np.__version__,
        "iris-duplicates": dup,
        "breast-cancer-auc": auc,
        "breast-cancer-near-pairs-0.95": pairs,
        "iris-sepal-bins-chi2": {"chi2": chi2, "p": p, "df": int(df), "cramer-v": v, "bins": [5.0, 5.8, 6.5]},
    },
    sys.stdout,
    indent=1,
)
