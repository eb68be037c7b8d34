#!/usr/bin/python3
"""scikit-learn's side of the whole-process scoring case: what `copse predict MODEL DATA --out OUT` does.

Unpickles the forest saved by sklearn_side.py --save-model, reads the CSV with pandas.read_csv, computes
predict_proba, and writes the class probabilities and the predicted class with DataFrame.to_csv. The bench
times the whole process from outside (interpreter start-up included), as it does `copse predict`.
"""

import argparse
import json
import pickle
import sys

import numpy as np
import pandas as pd


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--model", required=True)
    ap.add_argument("--data", required=True)
    ap.add_argument("--target", required=True)
    ap.add_argument("--out", required=True)
    a = ap.parse_args()
    with open(a.model, "rb") as f:
        forest = pickle.load(f)
    frame = pd.read_csv(a.data)
    X = frame.drop(columns=[a.target], errors="ignore").to_numpy(dtype=np.float32)
    proba = forest.predict_proba(X)
    out = pd.DataFrame(proba, columns=[f"p_{c}" for c in forest.classes_])
    out["predicted_" + a.target] = forest.classes_[np.argmax(proba, axis=1)]
    out.to_csv(a.out, index=False)
    json.dump({"rows": int(len(frame))}, sys.stdout)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
