#!/usr/bin/env python3
"""Outside reference for foldseal's runner: the same folds (exported by `foldseal folds`),
the same data, fitted and scored with scikit-learn (Debian's python3-sklearn 1.2.1), SciPy
and NumPy. Writes one JSON fixture per case of cases.json.

Usage: /usr/bin/python3 sklearn_reference.py CASES.json FOLDS_DIR OUT_DIR

Mapping of foldseal's steps to the reference (scikit-learn's own names stay in this file):
  standardize           StandardScaler()
  log2p                 FunctionTransformer(lambda x: np.log2(x + 1))
  impute {by}           SimpleImputer(strategy=by)
  select f-test         SelectKBest(f_classif, k=top)
  select t-test         SelectKBest(|scipy.stats.ttest_ind(equal_var=False)|, k=top)
  select variance       SelectKBest(column variance, k=top)
  gaussian-nb           GaussianNB(var_smoothing=1e-9)
  multinomial-nb        MultinomialNB(alpha=smoothing)
  bernoulli-nb          BernoulliNB(alpha=smoothing, binarize=threshold)
  logistic              LogisticRegression(C=1/l2, tol=1e-10, max_iter=10000; solver newton-cholesky
                        for two classes, lbfgs (multinomial) for more; then 3 exact Newton steps)
  knn                   KNeighborsClassifier(n_neighbors=k, algorithm="brute")
  shrunken-centroid     NumPy transcription of Tibshirani et al. (2002), PNAS 99:6567, eqs. 1-6
"""
import json
import os
import sys

import numpy as np
import pandas as pd
from scipy import stats
from sklearn.feature_selection import SelectKBest, f_classif
from sklearn.impute import SimpleImputer
from sklearn.linear_model import LogisticRegression
from sklearn.svm import LinearSVC
from sklearn.metrics import (accuracy_score, average_precision_score, balanced_accuracy_score, brier_score_loss,
                             cohen_kappa_score, f1_score, log_loss, matthews_corrcoef, precision_score, recall_score,
                             roc_auc_score)
from sklearn.naive_bayes import BernoulliNB, GaussianNB, MultinomialNB
from sklearn.neighbors import KNeighborsClassifier
from sklearn.preprocessing import FunctionTransformer, StandardScaler

HERE = os.path.dirname(os.path.abspath(__file__))


def welch_scores(X, y):
    a, b = np.unique(y)
    t, _ = stats.ttest_ind(X[y == a], X[y == b], equal_var=False)
    return np.abs(t)


def variance_scores(X, y):
    return X.var(axis=0)


class ShrunkenCentroids:
    """Tibshirani, Hastie, Narasimhan & Chu (2002): d_kj = (xbar_kj - xbar_j) / (m_k (s_j + s0)),
    soft-thresholded by delta; discriminant sum_j (x_j - xbar'_kj)^2/(s_j+s0)^2 - 2 log pi_k;
    probabilities proportional to exp(-discriminant/2)."""

    def __init__(self, shrink):
        self.shrink = shrink

    def fit(self, X, y):
        self.classes_ = np.unique(y)
        n, K = len(y), len(self.classes_)
        overall = X.mean(axis=0)
        means = np.array([X[y == c].mean(axis=0) for c in self.classes_])
        within = sum(((X[y == c] - means[i]) ** 2).sum(axis=0) for i, c in enumerate(self.classes_))
        s = np.sqrt(within / (n - K))
        scale = s + np.median(s)
        nk = np.array([(y == c).sum() for c in self.classes_])
        m = np.sqrt(1 / nk - 1 / n)
        d = (means - overall) / (m[:, None] * scale)
        d = np.sign(d) * np.maximum(np.abs(d) - self.shrink, 0)
        self.centroids = overall + m[:, None] * scale * d
        self.scale = scale
        self.log_prior = np.log(nk / n)
        return self

    def predict_proba(self, X):
        delta = np.array([(((X - c) / self.scale) ** 2).sum(axis=1) - 2 * lp for c, lp in zip(self.centroids, self.log_prior)]).T
        z = -delta / 2
        z -= z.max(axis=1, keepdims=True)
        e = np.exp(z)
        return e / e.sum(axis=1, keepdims=True)


