#!/usr/bin/python3
"""Records scikit-learn's ranking and calibration scores, and a stratified 5-fold estimate, for our tests.

Run with Debian's Python: /usr/bin/python3 scripts/sklearn_metrics_reference.py   (about a minute on 2 cores)
Writes test/fixtures/reference/sklearn-metrics.json.

Part 1, fixed probabilities: seeded vectors of class probabilities, written into the fixture with every digit
(Python's shortest round-trip text), so the test feeds Copse's core exactly the doubles scikit-learn scored.
They are rounded to coarse steps on purpose, so scores tie the way a forest's vote shares do. Recorded per case:
  - auc: roc_auc_score (two classes: of class 1; more: multi_class="ovr", average="macro")
  - averagePrecision: average_precision_score (more classes: per class, on label_binarize'd truth)
  - brier: two classes, brier_score_loss of class 1; more classes, numpy by the formula (scikit-learn 1.2.1's
    brier_score_loss takes two classes only): mean over rows of sum over classes of (one-hot - p)^2
  - calibration: calibration_curve (two classes, class 1) with strategy "uniform" and "quantile", 10 bins
Part 2, cross-validation: RandomForestClassifier on pima.csv (test/fixtures/open/SOURCES.md) scored by
StratifiedKFold(5, shuffled), one seed per run for both the folds and the forests, SEEDS runs. Recorded: the
five-fold mean of accuracy, ROC AUC and Brier per run, and their mean, sd, min and max over runs.

The JSON keys are Copse's own names; scikit-learn's parameter names appear only in the code below.
"""

import json
import os
import platform
import subprocess

import numpy as np
import pandas as pd
import sklearn
from sklearn.calibration import calibration_curve
from sklearn.ensemble import RandomForestClassifier
from sklearn.metrics import accuracy_score, average_precision_score, brier_score_loss, roc_auc_score
from sklearn.model_selection import StratifiedKFold
from sklearn.preprocessing import label_binarize

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OUT = os.path.join(ROOT, "test", "fixtures", "reference", "sklearn-metrics.json")
PIMA = os.path.join(ROOT, "test", "fixtures", "open", "pima.csv")

TREES = 200
SEEDS = list(range(1, 11))
FOLDS = 5
BINS = 10


def debian_version(package):
    try:
        return subprocess.run(["dpkg-query", "-W", "-f=${Version}", package],
                              capture_output=True, text=True, check=True).stdout.strip() or None
    except (OSError, subprocess.CalledProcessError):
        return None


def binary_case(name, y, p1):
    y = np.asarray(y, dtype=int)
    p1 = np.asarray(p1, dtype=float)
    proba = np.column_stack([1 - p1, p1])
    case = {
        "name": name,
        "classes": 2,
        "truth": [int(v) for v in y],
        "proba": [[float(a), float(b)] for a, b in proba],
        "auc": float(roc_auc_score(y, p1)),
        "averagePrecision": float(average_precision_score(y, p1)),
        "brier": float(brier_score_loss(y, p1)),
        "calibration": {},
    }
    for strategy, ours in (("uniform", "equalWidth"), ("quantile", "equalCount")):
        observed, predicted = calibration_curve(y, p1, n_bins=BINS, strategy=strategy)
        case["calibration"][ours] = {"observed": [float(v) for v in observed], "meanPredicted": [float(v) for v in predicted]}
    return case


def multiclass_case(name, y, proba):
    y = np.asarray(y, dtype=int)
    proba = np.asarray(proba, dtype=float)
    k = proba.shape[1]
    onehot = label_binarize(y, classes=list(range(k)))
    return {
        "name": name,
        "classes": k,
        "truth": [int(v) for v in y],
        "proba": [[float(v) for v in row] for row in proba],
        "auc": float(roc_auc_score(y, proba, multi_class="ovr", average="macro")),
        "averagePrecision": [float(v) for v in average_precision_score(onehot, proba, average=None)],
        "brier": float(np.mean(np.sum((onehot - proba) ** 2, axis=1))),
    }


