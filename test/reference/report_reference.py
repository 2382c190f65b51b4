"""scikit-learn's curves of an out-of-fold predictions.csv (repeat 1): roc_curve (all thresholds kept),
precision_recall_curve and calibration_curve (10 uniform bins). Usage: report_reference.py PREDICTIONS POSITIVE"""
import json
import sys

import pandas as pd
from sklearn.calibration import calibration_curve
from sklearn.metrics import precision_recall_curve, roc_curve

p = pd.read_csv(sys.argv[1], dtype={"id": str})
positive = sys.argv[2]
p = p[p["repeat"] == 1]
y = (p["truth"] == positive).astype(int)
s = p["p_" + positive]
fpr, tpr, _ = roc_curve(y, s, drop_intermediate=False)
precision, recall, _ = precision_recall_curve(y, s)
true, pred = calibration_curve(y, s, n_bins=10, strategy="uniform")
json.dump({"fpr": fpr.tolist(), "tpr": tpr.tolist(), "precision": precision.tolist(), "recall": recall.tolist(),
           "cal-true": true.tolist(), "cal-pred": pred.tolist()}, sys.stdout)
