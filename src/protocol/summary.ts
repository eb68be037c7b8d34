// The fit summary as the panel receives it: core's summary (src/core/summary) reshaped in one place,
// src/extension/summary/panel.ts, into plain JSON with null for missing numbers.

import type { CrossValidationView, EvaluationView, RegressionDiagnosticsView } from './evaluation';

export * from './evaluation';

export type TaskKind = 'classification' | 'regression';
export type FeatureKind = 'numeric' | 'categorical' | 'boolean';

// ---------------------------------------------------------------------------------------------
// Fit summary

export interface FeatureRef {
  name: string;
  kind: FeatureKind;
}

export interface DroppedFeature {
  name: string;
  reason: string;
}

export interface ClassScore {
  label: string;
  precision: number | null;
  recall: number | null;
  support: number;
}

export interface ClassificationScoreSummary {
  kind: 'classification';
  rows: number;
  accuracy: number;
  balancedAccuracy: number;
  logLoss: number | null;
  perClass: ClassScore[];
  /** confusion[truth][predicted], counts. */
  confusion: number[][];
  /** ROC and precision-recall curves, calibration and (two classes) threshold tallies; absent from older summaries. */
  evaluation?: EvaluationView;
}

/** Five-number summary of truth - prediction. */
export interface ResidualSummary {
  min: number;
  q1: number;
  median: number;
  q3: number;
  max: number;
}

export interface RegressionScoreSummary {
  kind: 'regression';
  rows: number;
  r2: number;
  mae: number;
  rmse: number;
  residuals: ResidualSummary | null;
  /** Absent from older summaries. */
  diagnostics?: RegressionDiagnosticsView;
}

export type ScoreSummary = ClassificationScoreSummary | RegressionScoreSummary;

export interface FeatureImportance {
  feature: string;
  /** Mean decrease in impurity, normalised to sum 1 over features. */
  impurity: number;
  /** Mean drop in OOB score when the feature is shuffled; null when not computed. */
  permutation: number | null;
  /** Standard deviation of that drop over repeats/trees; null when not computed. */
  permutationSpread: number | null;
}

export interface FitSummary {
  /** Names this fit (or opened forest): every message about it carries the same id, and the panel drops the rest. */
  fit: string;
  /** What was fitted; `uri` lets the host refit after the panel is restored. */
  dataset: { label: string; uri: string };
  target: string;
  task: TaskKind;
  /** Class labels in code order; [] for regression. */
  classes: string[];
  trees: number;
  rowsUsed: number;
  rowsRead: number;
  /** true when the rows used are a random sample of the file. */
  sampled: boolean;
  features: FeatureRef[];
  dropped: DroppedFeature[];
  oob: ScoreSummary | null;
  /** Scores on rows held out of training, or on a separate test file. */
  heldOut: { from: 'holdout' | 'test'; scores: ScoreSummary } | null;
  /** curve[t - 1] = OOB error with the first t trees (1 - accuracy, or MSE); null where undefined. */
  curve: (number | null)[];
  importance: FeatureImportance[];
  warnings: string[];
  fitSeconds: number | null;
  /** Why permutation importance was not measured, as the end of a sentence ("not measured: …"); absent when it was. */
  permutationNote?: string;
  /** How many training rows the forest doubts in all (the list sent is capped); null when it cannot tell. */
  suspectCount: number | null;
  /** Which rows permutation importance was measured on: out-of-bag rows (a fit; the default) or the file shown. */
  permutationOn?: 'out-of-bag' | 'file';
  /** Set when out-of-bag figures cannot exist for this forest: why, as a sentence, shown in their place. */
  oobUnavailable?: string;
  /** Present when the fit was cross-validated (the adjust step's folds). */
  cv?: CrossValidationView;
}
