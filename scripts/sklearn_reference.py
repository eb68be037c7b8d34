#!/usr/bin/python3
"""Records scikit-learn's random forest figures on the open datasets, for our tests to compare with.

Run with Debian's Python: /usr/bin/python3 scripts/sklearn_reference.py
Writes test/fixtures/reference/sklearn.json. Reads the CSVs under test/fixtures/open/ (not sklearn's
own loaders) so the reference is computed from exactly the bytes our tests feed Copse.

What is recorded, per dataset, over SEEDS forests of TREES trees each:
  - out-of-bag accuracy (classification) or out-of-bag R^2 (regression): mean, sd, min, max, per seed
  - impurity importance (sklearn's feature_importances_: mean decrease in impurity, normalised to
    sum to 1 in each forest), mean and sd over seeds, and the ranking by mean
  - out-of-bag permutation importance computed here from sklearn's fitted trees, Breiman's (2001)
    per-tree form: for each tree, the drop in accuracy (classification) or the rise in mean squared
    error (regression) on that tree's out-of-bag rows when one feature's values are shuffled among
    them, averaged over trees. sklearn has no out-of-bag permutation importance of its own (its
    inspection.permutation_importance needs a separate scoring set), so this is the comparable figure.
  - "stable top" features: those in the top k of a ranking in every seed, the set a test can demand.

Settings mirror Copse's defaults where sklearn's differ: features per split floor(sqrt(p)) for
classification and floor(p / 3) for regression (sklearn's regression default is all p), bootstrap
samples of n rows drawn with replacement, leaves down to one row, no depth limit, Gini / squared error.

The JSON keys are Copse's own names; sklearn's parameter names appear only in the code below.
"""

import json
import math
import os
import platform
import subprocess
import sys

import numpy as np
import pandas as pd
import sklearn
from sklearn.ensemble import RandomForestClassifier, RandomForestRegressor
# Private, but it is the very function sklearn's own oob_score_ uses to find each tree's
# out-of-bag rows (sklearn 1.2 forests expose no public in-bag indices), so our permutation
# importance scores each tree on the same rows sklearn's OOB accuracy does.
from sklearn.ensemble._forest import _generate_unsampled_indices

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OPEN = os.path.join(ROOT, "test", "fixtures", "open")
OUT = os.path.join(ROOT, "test", "fixtures", "reference", "sklearn.json")

TREES = 500
SEEDS = list(range(1, 11))
WORKERS = 2
TOP_K = 3

DATASETS = [
    # (file, target, task)
    ("iris.csv", "species", "classification"),
    ("wine.csv", "cultivar", "classification"),
    ("pima.csv", "type", "classification"),
    ("diabetes.csv", "progression", "regression"),
    ("friedman1.csv", "y", "regression"),
]


def debian_version(package):
    try:
        return subprocess.run(["dpkg-query", "-W", "-f=${Version}", package],
                              capture_output=True, text=True, check=True).stdout.strip() or None
    except (OSError, subprocess.CalledProcessError):
        return None


def summary(values):
    a = np.asarray(values, dtype=float)
    return {
        "mean": round(float(a.mean()), 6),
        # ddof=1: the spread we expect between two independent seeds, not of these ten alone.
        "sd": round(float(a.std(ddof=1)), 6),
        "min": round(float(a.min()), 6),
        "max": round(float(a.max()), 6),
        "perSeed": [round(float(v), 6) for v in a],
    }


def per_feature(names, matrix):
    m = np.asarray(matrix, dtype=float)
    mean = m.mean(axis=0)
    sd = m.std(axis=0, ddof=1)
    order = np.argsort(-mean, kind="stable")
    per_seed_top = [set(np.argsort(-row, kind="stable")[:TOP_K]) for row in m]
    stable = [names[j] for j in order if all(j in top for top in per_seed_top)]
    return {
        "mean": {names[j]: round(float(mean[j]), 6) for j in range(len(names))},
        "sd": {names[j]: round(float(sd[j]), 6) for j in range(len(names))},
        "ranking": [names[j] for j in order],
        "stableTop": {"k": TOP_K, "features": stable},
    }