class PolishedLogistic:
    """scikit-learn's LogisticRegression, then (two classes only) three exact Newton steps in
    NumPy on the same objective 0.5*||w||^2 + C * sum(log-loss): newton-cg stalls at a
    gradient near 1e-8, which moves probabilities by ~1e-8 and would hide real differences.
    Two classes start from the newton-cholesky solver (exact Newton, new in scikit-learn 1.2;
    10 x faster here than newton-cg, which spends seconds on failed line searches); more
    classes start from lbfgs (multinomial), then take three exact Newton steps of the
    multinomial objective in NumPy."""

    def __init__(self, C):
        self.C = C

    def fit(self, X, y):
        import warnings
        from sklearn.exceptions import ConvergenceWarning
        solver = "newton-cholesky" if len(np.unique(y)) == 2 else "lbfgs"
        self.inner = LogisticRegression(C=self.C, solver=solver, tol=1e-10, max_iter=10000)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ConvergenceWarning)  # polished below, then compared at 1e-9
            self.inner.fit(X, y)
        self.classes_ = self.inner.classes_
        if len(self.classes_) == 2:
            t = (y == self.classes_[1]).astype(float)
            Z = np.hstack([X, np.ones((len(X), 1))])
            theta = np.append(self.inner.coef_[0], self.inner.intercept_[0])
            ridge = np.append(np.ones(X.shape[1]), 0.0)
            for _ in range(3):
                p = 1 / (1 + np.exp(-Z @ theta))
                g = self.C * Z.T @ (p - t) + ridge * theta
                H = self.C * (Z * (p * (1 - p))[:, None]).T @ Z + np.diag(ridge)
                theta = theta - np.linalg.solve(H, g)
            self.theta = theta
        else:
            # Multinomial: exact Newton steps on C * sum(-log softmax) + 0.5 * ||W||^2 over the
            # weights of every class and all intercepts but the last (fixed at 0: shifting every
            # intercept by one constant changes no probability).
            K, p = len(self.classes_), X.shape[1]
            Y = (y[:, None] == self.classes_[None, :]).astype(float)
            Z = np.hstack([X, np.ones((len(X), 1))])
            B = np.hstack([self.inner.coef_, (self.inner.intercept_ - self.inner.intercept_[-1])[:, None]])
            keep = np.ones(K * (p + 1), dtype=bool)
            keep[-1] = False
            ridge = np.tile(np.append(np.ones(p), 0.0), K)[keep]
            for _ in range(3):
                S = Z @ B.T
                S -= S.max(axis=1, keepdims=True)
                P = np.exp(S)
                P /= P.sum(axis=1, keepdims=True)
                g = (self.C * (P - Y).T @ Z).ravel()[keep] + ridge * B.ravel()[keep]
                H = np.zeros((K * (p + 1), K * (p + 1)))
                for a in range(K):
                    for b in range(K):
                        w = P[:, a] * ((a == b) - P[:, b])
                        H[a * (p + 1):(a + 1) * (p + 1), b * (p + 1):(b + 1) * (p + 1)] = self.C * (Z * w[:, None]).T @ Z
                H = H[np.ix_(keep, keep)] + np.diag(ridge)
                step = np.zeros(K * (p + 1))
                step[keep] = np.linalg.solve(H, g)
                B = B - step.reshape(K, p + 1)
            self.B = B
        return self

    def predict_proba(self, X):
        if len(self.classes_) != 2:
            S = np.hstack([X, np.ones((len(X), 1))]) @ self.B.T
            S -= S.max(axis=1, keepdims=True)
            P = np.exp(S)
            return P / P.sum(axis=1, keepdims=True)
        p = 1 / (1 + np.exp(-(X @ self.theta[:-1] + self.theta[-1])))
        return np.column_stack([1 - p, p])


