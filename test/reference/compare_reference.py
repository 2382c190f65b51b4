#!/usr/bin/env python3
"""Reference for `foldseal compare`: reads two results folders and computes, with scipy.stats and
statsmodels (Debian's python3-scipy, python3-statsmodels),
- per metric, the corrected resampled t-test of the per-fold differences B - A (Nadeau & Bengio
  2003; Bouckaert & Frank 2004: variance (1/J + n_test/n_train) s^2, df J - 1), with the t
  distribution from scipy.stats.t;
- per repeat, McNemar's exact test of the predicted classes from
  statsmodels.stats.contingency_tables.mcnemar(exact=True).
Usage: compare_reference.py A_DIR B_DIR LEVEL   (prints JSON)"""
import json
import sys

import numpy as np
import pandas as pd
from scipy import stats
from statsmodels.stats.contingency_tables import mcnemar

a_dir, b_dir, level = sys.argv[1], sys.argv[2], float(sys.argv[3])
ra = json.load(open(f"{a_dir}/results.json"))
rb = json.load(open(f"{b_dir}/results.json"))
test_rows = np.mean([f["test-rows"] for f in ra["folds"]])
train_rows = np.mean([f["train-rows"] for f in ra["folds"]])
fb = {(f["repeat"], f["fold"]): f for f in rb["folds"]}
metrics = {}
for m in [m for m in ra["metrics"] if m in rb["metrics"]]:
    d = []
    for f in ra["folds"]:
        va, vb = f["metrics"][m], fb[(f["repeat"], f["fold"])]["metrics"][m]
        if va is not None and vb is not None:
            d.append(vb - va)
    d = np.array(d)
    j = len(d)
    se = np.sqrt((1 / j + test_rows / train_rows) * np.var(d, ddof=1))
    t = d.mean() / se
    half = stats.t.ppf(1 - (1 - level) / 2, j - 1) * se
    metrics[m] = {"mean": d.mean(), "t": t, "p": 2 * stats.t.sf(abs(t), j - 1), "lower": d.mean() - half, "upper": d.mean() + half}

pa = pd.read_csv(f"{a_dir}/predictions.csv", dtype={"id": str})
pb = pd.read_csv(f"{b_dir}/predictions.csv", dtype={"id": str})
both = pa.merge(pb, on=["id", "repeat"], suffixes=("_a", "_b"))
repeats = []
for r, g in both.groupby("repeat"):
    right_a = g["predicted_a"] == g["truth_a"]
    right_b = g["predicted_b"] == g["truth_a"]
    table = [[int((right_a & right_b).sum()), int((right_a & ~right_b).sum())], [int((~right_a & right_b).sum()), int((~right_a & ~right_b).sum())]]
    repeats.append({"repeat": int(r), "table": table, "p": mcnemar(table, exact=True).pvalue})
print(json.dumps({"metrics": metrics, "mcnemar": repeats}))
