#!/usr/bin/env python3
"""Outside reference for reading data as people hold it: pandas (Debian's python3-pandas) reads a
gzip-compressed features-in-rows matrix and a sample sheet, joins them by id, keeps the rows a
filter names, maps label values to classes; scikit-learn (Debian's python3-sklearn) then fits
StandardScaler + SelectKBest(f_classif, k) (none when k = 0) + GaussianNB on foldseal's folds (`foldseal folds`)
and prints the out-of-fold probabilities by id as JSON.

Usage: layout_reference.py MATRIX SHEET FOLDS ID_COLUMN LABEL_COLUMN FILTER_JSON CLASSES_JSON K"""
import json
import sys

import numpy as np
import pandas as pd
from sklearn.feature_selection import SelectKBest, f_classif
from sklearn.naive_bayes import GaussianNB
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import StandardScaler

matrix, sheet, folds, id_col, label_col, where, classes, k = sys.argv[1:9]
m = pd.read_csv(matrix, sep="\t", index_col=0, dtype={0: str}).T  # compression inferred from the .gz name
m.index = m.index.astype(str)
s = pd.read_csv(sheet, dtype=str).set_index(id_col)
d = m.join(s, how="inner")
for column, values in json.loads(where).items():
    d = d[d[column].isin(values)]
class_of = {v: name for name, values in json.loads(classes).items() for v in values}
y = d[label_col].map(class_of).to_numpy()
X = d[m.columns].to_numpy(dtype=float)
f = pd.read_csv(folds, dtype={"id": str}).set_index("id").loc[d.index, "fold"].to_numpy()
out = {}
for fold in sorted(set(f)):
    train, test = f != fold, f == fold
    steps = [StandardScaler()] + ([SelectKBest(f_classif, k=int(k))] if int(k) > 0 else []) + [GaussianNB()]
    model = make_pipeline(*steps).fit(X[train], y[train])
    for i, p in zip(d.index[test], model.predict_proba(X[test])):
        out[i] = dict(zip(model.classes_, p.tolist()))
print(json.dumps(out))