class PlattLinearSVC:
    """scikit-learn's LinearSVC (liblinear's primal trust-region Newton solver, squared hinge,
    intercept as a penalized constant feature: intercept_scaling=1; the dual solver stops short), one machine per class against the rest, each followed by
    Platt's sigmoid (Platt 1999; smoothed targets, fitted here by Newton's method in NumPy on
    the training decisions, as Lin, Lin & Weng 2007 describe). More than two classes: the
    per-class probabilities normalized to sum 1."""

    def __init__(self, C):
        self.C = C

    def fit(self, X, y):
        self.classes_ = np.unique(y)
        targets = [self.classes_[1]] if len(self.classes_) == 2 else list(self.classes_)
        self.machines = []
        for c in targets:
            t = np.where(y == c, 1, -1)
            svm = LinearSVC(C=self.C, loss="squared_hinge", dual=False, tol=1e-12, max_iter=10**7, intercept_scaling=1.0)
            svm.fit(X, t)
            # liblinear stops near 1e-8 in the weights; three exact (generalized) Newton steps
            # in NumPy on the same objective land on the optimum, as for the logistic reference.
            Z = np.hstack([X, np.ones((len(X), 1))])
            w = np.append(svm.coef_[0], svm.intercept_[0])
            for _ in range(3):
                m = 1 - t * (Z @ w)
                a = m > 0
                g = w - 2 * self.C * (Z[a].T @ (m[a] * t[a]))
                H = np.eye(len(w)) + 2 * self.C * Z[a].T @ Z[a]
                w = w - np.linalg.solve(H, g)
            svm.coef_, svm.intercept_ = w[:-1][None, :], np.array([w[-1]])
            f = svm.decision_function(X)
            self.machines.append((svm, platt(f, t)))
        return self

    def predict_proba(self, X):
        p = np.column_stack([1 / (1 + np.exp(A * svm.decision_function(X) + B)) for svm, (A, B) in self.machines])
        if len(self.classes_) == 2:
            return np.column_stack([1 - p[:, 0], p[:, 0]])
        return p / p.sum(axis=1, keepdims=True)


def platt(f, t):
    pos, neg = np.sum(t > 0), np.sum(t <= 0)
    tau = np.where(t > 0, (pos + 1) / (pos + 2), 1 / (neg + 2))
    A, B = 0.0, np.log((neg + 1) / (pos + 1))
    for _ in range(100):
        p = 1 / (1 + np.exp(A * f + B))
        r, v = tau - p, p * (1 - p)
        g = np.array([np.sum(f * r), np.sum(r)])
        if np.max(np.abs(g)) < 1e-13:
            break
        H = np.array([[np.sum(f * f * v), np.sum(f * v)], [np.sum(f * v), np.sum(v)]])
        A, B = np.array([A, B]) - np.linalg.solve(H, g)
    return A, B


def make_step(step):
    if step == "standardize":
        return StandardScaler()
    if step == "log2p":
        return FunctionTransformer(lambda x: np.log2(x + 1))
    if "impute" in step:
        return SimpleImputer(strategy=step["impute"]["by"])
    sel = step["select"]
    score = {"f-test": f_classif, "t-test": welch_scores, "variance": variance_scores}[sel["by"]]
    return SelectKBest(score, k=sel["top"])


def make_model(model):
    kind, o = model["kind"], model.get("options", {})
    if kind == "gaussian-nb":
        return GaussianNB(var_smoothing=o.get("variance-floor", 1e-9))
    if kind == "multinomial-nb":
        return MultinomialNB(alpha=o.get("smoothing", 1.0))
    if kind == "bernoulli-nb":
        return BernoulliNB(alpha=o.get("smoothing", 1.0), binarize=o.get("threshold", 0.0))
    if kind == "logistic":
        return PolishedLogistic(C=1.0 / o.get("l2", 1.0))
    if kind == "knn":
        return KNeighborsClassifier(n_neighbors=o.get("k", 5), algorithm="brute")
    if kind == "shrunken-centroid":
        return ShrunkenCentroids(o.get("shrink", 0.0))
    if kind == "linear-svm":
        return PlattLinearSVC(C=1.0 / o.get("l2", 1.0))
    raise ValueError(kind)


