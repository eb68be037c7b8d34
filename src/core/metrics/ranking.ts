// How well probabilities rank rows: ROC and precision-recall curves and the areas under them, for one class
// against the rest. Ties follow scikit-learn 1.2.1's `_binary_clf_curve`: rows with equal scores enter the
// curve together, as one step, so tied rows count half in the ROC area (the Mann-Whitney convention).

/** One point per distinct score, highest first: rows scoring at least `threshold`, split by truth. */
export interface BinaryCurve {
  readonly thresholds: Float64Array;
  /** Positives among the rows scoring at least thresholds[j]. */
  readonly truePositives: Float64Array;
  readonly falsePositives: Float64Array;
  readonly positives: number;
  readonly negatives: number;
}

/** scores[i] for the rows whose `isPositive` is known; both arrays the same length. */
export function binaryCurve(scores: ArrayLike<number>, isPositive: ArrayLike<boolean | number>): BinaryCurve {
  const n = scores.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => scores[b] - scores[a]);
  const thresholds: number[] = [];
  const tp: number[] = [];
  const fp: number[] = [];
  let t = 0;
  let f = 0;
  for (let j = 0; j < n; j++) {
    const i = order[j];
    if (isPositive[i]) t++;
    else f++;
    if (j === n - 1 || scores[order[j + 1]] !== scores[i]) {
      thresholds.push(scores[i]);
      tp.push(t);
      fp.push(f);
    }
  }
  return { thresholds: Float64Array.from(thresholds), truePositives: Float64Array.from(tp), falsePositives: Float64Array.from(fp), positives: t, negatives: f };
}

/** Area under the ROC curve by the trapezoid rule from (0, 0); NaN when either class is absent. */
export function rocAuc(c: BinaryCurve): number {
  if (c.positives === 0 || c.negatives === 0) return NaN;
  let area = 0;
  let x0 = 0;
  let y0 = 0;
  for (let j = 0; j < c.thresholds.length; j++) {
    const x = c.falsePositives[j] / c.negatives;
    const y = c.truePositives[j] / c.positives;
    area += ((x - x0) * (y + y0)) / 2;
    x0 = x;
    y0 = y;
  }
  return area;
}

/**
 * Average precision: the precision-recall curve as a step function, sum over thresholds of
 * (recall gained) × (precision there), with no interpolation, as scikit-learn's `average_precision_score`
 * computes it. NaN when there is no positive row.
 */
export function averagePrecision(c: BinaryCurve): number {
  if (c.positives === 0) return NaN;
  let ap = 0;
  let r0 = 0;
  for (let j = 0; j < c.thresholds.length; j++) {
    const r = c.truePositives[j] / c.positives;
    const flagged = c.truePositives[j] + c.falsePositives[j];
    ap += (r - r0) * (c.truePositives[j] / flagged);
    r0 = r;
  }
  return ap;
}

export interface RocPoint {
  readonly threshold: number;
  readonly falsePositiveRate: number;
  readonly truePositiveRate: number;
}

export interface PrecisionRecallPoint {
  readonly threshold: number;
  readonly recall: number;
  readonly precision: number;
}

/** The ROC curve from (0, 0) (threshold +Infinity: no row flagged) to (1, 1), at most `limit` points. */
export function rocPoints(c: BinaryCurve, limit = CURVE_POINTS): RocPoint[] {
  if (c.positives === 0 || c.negatives === 0) return [];
  const all: RocPoint[] = [{ threshold: Infinity, falsePositiveRate: 0, truePositiveRate: 0 }];
  c.thresholds.forEach((threshold, j) => all.push({ threshold, falsePositiveRate: c.falsePositives[j] / c.negatives, truePositiveRate: c.truePositives[j] / c.positives }));
  return thin(all, limit, (p) => [p.falsePositiveRate, p.truePositiveRate]);
}

/**
 * Precision against recall, highest threshold first, at most `limit` points; it starts, as scikit-learn's
 * `precision_recall_curve` ends, at recall 0 and precision 1 (threshold +Infinity: no row flagged).
 */
export function precisionRecallPoints(c: BinaryCurve, limit = CURVE_POINTS): PrecisionRecallPoint[] {
  if (c.positives === 0) return [];
  const start: PrecisionRecallPoint = { threshold: Infinity, recall: 0, precision: 1 };
  const all = [start, ...Array.from(c.thresholds, (threshold, j) => ({
    threshold,
    recall: c.truePositives[j] / c.positives,
    precision: c.truePositives[j] / (c.truePositives[j] + c.falsePositives[j]),
  }))];
  return thin(all, limit, (p) => [p.recall, p.precision]);
}

/** Points the JSON and the panel carry per curve: enough to draw it; the areas come from every point. */
export const CURVE_POINTS = 200;

/**
 * Keeps the first and last points and any point at least 1/limit (in the sum of both coordinates' moves)
 * from the last one kept, so a curve over a million rows stays a few hundred points and keeps its shape.
 */
export function thin<T>(points: readonly T[], limit: number, at: (p: T) => readonly [number, number]): T[] {
  if (points.length <= limit) return points.slice();
  const step = 2 / limit;
  const kept: T[] = [points[0]];
  let [x0, y0] = at(points[0]);
  for (let j = 1; j < points.length - 1; j++) {
    const [x, y] = at(points[j]);
    if (Math.abs(x - x0) + Math.abs(y - y0) >= step) {
      kept.push(points[j]);
      x0 = x;
      y0 = y;
    }
  }
  kept.push(points[points.length - 1]);
  return kept;
}
