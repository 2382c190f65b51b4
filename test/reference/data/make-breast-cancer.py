#!/usr/bin/env python3
"""Writes breast-cancer.csv from scikit-learn's bundled copy of the Wisconsin Diagnostic
Breast Cancer data (Street, Wolberg & Mangasarian 1993; UCI), as shipped by Debian's
python3-sklearn. Run with Debian's interpreter: /usr/bin/python3 make-breast-cancer.py"""
import os
from sklearn.datasets import load_breast_cancer

d = load_breast_cancer()
here = os.path.dirname(os.path.abspath(__file__))
names = [n.replace(" ", "_") for n in d.feature_names]
with open(os.path.join(here, "breast-cancer.csv"), "w") as f:
    f.write(",".join(["id"] + names + ["diagnosis"]) + "\n")
    for i, (row, t) in enumerate(zip(d.data, d.target)):
        f.write(",".join([f"bc-{i + 1:04d}"] + [repr(float(v)) for v in row] + [d.target_names[t]]) + "\n")

# For the reconciliation check: the first 469 rows for cross-validation, and a new-rows table of
# the last 100 rows (never seen) plus 5 rows that were in the cross-validation, without the label.
with open(os.path.join(here, "breast-cancer.csv")) as f:
    lines = f.read().splitlines()
header, rows = lines[0], lines[1:]
with open(os.path.join(here, "breast-cancer-train.csv"), "w") as f:
    f.write("\n".join([header] + rows[:469]) + "\n")
unlabeled = lambda line: line.rsplit(",", 1)[0]
with open(os.path.join(here, "breast-cancer-new.csv"), "w") as f:
    f.write("\n".join([unlabeled(header)] + [unlabeled(r) for r in rows[469:] + rows[10:15]]) + "\n")

# For the wide logistic check (more features than training rows): the first 16 benign and the
# first 14 malignant rows, in file order.
benign = [r for r in rows if r.endswith(",benign")][:16]
malignant = [r for r in rows if r.endswith(",malignant")][:14]
wide = [r for r in rows if r in set(benign + malignant)]
with open(os.path.join(here, "breast-cancer-wide.csv"), "w") as f:
    f.write("\n".join([header] + wide) + "\n")