def vote_shares(rng, n, k, trees, truth, strength):
    """Rows of k vote shares out of `trees` votes, leaning towards the true class: ties aplenty."""
    out = np.zeros((n, k))
    for i in range(n):
        w = np.ones(k)
        w[truth[i]] += strength
        out[i] = rng.multinomial(trees, w / w.sum()) / trees
    return out


def fixed_cases():
    rng = np.random.default_rng(20261205)
    cases = []
    y = (rng.random(200) < 0.3).astype(int)
    p = np.clip(0.3 + 0.35 * y + rng.normal(0, 0.2, 200), 0, 1)
    cases.append(binary_case("binary, steps of 0.05", y, np.round(p * 20) / 20))
    y = (rng.random(60) < 0.15).astype(int)
    cases.append(binary_case("binary, rare class, shares of 7 votes", y, vote_shares(rng, 60, 2, 7, y, 1.0)[:, 1]))
    y = np.array([0, 1, 0, 1, 1, 0, 0, 1])
    cases.append(binary_case("binary, every score tied", y, np.full(8, 0.5)))
    y = rng.integers(0, 3, 150)
    cases.append(multiclass_case("three classes, shares of 10 votes", y, vote_shares(rng, 150, 3, 10, y, 1.5)))
    y = rng.integers(0, 4, 90)
    cases.append(multiclass_case("four classes, shares of 5 votes", y, vote_shares(rng, 90, 4, 5, y, 2.0)))
    return cases


def cross_validation():
    data = pd.read_csv(PIMA)
    X = data.drop(columns=["type"]).to_numpy(dtype=float)
    y = (data["type"] == "Yes").to_numpy(dtype=int)
    runs = {"accuracy": [], "auc": [], "brier": []}
    for seed in SEEDS:
        folds = StratifiedKFold(n_splits=FOLDS, shuffle=True, random_state=seed)
        scores = {"accuracy": [], "auc": [], "brier": []}
        for train, test in folds.split(X, y):
            forest = RandomForestClassifier(n_estimators=TREES, max_features="sqrt", random_state=seed, n_jobs=2)
            forest.fit(X[train], y[train])
            p1 = forest.predict_proba(X[test])[:, 1]
            scores["accuracy"].append(accuracy_score(y[test], (p1 > 0.5).astype(int)))
            scores["auc"].append(roc_auc_score(y[test], p1))
            scores["brier"].append(brier_score_loss(y[test], p1))
        for key in runs:
            runs[key].append(float(np.mean(scores[key])))
    out = {}
    for key, values in runs.items():
        a = np.asarray(values)
        sd = float(a.std(ddof=1))
        out[key] = {
            "mean": round(float(a.mean()), 6), "sd": round(sd, 6), "min": round(float(a.min()), 6),
            "max": round(float(a.max()), 6), "perSeed": [round(v, 6) for v in values],
            # A single Copse run of the same design should land within the runs' range widened by this much:
            # Copse bins features and draws its own random numbers, so it agrees within run-to-run noise.
            "tolerance": round(max(3 * sd, 0.02 if key == "accuracy" else 0.015), 6),
        }
    return {"file": "test/fixtures/open/pima.csv", "target": "type", "positiveClass": "Yes", "folds": FOLDS,
            "trees": TREES, "seeds": SEEDS, "featuresPerSplit": "sqrt", "scores": out}


def main():
    result = {
        "sklearnVersion": sklearn.__version__,
        "numpyVersion": np.__version__,
        "pythonVersion": platform.python_version(),
        "debianPackages": {"python3-sklearn": debian_version("python3-sklearn"), "python3-numpy": debian_version("python3-numpy")},
        "cases": fixed_cases(),
        "crossValidation": cross_validation(),
    }
    with open(OUT, "w") as f:
        json.dump(result, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
