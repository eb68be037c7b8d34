// Whether probabilities can be read as probabilities: the Brier score and the calibration (reliability) curve.

/**
 * Brier score over rows (Brier 1950, "Verification of forecasts expressed in terms of probability",
 * Monthly Weather Review 78(1)): for two classes, the mean squared difference between the second class's
 * probability and whether the row is of that class, as scikit-learn's `brier_score_loss` computes it (0 best,
 * 1 worst); for more classes, the mean over rows of the squared differences summed over classes against the
 * one-hot label (Brier's own form, 0 best, 2 worst). Two classes in the summed form give twice the first.
 * proba: rows * K; rows where include(i) is false, or whose truth is negative, are left out.
 */
export function brierScore(truth: ArrayLike<number>, proba: ArrayLike<number>, K: number, include?: (i: number) => boolean): number {
  let sum = 0;
  let rows = 0;
  for (let i = 0; i < truth.length; i++) {
    if ((include && !include(i)) || truth[i] < 0) continue;
    rows++;
    if (K === 2) {
      sum += ((truth[i] === 1 ? 1 : 0) - proba[i * 2 + 1]) ** 2;
      continue;
    }
    for (let k = 0; k < K; k++) sum += ((truth[i] === k ? 1 : 0) - proba[i * K + k]) ** 2;
  }
  return rows ? sum / rows : NaN;
}

export type BinRule = 'equal-width' | 'equal-count';

export interface CalibrationBin {
  /** Edges of the bin: a row falls in it when lower < p <= upper (the lowest bin also takes p = lower). */
  readonly lower: number;
  readonly upper: number;
  readonly rows: number;
  /** Mean predicted probability of the rows in the bin. */
  readonly meanPredicted: number;
  /** Share of those rows that are of the class. */
  readonly observed: number;
}

/** Bins per calibration curve unless asked otherwise (common practice). */
export const CALIBRATION_BINS = 10;

/**
 * The calibration curve of probabilities p against whether each row is of the class, in `bins` bins: of equal
 * width on [0, 1], or with equal counts (edges at the linear-interpolation percentiles of p). Bin membership
 * and edges follow scikit-learn 1.2.1's `calibration_curve` (numpy's `searchsorted` on the inner edges, and
 * numpy's percentile), so its figures can be checked to the last digit; unlike it, empty bins are kept
 * (with NaN means) and every bin states its count.
 */
export function calibrationCurve(p: ArrayLike<number>, positive: ArrayLike<boolean | number>, rule: BinRule, bins = CALIBRATION_BINS): CalibrationBin[] {
  const n = p.length;
  if (n === 0) return [];
  const edges = rule === 'equal-width' ? Array.from({ length: bins + 1 }, (_, i) => i * (1 / bins)) : percentileEdges(p, bins);
  const sums = new Float64Array(bins);
  const hits = new Float64Array(bins);
  const counts = new Float64Array(bins);
  for (let i = 0; i < n; i++) {
    // searchsorted(edges[1:-1], p, side='left'): the number of inner edges strictly below p.
    let b = 0;
    while (b < bins - 1 && edges[b + 1] < p[i]) b++;
    sums[b] += p[i];
    counts[b]++;
    if (positive[i]) hits[b]++;
  }
  return Array.from({ length: bins }, (_, b) => ({
    lower: edges[b],
    upper: edges[b + 1],
    rows: counts[b],
    meanPredicted: counts[b] ? sums[b] / counts[b] : NaN,
    observed: counts[b] ? hits[b] / counts[b] : NaN,
  }));
}

/** numpy 1.24's percentile (method "linear") at 0, 100/bins, ..., 100, as calibration_curve asks for them. */
function percentileEdges(p: ArrayLike<number>, bins: number): number[] {
  const sorted = Float64Array.from(p).sort();
  const last = sorted.length - 1;
  return Array.from({ length: bins + 1 }, (_, i) => {
    const q = (i * (1 / bins) * 100) / 100;
    const h = q * last;
    const lo = Math.floor(h);
    const t = h - lo;
    const a = sorted[lo];
    const b = sorted[Math.min(last, lo + 1)];
    const diff = b - a;
    // numpy's _lerp: from the nearer end, so the result stays between a and b.
    return t >= 0.5 ? b - diff * (1 - t) : a + diff * t;
  });
}