def oob_permutation(forest, X, y, task, rng):
    """Breiman's per-tree out-of-bag permutation importance, from sklearn's fitted trees."""
    n, p = X.shape
    X32 = X.astype(np.float32)
    total = np.zeros(p)
    counted = 0
    for tree in forest.estimators_:
        # n draws per tree: max_samples is None, so the bootstrap has n rows.
        oob = _generate_unsampled_indices(tree.random_state, n, n)
        if oob.size == 0:
            continue
        Xo = X32[oob].copy()
        yo = y[oob]

        def score(rows):
            # Tree.predict skips the estimator's input checks (hundreds of thousands of calls here);
            # for one output it gives (rows, classes) of class weights, or (rows, 1) of means.
            out = tree.tree_.predict(rows)
            if task == "classification":
                # Class indices into forest.classes_, which y already uses.
                return float(np.mean(np.argmax(out, axis=1) == yo))
            return -float(np.mean((out[:, 0] - yo) ** 2))

        base = score(Xo)
        for j in range(p):
            saved = Xo[:, j].copy()
            Xo[:, j] = saved[rng.permutation(oob.size)]
            # Accuracy drop, or MSE rise (score is -MSE), both positive when the feature matters.
            total[j] += base - score(Xo)
            Xo[:, j] = saved
        counted += 1
    return total / counted


def check_oob_rows(forest, X, task):
    """Rebuilds the OOB predictions from our per-tree OOB rows; they must equal sklearn's own."""
    n = X.shape[0]
    X32 = X.astype(np.float32)
    total = None
    counts = np.zeros(n)
    for tree in forest.estimators_:
        oob = _generate_unsampled_indices(tree.random_state, n, n)
        out = tree.tree_.predict(X32[oob])
        if task == "classification":
            out = out / out.sum(axis=1, keepdims=True)
        total = np.zeros((n, out.shape[1])) if total is None else total
        total[oob] += out
        counts[oob] += 1
    mine = total / counts[:, None]
    theirs = forest.oob_decision_function_ if task == "classification" else forest.oob_prediction_[:, None]
    if not np.allclose(mine, theirs, rtol=1e-9, atol=1e-9):
        raise SystemExit("out-of-bag rows rebuilt here do not match sklearn's; the private helper changed")


