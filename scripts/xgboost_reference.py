#!/usr/bin/python3
"""Writes small XGBoost models and XGBoost's own answers on their data, for Copse's reader to be checked against.

Run with Debian's Python: /usr/bin/python3 scripts/xgboost_reference.py
Writes test/fixtures/xgboost/: for each case NAME, NAME.model.json (Booster.save_model, XGBoost's JSON
format), NAME.expected.json (the library versions, the CSV the rows come from, and per row: predict's
output, the raw margin and pred_contribs), and, where the rows are not an open dataset as it is, the CSV.

Cases (data: test/fixtures/open/, see SOURCES.md there):
  binary      pima, binary:logistic, feature names in the file
  multiclass  wine, multi:softprob (three trees per round), feature names in the file
  softmax     iris, multi:softmax, no feature names in the file (read by position)
  gaps        diabetes with 15% of its feature cells blanked (seeded), reg:squarederror: default directions
  forest      friedman1, reg:squarederror with several parallel trees per round (XGBoost's random-forest mode)
"""

import json
import os
import platform

import numpy as np
import pandas as pd
import xgboost as xgb

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..')
OPEN = os.path.join(ROOT, 'test', 'fixtures', 'open')
OUT = os.path.join(ROOT, 'test', 'fixtures', 'xgboost')


def rows(a):
    """Shortest round-trip text of each float32 XGBoost returned."""
    return [[float(v) for v in np.atleast_1d(r)] for r in a]


def write_case(name, booster, frame, csv, target, feature_cols, classes, note):
    x = frame[feature_cols].to_numpy(dtype=np.float64)
    d = xgb.DMatrix(x, feature_names=booster.feature_names, missing=np.nan)
    expected = {
        'generatedBy': 'scripts/xgboost_reference.py',
        'xgboost': xgb.__version__,
        'numpy': np.__version__,
        'python': platform.python_version(),
        'csv': csv,
        'target': target,
        'features': feature_cols,
        'classes': classes,
        'note': note,
        'predict': rows(booster.predict(d)),
        'margin': rows(booster.predict(d, output_margin=True)),
        # rows x (features + 1) for one output, rows x outputs x (features + 1) for several; last entry: bias.
        'contribs': [np.asarray(r, dtype=np.float64).tolist() for r in booster.predict(d, pred_contribs=True)],
    }
    booster.save_model(os.path.join(OUT, f'{name}.model.json'))
    with open(os.path.join(OUT, f'{name}.expected.json'), 'w') as f:
        json.dump(expected, f)


def main():
    os.makedirs(OUT, exist_ok=True)

    pima = pd.read_csv(os.path.join(OPEN, 'pima.csv'))
    cols = [c for c in pima.columns if c != 'type']
    y = (pima['type'] == 'Yes').astype(int).to_numpy()
    d = xgb.DMatrix(pima[cols].to_numpy(dtype=np.float64), label=y, feature_names=cols)
    b = xgb.train({'objective': 'binary:logistic', 'max_depth': 3, 'eta': 0.3, 'seed': 1}, d, num_boost_round=20)
    write_case('binary', b, pima, 'test/fixtures/open/pima.csv', 'type', cols, ['No', 'Yes'], 'label 1 is "Yes"')

    wine = pd.read_csv(os.path.join(OPEN, 'wine.csv'))
    cols = [c for c in wine.columns if c != 'cultivar']
    classes = sorted(wine['cultivar'].unique())
    y = wine['cultivar'].map({c: i for i, c in enumerate(classes)}).to_numpy()
    d = xgb.DMatrix(wine[cols].to_numpy(dtype=np.float64), label=y, feature_names=cols)
    b = xgb.train({'objective': 'multi:softprob', 'num_class': 3, 'max_depth': 3, 'eta': 0.3, 'seed': 1}, d, num_boost_round=8)
    write_case('multiclass', b, wine, 'test/fixtures/open/wine.csv', 'cultivar', cols, classes, 'label k is the k-th class in sorted order')

    iris = pd.read_csv(os.path.join(OPEN, 'iris.csv'))
    cols = [c for c in iris.columns if c != 'species']
    classes = sorted(iris['species'].unique())
    y = iris['species'].map({c: i for i, c in enumerate(classes)}).to_numpy()
    d = xgb.DMatrix(iris[cols].to_numpy(dtype=np.float64), label=y)  # no names: the file has none
    b = xgb.train({'objective': 'multi:softmax', 'num_class': 3, 'max_depth': 2, 'eta': 0.5, 'seed': 1}, d, num_boost_round=5)
    write_case('softmax', b, iris, 'test/fixtures/open/iris.csv', 'species', cols, classes, 'no feature names in the model file')

    diabetes = pd.read_csv(os.path.join(OPEN, 'diabetes.csv'))
    cols = [c for c in diabetes.columns if c != 'progression']
    rng = np.random.default_rng(14)
    gaps = diabetes.copy()
    mask = rng.random((len(gaps), len(cols))) < 0.15
    values = gaps[cols].to_numpy(dtype=np.float64)
    values[mask] = np.nan
    gaps[cols] = values
    gaps.to_csv(os.path.join(OUT, 'diabetes-gaps.csv'), index=False, na_rep='', float_format=None)
    gaps = pd.read_csv(os.path.join(OUT, 'diabetes-gaps.csv'))  # exactly the doubles the CSV holds
    d = xgb.DMatrix(gaps[cols].to_numpy(dtype=np.float64), label=gaps['progression'].to_numpy(), feature_names=cols, missing=np.nan)
    b = xgb.train({'objective': 'reg:squarederror', 'max_depth': 4, 'eta': 0.2, 'seed': 1}, d, num_boost_round=25)
    write_case('gaps', b, gaps, 'test/fixtures/xgboost/diabetes-gaps.csv', 'progression', cols, None, '15% of feature cells blanked, seed 14')

    fried = pd.read_csv(os.path.join(OPEN, 'friedman1.csv'))
    cols = [c for c in fried.columns if c != 'y']
    d = xgb.DMatrix(fried[cols].to_numpy(dtype=np.float64), label=fried['y'].to_numpy(), feature_names=cols)
    params = {'objective': 'reg:squarederror', 'max_depth': 5, 'eta': 1.0, 'subsample': 0.7, 'colsample_bynode': 0.6,
              'num_parallel_tree': 6, 'seed': 1}
    b = xgb.train(params, d, num_boost_round=2)
    write_case('forest', b, fried, 'test/fixtures/open/friedman1.csv', 'y', cols, None, 'six parallel trees per round, two rounds')


if __name__ == '__main__':
    main()
