// The plain-data account of a forest shown against a table: what the command line prints as JSON and as a
// readable report, and what the editor's panel draws (src/extension/summary/panel.ts reshapes it for the
// panel without computing anything). Every number a user reads about a fit is in here, computed once.

import type { CautionKind } from '../checks/cautions';
import type { ClassCurves } from '../metrics/evaluation';
import type { RegressionDiagnostics } from '../metrics/residual-plot';
import type { ThresholdPreset, ThresholdTable } from '../metrics/thresholds';

export type FeatureKind = 'numeric' | 'categorical' | 'boolean';

/** Five-number summary of label − prediction. */
export interface ResidualSummary {
  readonly min: number;
  readonly q1: number;
  readonly median: number;
  readonly q3: number;
  readonly max: number;
}

export interface ScoresSummary {
  readonly rows: number;
  readonly accuracy?: number;
  readonly balancedAccuracy?: number;
  readonly logLoss?: number;
  readonly perClass?: ReadonlyArray<{ label: string; precision: number; recall: number; support: number }>;
  readonly confusion?: { labels: readonly string[]; counts: readonly (readonly number[])[] };
  readonly r2?: number;
  readonly mae?: number;
  readonly rmse?: number;
  /** Regression: label − prediction over the scored rows. */
  readonly residuals?: ResidualSummary;
  /** Area under the ROC curve: two classes, the second class's; more, the mean of each class's against the rest. */
  readonly auc?: number;
  /** More than two classes: each class's ROC area against the rest. */
  readonly aucByClass?: Readonly<Record<string, number>>;
  /** Two classes: one number, for the second class; more: one per class against the rest. */
  readonly averagePrecision?: number | Readonly<Record<string, number>>;
  /** Two classes: squared error of the second class's probability; more: summed over classes (see core/metrics/calibration.ts). */
  readonly brier?: number;
  /** Two classes: the class the curves, areas and thresholds are read for. */
  readonly positiveClass?: string;
  /** ROC, precision-recall and calibration curves (thinned for size), and for two classes the threshold tallies. */
  readonly curves?: ScoreCurves;
  /** Regression: predicted against actual and the prediction interval's coverage. */
  readonly diagnostics?: RegressionDiagnostics;
}

export interface ScoreCurves {
  readonly byClass: readonly ClassCurves[];
  readonly thresholds?: ThresholdTable & { readonly presets: readonly ThresholdPreset[] };
}

/** k-fold cross-validation: each fold's holdout scores (without curves), and their mean and spread. */
export interface CrossValidationSummary {
  readonly folds: readonly ScoresSummary[];
  readonly repeats: number;
  readonly foldCount: number;
  readonly stratified: boolean;
  /** Over every fold of every repeat: the mean and sample standard deviation of each score. */
  readonly mean: Readonly<Record<string, number | Readonly<Record<string, number>>>>;
  readonly sd: Readonly<Record<string, number | Readonly<Record<string, number>>>>;
}

/** A training row the forest doubts (see core/forest/doubtful.ts). */
export interface SuspectRow {
  /** 1-based data row (the first row after the header is 1). */
  readonly row: number;
  readonly line: number;
  /** The row's label: class name, or value. */
  readonly label: string | number;
  /** What the trees that never saw the row say: class name, or mean value. */
  readonly oobPredicted: string | number;
  /** Classification: Breiman's out-of-bag margin (negative). */
  readonly margin?: number;
  /** Regression: the residual's modified z-score. */
  readonly zScore?: number;
}

export interface CautionSummary {
  readonly kind: CautionKind;
  readonly column?: string;
  readonly message: string;
}

export interface FitSummary {
  readonly task: 'classification' | 'regression';
  readonly target: string;
  /** Class labels in code order; [] for regression. */
  readonly classes: readonly string[];
  /** The table the forest is shown against. */
  readonly data: { readonly file: string; readonly fingerprint: string; readonly rowsRead: number; readonly sampled: boolean };
  /** Training rows in this table (0 when they are not known here: an import, or another file). */
  readonly rows: number;
  /** Rows scored on top of training: held out of the fit, a test file, or the file an opened forest is shown against. */
  readonly scoredRows: number;
  readonly features: readonly string[];
  readonly featureKinds: readonly FeatureKind[];
  readonly dropped: ReadonlyArray<{ readonly name: string; readonly reason: string }>;
  readonly trees: number;
  /** Every setting of a fresh fit; an opened forest knows only its tree count and seed. */
  readonly settings: { readonly trees: number; readonly seed: number; readonly [setting: string]: unknown };
  /** Null when there is no out-of-bag score; oobUnavailable says why. */
  readonly oob: ScoresSummary | null;
  readonly oobUnavailable?: string;
  readonly test?: ScoresSummary;
  /** Where `test` came from: rows held out of the fit, a separate test file, or the file shown. */
  readonly testFrom?: 'holdout' | 'test' | 'file';
  /** Present when cross-validation was asked for. */
  readonly cv?: CrossValidationSummary;
  readonly importance: {
    /** Mean decrease in impurity, each tree's scaled to sum 1, averaged, summing to 1. */
    readonly impurity: Record<string, number>;
    /** Rise in error when the feature is shuffled; empty when not measured. */
    readonly permutation: Record<string, number>;
    readonly permutationSpread: Record<string, number>;
    /** Which rows permutation importance was measured on; null when it was not. */
    readonly permutationOn: 'out-of-bag' | 'file' | null;
    /** Why permutation importance was not measured, when it was not. */
    readonly permutationMissing?: string;
  };
  /** curve[t - 1]: out-of-bag error with the first t trees; [] when unknown. */
  readonly curve: readonly number[];
  /** The most doubtful training rows first, at most the limit asked for. */
  readonly suspects: readonly SuspectRow[];
  /** How many rows the forest doubts in all; null when it cannot tell (no out-of-bag votes). */
  readonly suspectCount: number | null;
  readonly cautions: readonly CautionSummary[];
  readonly notes: readonly string[];
  readonly warnings: readonly string[];
  readonly fitSeconds: number | null;
}
