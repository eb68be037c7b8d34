// Ranking, calibration and threshold figures as the panel receives them (computed in src/core/metrics,
// reshaped by src/extension/summary/evaluation.ts): null for a number that does not exist.

/** A point of a ROC (x: false positive rate, y: true positive rate) or precision-recall (x: recall, y: precision) curve. */
export interface CurvePoint {
  x: number;
  y: number;
  /** Rows whose probability is at least this are flagged; null at the ROC curve's start (no row flagged). */
  threshold: number | null;
}

export interface CalibrationBinView {
  lower: number;
  upper: number;
  rows: number;
  meanPredicted: number | null;
  observed: number | null;
}

export interface ClassCurvesView {
  label: string;
  /** The class's code, for its colour. */
  code: number;
  auc: number | null;
  averagePrecision: number | null;
  /** Share of rows of the class: where guessing puts the precision-recall curve. */
  baseRate: number | null;
  roc: CurvePoint[];
  precisionRecall: CurvePoint[];
  calibration: { equalWidth: CalibrationBinView[]; equalCount: CalibrationBinView[] };
}

export interface ThresholdTallyView {
  threshold: number;
  truePositives: number;
  falsePositives: number;
}

export interface ThresholdPresetView {
  kind: 'balanced-accuracy' | 'recall' | 'precision';
  target: number | null;
  threshold: number | null;
}

/** Two classes: counts of rows flagged at each threshold step, from which the panel's control reads the confusion table. */
export interface ThresholdsView {
  positiveClass: string;
  positives: number;
  negatives: number;
  tallies: ThresholdTallyView[];
  presets: ThresholdPresetView[];
}

export interface EvaluationView {
  /** Two classes: of the positive class; more: the mean over classes of each against the rest. */
  auc: number | null;
  brier: number | null;
  curves: ClassCurvesView[];
  thresholds: ThresholdsView | null;
}

/** Regression: out-of-bag predicted against actual, and how often the prediction interval held the truth. */
export interface RegressionDiagnosticsView {
  pairs: Array<{ actual: number; predicted: number }>;
  rows: number;
  interval: { level: number; coverage: number; rows: number; meanWidth: number } | null;
}

/** k-fold cross-validation: each score's value per fold, and its mean and sample sd over folds. */
export interface CrossValidationView {
  foldCount: number;
  repeats: number;
  stratified: boolean;
  /** Scores in the order shown: accuracy, balancedAccuracy, auc, brier, logLoss; or r2, mae, rmse. */
  scores: Array<{ key: string; perFold: Array<number | null>; mean: number | null; sd: number | null }>;
}
