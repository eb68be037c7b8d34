// Ranking and calibration figures of one set of class probabilities (out-of-bag, holdout or test rows):
// what `oob` and `test` carry besides accuracy. Two classes are read for the second class (the positive
// one); more classes one against the rest, per class, with the ROC area's macro average as the headline.
import { brierScore, calibrationCurve, type CalibrationBin } from './calibration';
import { averagePrecision, binaryCurve, CURVE_POINTS, precisionRecallPoints, rocAuc, rocPoints, type PrecisionRecallPoint, type RocPoint } from './ranking';
import { thresholdPresets, thresholdTable, type ThresholdPreset, type ThresholdTable } from './thresholds';

export interface ClassCurves {
  readonly label: string;
  readonly auc: number;
  readonly averagePrecision: number;
  readonly roc: readonly RocPoint[];
  readonly precisionRecall: readonly PrecisionRecallPoint[];
  /** The share of rows of the class: where a precision-recall curve of random guesses lies. */
  readonly baseRate: number;
  readonly calibration: { readonly equalWidth: readonly CalibrationBin[]; readonly equalCount: readonly CalibrationBin[] };
}

export interface Evaluation {
  /** Two classes: the second class's ROC area; more: the unweighted mean of each class's against the rest. */
  readonly auc: number;
  /** Two classes: one number, for the second class; more: one per class against the rest. */
  readonly averagePrecision: number | Readonly<Record<string, number>>;
  readonly brier: number;
  /** Two classes: the one class read as positive; more: every class against the rest. */
  readonly curves: readonly ClassCurves[];
  /** Two classes only: tallies per threshold and the presets chosen on these rows. */
  readonly thresholds?: ThresholdTable & { readonly presets: readonly ThresholdPreset[] };
}

/**
 * truth: class codes (negative: unknown); proba: rows * K. Rows where include(i) is false are left out.
 * With `curves` false only the three numbers are computed (cross-validation folds carry no curves).
 */
export function evaluateProbabilities(truth: ArrayLike<number>, proba: ArrayLike<number>, labels: readonly string[], include?: (i: number) => boolean, curves = true): Evaluation {
  const K = labels.length;
  const rows: number[] = [];
  for (let i = 0; i < truth.length; i++) if ((!include || include(i)) && truth[i] >= 0) rows.push(i);
  const classes = K === 2 ? [1] : labels.map((_, k) => k);
  // Many classes share one budget of points, so the summary stays small: 200 per curve up to 10 classes.
  const limit = Math.max(40, Math.min(CURVE_POINTS, Math.floor((10 * CURVE_POINTS) / classes.length)));
  const perClass = classes.map((k) => {
    const p = Float64Array.from(rows, (i) => proba[i * K + k]);
    const positive = Uint8Array.from(rows, (i) => (truth[i] === k ? 1 : 0));
    const c = binaryCurve(p, positive);
    const entry: ClassCurves = {
      label: labels[k],
      auc: rocAuc(c),
      averagePrecision: averagePrecision(c),
      roc: curves ? rocPoints(c, limit) : [],
      precisionRecall: curves ? precisionRecallPoints(c, limit) : [],
      baseRate: rows.length ? c.positives / rows.length : NaN,
      calibration: curves ? { equalWidth: calibrationCurve(p, positive, 'equal-width'), equalCount: calibrationCurve(p, positive, 'equal-count') } : { equalWidth: [], equalCount: [] },
    };
    return entry;
  });
  const brier = brierScore(truth, proba, K, include);
  if (K === 2) {
    const table = curves ? thresholdTable(truth, proba, include) : undefined;
    return {
      auc: perClass[0].auc,
      averagePrecision: perClass[0].averagePrecision,
      brier,
      curves: curves ? perClass : [],
      thresholds: table ? { ...table, presets: thresholdPresets(table) } : undefined,
    };
  }
  // Macro average over the classes that have rows of their own and rows of others here (a class absent
  // from these rows has no ROC area), as scikit-learn's one-vs-rest macro average would, if it allowed it.
  const defined = perClass.filter((c) => Number.isFinite(c.auc));
  const ap = Object.create(null) as Record<string, number>;
  for (const c of perClass) ap[c.label] = c.averagePrecision;
  return {
    auc: defined.length ? defined.reduce((a, c) => a + c.auc, 0) / defined.length : NaN,
    averagePrecision: ap,
    brier,
    curves: curves ? perClass : [],
  };
}
