#!/usr/bin/python3
"""scikit-learn's side of the benchmark: one JSON object on stdout, timings in seconds.

Called by bench/run.ts (run it with Debian's /usr/bin/python3). Times, each with perf_counter:
  load     pandas.read_csv of the training file (the figure Copse's CSV load is compared with)
  fit      RandomForestClassifier.fit, with the out-of-bag score on, since Copse and ranger always
           compute out-of-bag predictions while fitting
  predict  RandomForestClassifier.predict on the prediction file (already loaded)
The test and prediction files are read outside the timed sections.
"""

import argparse
import json
import sys
import time

import numpy as np
import pandas as pd
import sklearn
from sklearn.ensemble import RandomForestClassifier


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--train", required=True)
    ap.add_argument("--target", required=True)
    ap.add_argument("--trees", type=int, required=True)
    ap.add_argument("--features-per-split", type=int, required=True)
    ap.add_argument("--workers", type=int, required=True)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--test")
    ap.add_argument("--predict")
    ap.add_argument("--save-model")
    a = ap.parse_args()

    result = {"implementation": "scikit-learn", "version": sklearn.__version__, "seconds": {}}

    t = time.perf_counter()
    train = pd.read_csv(a.train)
    result["seconds"]["load"] = time.perf_counter() - t
    # float32 is what sklearn's trees work in; converting here keeps the copy out of fit's time.
    X = train.drop(columns=[a.target]).to_numpy(dtype=np.float32)
    y = train[a.target].to_numpy()
    result["rows"] = int(X.shape[0])
    result["features"] = int(X.shape[1])
    del train

    forest = RandomForestClassifier(n_estimators=a.trees, max_features=a.features_per_split,
                                    bootstrap=True, oob_score=True, min_samples_leaf=1,
                                    max_depth=None, n_jobs=a.workers, random_state=a.seed)
    t = time.perf_counter()
    forest.fit(X, y)
    result["seconds"]["fit"] = time.perf_counter() - t
    result["oob"] = {"accuracy": float(forest.oob_score_)}
    result["nodes"] = int(sum(e.tree_.node_count for e in forest.estimators_))

    if a.test:
        test = pd.read_csv(a.test)
        Xt = test.drop(columns=[a.target]).to_numpy(dtype=np.float32)
        t = time.perf_counter()
        pred = forest.predict(Xt)
        result["seconds"]["testPredict"] = time.perf_counter() - t
        result["test"] = {"accuracy": float(np.mean(pred == test[a.target].to_numpy())), "rows": int(len(test))}

    if a.predict:
        frame = pd.read_csv(a.predict)
        Xp = frame.drop(columns=[a.target], errors="ignore").to_numpy(dtype=np.float32)
        t = time.perf_counter()
        pred = forest.predict(Xp)
        result["seconds"]["predict"] = time.perf_counter() - t
        result["predictRows"] = int(len(frame))
        if a.target in frame:
            result["predictAccuracy"] = float(np.mean(pred == frame[a.target].to_numpy()))

    if a.save_model:
        # For the whole-process scoring case (bench/sklearn_score.py), which starts by unpickling it.
        import pickle
        with open(a.save_model, "wb") as f:
            pickle.dump(forest, f, protocol=pickle.HIGHEST_PROTOCOL)

    json.dump(result, sys.stdout)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
