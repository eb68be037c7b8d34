// What a regression forest's predictions look like against the truth: the pairs behind the predicted-against-
// actual and residual plots (a fixed-stride sample, so the JSON stays small on large files), and how often
// the prediction interval holds the truth on rows its trees never saw.

export interface PredictionPair {
  readonly actual: number;
  readonly predicted: number;
}

export interface IntervalCoverage {
  /** The level asked for, such as 0.9. */
  readonly level: number;
  /** Share of rows whose truth lies within [lower, upper]. */
  readonly coverage: number;
  readonly rows: number;
  /** Mean width of the interval, in the target's units. */
  readonly meanWidth: number;
}

export interface RegressionDiagnostics {
  /** Rows plotted: every row up to PLOTTED_ROWS, else an evenly spaced sample in row order. */
  readonly pairs: readonly PredictionPair[];
  /** Rows the pairs were sampled from. */
  readonly rows: number;
  readonly interval?: IntervalCoverage;
}

export const PLOTTED_ROWS = 400;

export function predictionPairs(truth: ArrayLike<number>, predicted: ArrayLike<number>, include?: (i: number) => boolean, limit = PLOTTED_ROWS): RegressionDiagnostics {
  const kept: number[] = [];
  for (let i = 0; i < truth.length; i++) if ((!include || include(i)) && Number.isFinite(truth[i]) && Number.isFinite(predicted[i])) kept.push(i);
  const step = Math.max(1, kept.length / limit);
  const pairs: PredictionPair[] = [];
  for (let j = 0; j < kept.length && pairs.length < limit; j++) {
    if (Math.floor(j / step) !== pairs.length) continue;
    const i = kept[j];
    pairs.push({ actual: truth[i], predicted: predicted[i] });
  }
  return { pairs, rows: kept.length };
}

/** Share of rows with lower[i] <= truth[i] <= upper[i], over the rows where all three are finite. */
export function intervalCoverage(truth: ArrayLike<number>, lower: ArrayLike<number>, upper: ArrayLike<number>, level: number): IntervalCoverage {
  let rows = 0;
  let inside = 0;
  let width = 0;
  for (let i = 0; i < truth.length; i++) {
    if (!Number.isFinite(truth[i]) || !Number.isFinite(lower[i]) || !Number.isFinite(upper[i])) continue;
    rows++;
    width += upper[i] - lower[i];
    if (truth[i] >= lower[i] && truth[i] <= upper[i]) inside++;
  }
  return { level, coverage: rows ? inside / rows : NaN, rows, meanWidth: rows ? width / rows : NaN };
}
