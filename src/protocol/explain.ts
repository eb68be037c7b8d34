// Explanations the panel draws: one row's contributions, the global view, partial dependence, the sweep.

import type { FeatureKind, TaskKind } from './summary';

export interface FeatureContribution {
  feature: string;
  /** The row's value of the feature, as text to show ("(missing)" when missing). */
  value: string;
  /** Signed: what knowing this feature's value moved the prediction by. */
  contribution: number;
}

/** Exact per-feature contributions to one row's prediction: base + sum of contributions = prediction. */
export interface RowContributions {
  row: number;
  /** The class whose probability is explained (the one predicted by those trees), or null for a regression value. */
  output: number | null;
  /** The explained trees' expected output when no feature is known. */
  base: number;
  /** What the explained trees predict for the row: base plus the contributions. */
  prediction: number;
  /** How many trees are explained, and whether none of them drew the row (a training row's out-of-bag trees). */
  trees: number;
  outOfBag: boolean;
  /** Every feature, in the forest's feature order. */
  features: FeatureContribution[];
  /** A boosted ensemble: base, prediction and contributions are raw scores on this scale ('log-odds', ...). */
  scale?: string;
  /** With scale, for a class: its probability, shown beside the raw score. */
  probability?: number;
}

/** The global view: mean absolute contribution per feature over a sample of rows, summed over classes. */
export interface GlobalContributions {
  /** Rows averaged over so far. */
  rows: number;
  /** Rows the sample will hold when finished. */
  planned: number;
  done: boolean;
  features: { feature: string; meanAbs: number }[];
}

/** One-feature partial dependence with the individual curves it averages and where the data lie. */
export interface Dependence {
  feature: string;
  kind: FeatureKind;
  /** Numeric: grid values, increasing. Level features: the level codes 0..L-1. */
  grid: number[];
  /** Level names (one per grid point), or null for a numeric feature. */
  labels: string[] | null;
  /** The class whose probability is shown, or null for a regression value. */
  output: number | null;
  /** Mean of the curves at each grid point. */
  average: number[];
  /** One curve per sampled row, each grid.length long. */
  ice: number[][];
  /** Data rows the curves belong to. */
  iceRows: number[];
  /** Training rows whose value falls in each grid point's cell (see boundaries). */
  counts: number[];
  /** Numeric: the grid.length - 1 cell edges between neighbouring points; [] for levels. */
  boundaries: number[];
  /** Training rows with the feature missing. */
  missing: number;
}

export interface SweepPointSummary {
  featuresPerSplit: number;
  /** Out-of-bag misclassification rate or mean squared error. */
  oobError: number;
  /** Out-of-bag accuracy or R², for reading beside the error. */
  oobScore: number;
  seconds: number;
}

export interface SweepSummary {
  task: TaskKind;
  features: number;
  /** The count the fit's setting resolves to. */
  defaultCount: number;
  points: SweepPointSummary[];
  best: number;
  /** The count the forest now shown was fitted with, when it was fitted on the same data and settings. */
  current: number | null;
}