def run_dataset(file, target, task):
    frame = pd.read_csv(os.path.join(OPEN, file))
    names = [c for c in frame.columns if c != target]
    X = frame[names].to_numpy(dtype=float)
    n, p = X.shape
    if task == "classification":
        classes, y = np.unique(frame[target].astype(str).to_numpy(), return_inverse=True)
        k = int(math.floor(math.sqrt(p)))
        spec = "sqrt"
    else:
        classes = None
        y = frame[target].to_numpy(dtype=float)
        k = max(1, p // 3)
        spec = "third"

    scores, impurity, permutation = [], [], []
    for seed in SEEDS:
        common = dict(n_estimators=TREES, max_features=k, bootstrap=True, oob_score=True,
                      min_samples_leaf=1, min_samples_split=2, max_depth=None,
                      random_state=seed, n_jobs=WORKERS)
        if task == "classification":
            forest = RandomForestClassifier(criterion="gini", **common)
        else:
            forest = RandomForestRegressor(criterion="squared_error", **common)
        forest.fit(X, y)
        # oob_score_ is accuracy for the classifier and R^2 for the regressor.
        if seed == SEEDS[0]:
            check_oob_rows(forest, X, task)
        scores.append(forest.oob_score_)
        impurity.append(forest.feature_importances_)
        permutation.append(oob_permutation(forest, X, y, task, np.random.default_rng(seed)))
        print(f"  {file} seed {seed}: oob {forest.oob_score_:.4f}", file=sys.stderr)

    s = summary(scores)
    # A single Copse forest differs from sklearn's by seed noise plus implementation details
    # (binned thresholds, tie-breaking, random streams). Three between-seed sd covers seed noise for
    # the mean of our own seeds; the floor keeps the band from being narrower than about two rows
    # of a small dataset, where every misclassified row moves accuracy by 1/n.
    tolerance = round(max(3 * s["sd"], 2.0 / n if task == "classification" else 0.02, 0.01), 4)
    metric = "oobAccuracy" if task == "classification" else "oobR2"
    entry = {
        "file": f"test/fixtures/open/{file}",
        "target": target,
        "task": task,
        "rows": n,
        "features": p,
        "featureNames": names,
        "settings": {
            "trees": TREES,
            "featuresPerSplit": spec,
            "featuresPerSplitResolved": k,
            "bootstrap": True,
            "sampleFraction": 1.0,
            "minLeaf": 1,
            "minSplit": 2,
            "maxDepth": None,
            "criterion": "gini" if task == "classification" else "squared-error",
            "seeds": SEEDS,
            "workers": WORKERS,
        },
        metric: s,
        "tolerance": {
            metric: {
                "absolute": tolerance,
                "rule": (f"the mean of Copse's {metric} over several seeds should be within `absolute` of "
                         f"mean; a single Copse run should lie in [min - absolute, max + absolute]"),
            },
            "impurityImportance": {
                "absolute": 0.05,
                "rule": ("each feature's impurity importance (normalised to sum 1) within 0.05 of sklearn's mean, "
                         "or within 3 sd where that is larger; rankings compared through stableTop, not in full"),
            },
            "permutationImportance": {
                "rule": ("compare rankings, not values: every feature in stableTop.features should be in Copse's "
                         "top k. Values depend on the scoring form (per-tree here)"),
            },
        },
        "impurityImportance": per_feature(names, impurity),
        "permutationImportance": per_feature(names, permutation),
        "permutationImportanceForm": ("per-tree out-of-bag, averaged over trees: accuracy drop"
                                      if task == "classification" else
                                      "per-tree out-of-bag, averaged over trees: rise in mean squared error"),
    }
    if file == "friedman1.csv":
        # A fact of the generating formula (Friedman 1991), independent of any library.
        entry["informativeFeatures"] = ["x1", "x2", "x3", "x4", "x5"]
        entry["noiseFeatures"] = ["x6", "x7", "x8", "x9", "x10"]
    if classes is not None:
        entry["classes"] = [str(c) for c in classes]
    else:
        entry["targetVariance"] = round(float(np.var(y)), 6)
    return entry


def main():
    os.makedirs(os.path.dirname(OUT), exist_ok=True)
    result = {
        "generatedBy": "scripts/sklearn_reference.py",
        "source": "scikit-learn RandomForestClassifier / RandomForestRegressor (Debian python3-sklearn)",
        "sklearnVersion": sklearn.__version__,
        "numpyVersion": np.__version__,
        "pandasVersion": pd.__version__,
        "pythonVersion": platform.python_version(),
        "debianPackages": {
            "python3-sklearn": debian_version("python3-sklearn"),
            "python3-numpy": debian_version("python3-numpy"),
        },
        "datasets": {},
    }
    for file, target, task in DATASETS:
        key = file[:-4].replace("_", "-")
        key = "".join(part if i == 0 else part.capitalize() for i, part in enumerate(key.split("-")))
        print(f"{file} ...", file=sys.stderr)
        result["datasets"][key] = run_dataset(file, target, task)
    with open(OUT, "w") as fh:
        json.dump(result, fh, indent=2)
        fh.write("\n")
    print(f"wrote {os.path.relpath(OUT, ROOT)}", file=sys.stderr)


if __name__ == "__main__":
    main()