def score(names, y, P, classes, positive):
    pred = classes[P.argmax(axis=1)]
    binary = len(classes) == 2
    pos_col = list(classes).index(positive)
    avg = dict(average="binary", pos_label=positive) if binary else dict(average="macro")
    onehot = (y[:, None] == classes[None, :]).astype(float)
    out = {}
    for m in names:
        if m == "accuracy":
            v = accuracy_score(y, pred)
        elif m == "balanced-accuracy":
            v = balanced_accuracy_score(y, pred)
        elif m == "precision":
            v = precision_score(y, pred, zero_division=0, **avg)
        elif m == "recall":
            v = recall_score(y, pred, zero_division=0, **avg)
        elif m == "f1":
            v = f1_score(y, pred, zero_division=0, **avg)
        elif m == "mcc":
            v = matthews_corrcoef(y, pred)
        elif m == "kappa":
            v = cohen_kappa_score(y, pred)
        elif m == "roc-auc":
            v = roc_auc_score(y == positive, P[:, pos_col]) if binary else roc_auc_score(y, P, multi_class="ovr", average="macro", labels=classes)
        elif m == "average-precision":
            v = average_precision_score(y == positive, P[:, pos_col]) if binary else np.mean([average_precision_score(onehot[:, c], P[:, c]) for c in range(len(classes))])
        elif m == "log-loss":
            v = log_loss(y, P, labels=classes)
        elif m == "brier":
            v = brier_score_loss(y == positive, P[:, pos_col]) if binary else np.mean(((P - onehot) ** 2).sum(axis=1))
        out[m] = float(v)
    return out


def run_case(case, folds_dir):
    df = pd.read_csv(os.path.join(HERE, case["data"]), dtype={"id": str}, keep_default_na=False, na_values=["", "NA", "NaN"], float_precision="round_trip")
    ids = df["id"].to_numpy()
    y = df[case["label"]].to_numpy().astype(str)
    feature_names = [c for c in df.columns if c not in ("id", case["label"])]
    X = df[feature_names].to_numpy(dtype=float)
    classes = np.unique(y)
    positive = case.get("positive", classes[-1])
    folds = pd.read_csv(os.path.join(folds_dir, case["name"] + ".folds.csv"), dtype={"id": str})
    fitted = []
    result = {"case": case["name"], "reference": "scikit-learn " + __import__("sklearn").__version__, "classes": list(classes), "folds": [], "pooled": []}
    for rep in sorted(folds["repeat"].unique()):
        f_of = dict(zip(folds[folds["repeat"] == rep]["id"], folds[folds["repeat"] == rep]["fold"]))
        fold = np.array([f_of[i] for i in ids])
        oof = np.full((len(ids), len(classes)), np.nan)
        for k in sorted(np.unique(fold)):
            test, train = fold == k, fold != k
            Xtr, Xte, names = X[train], X[test], np.array(feature_names)
            steps_fitted = []
            for step in case["preprocess"]:
                t = make_step(step)
                steps_fitted.append(t)
                Xtr = t.fit_transform(Xtr, y[train])
                Xte = t.transform(Xte)
                if isinstance(t, SelectKBest):
                    names = names[t.get_support()]
            model = make_model(case["model"]).fit(Xtr, y[train])
            fitted.append((steps_fitted, model))
            P = model.predict_proba(Xte)
            oof[test] = P
            order = np.argsort(ids[test], kind="stable")
            result["folds"].append({
                "repeat": int(rep), "fold": int(k),
                "ids": [str(i) for i in ids[test][order]],
                "proba": P[order].tolist(),
                "features": [str(n) for n in names],
                "metrics": score(case["metrics"], y[test], P, classes, positive),
            })
        result["pooled"].append(score(case["metrics"], y, oof, classes, positive))
    if "new-rows" in case:
        # Reconciliation reference: the mean of the fold models' probabilities and their votes.
        new = pd.read_csv(os.path.join(HERE, case["new-rows"]), dtype={"id": str}, float_precision="round_trip")
        unseen = ~new["id"].isin(ids)
        Xn = new.loc[unseen, feature_names].to_numpy(dtype=float)
        per_model = []
        for steps, model in fitted:
            Z = Xn
            for t in steps:
                Z = t.transform(Z)
            per_model.append(model.predict_proba(Z))
        votes = np.zeros((len(Xn), len(classes)), dtype=int)
        for P in per_model:
            votes[np.arange(len(Xn)), P.argmax(axis=1)] += 1
        result["new-rows"] = {"ids": new.loc[unseen, "id"].tolist(), "mean": np.mean(per_model, axis=0).tolist(), "votes": votes.tolist()}
    return result


if __name__ == "__main__":
    cases_path, folds_dir, out_dir = sys.argv[1:4]
    os.makedirs(out_dir, exist_ok=True)
    for case in json.load(open(cases_path)):
        with open(os.path.join(out_dir, case["name"] + ".json"), "w") as f:
            json.dump(run_case(case, folds_dir), f, indent=1)
            f.write("\n")
