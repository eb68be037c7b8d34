#!/usr/bin/python3
"""Writes the open datasets under test/fixtures/open/ that scikit-learn ships, as plain CSV.
(Those from R's MASS package are written by scripts/export_mass_datasets.R.)

Run with Debian's Python (/usr/bin/python3), which has scikit-learn. The data come from the copies
that Debian's python3-sklearn ships inside the package (sklearn/datasets/data); the load_* functions
read those files and never touch the network, which is why we go through them rather than a fetch.

Column names are our own snake_case spellings of the published attribute names, so that they are
easy to type after --target and survive any CSV reader. Class labels are written as words so that
no reader mistakes a classification target for a number.
"""

import csv
import os
import sys

import sklearn
from sklearn import datasets

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OUT = os.path.join(ROOT, "test", "fixtures", "open")


def snake(name):
    out = []
    for ch in name.lower():
        out.append(ch if ch.isalnum() else "_")
    text = "".join(out)
    while "__" in text:
        text = text.replace("__", "_")
    return text.strip("_")


def fmt(value):
    # repr() of a Python float is the shortest text that reads back to the same double, so the CSV
    # holds exactly what sklearn loaded and nothing more.
    if float(value).is_integer() and abs(value) < 1e15:
        return str(int(value))
    return repr(float(value))


def write(name, header, rows):
    path = os.path.join(OUT, name)
    with open(path, "w", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(header)
        for r in rows:
            w.writerow(r)
    print(f"wrote {os.path.relpath(path, ROOT)}: {len(rows)} rows x {len(header)} columns")


def classification(name, bunch, target_name, feature_names=None):
    names = feature_names or [snake(n) for n in bunch.feature_names]
    labels = [str(t) for t in bunch.target_names]
    rows = [[fmt(v) for v in x] + [labels[int(y)]] for x, y in zip(bunch.data, bunch.target)]
    write(name, names + [target_name], rows)


def main():
    os.makedirs(OUT, exist_ok=True)
    print(f"scikit-learn {sklearn.__version__} from {os.path.dirname(sklearn.__file__)}", file=sys.stderr)

    iris = datasets.load_iris()
    classification("iris.csv", iris, "species",
                   ["sepal_length", "sepal_width", "petal_length", "petal_width"])

    classification("wine.csv", datasets.load_wine(), "cultivar")

    # scaled=False gives the measurements as Efron et al. published them (age in years, sex coded
    # 1/2, ...) instead of sklearn's centred and scaled copy; trees do not care about scale, and the
    # raw values are what a user of the source would see.
    diabetes = datasets.load_diabetes(scaled=False)
    header = [snake(n) for n in diabetes.feature_names] + ["progression"]
    rows = [[fmt(v) for v in x] + [fmt(y)] for x, y in zip(diabetes.data, diabetes.target)]
    write("diabetes.csv", header, rows)


if __name__ == "__main__":
    main()
