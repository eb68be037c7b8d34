// Builds the feature-space rows a decision-region map is scored on, and folds the scores back into cells.
// Pure: the caller scores the batches (with core's Scorer, in a worker) and feeds predictions back.
//
// Two features vary over the grid; the others are held at one reference row ('typical' = training medians
// and most frequent levels, or a chosen row). Maps averaged over rows (two-feature partial dependence) come
// from core's partialDependence2D instead, which never scores the grid row by row; both end in
// cellsFromAverages, so the two kinds of map read their cells the same way.

import type { FeatureInfo } from '../base/schema';
import { cellCentre, type MapAxis, type RegionCells } from './grid-axis';

/** More levels than this cannot be drawn one cell per level. */
export const MAX_LEVEL_CELLS = 200;

export interface AxisPlan {
  readonly feature: number;
  readonly axis: MapAxis;
  readonly n: number;
  /** Encoded value at each cell centre (a level code for level axes). */
  readonly values: Float64Array;
}

/** The axis for feature `f`, spanning its training range (numeric) or its levels. */
export function planAxis(f: number, info: FeatureInfo, encoded: Float64Array, p: number, rows: number, resolution: number): AxisPlan {
  if (info.kind !== 'numeric') {
    const levels = [...(info.levels ?? [])];
    if (levels.length === 0) throw new RangeError(`"${info.name}" has no levels to lay out on an axis.`);
    if (levels.length > MAX_LEVEL_CELLS) {
      throw new RangeError(`"${info.name}" has ${levels.length} levels; a map can show at most ${MAX_LEVEL_CELLS}.`);
    }
    const axis: MapAxis = { feature: info.name, kind: info.kind, levels };
    return { feature: f, axis, n: levels.length, values: Float64Array.from(levels, (_, i) => i) };
  }
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < rows; i++) {
    const v = encoded[i * p + f];
    if (v < min) min = v;
    if (v > max) max = v;
  }
  if (!Number.isFinite(min)) {
    min = 0;
    max = 1;
  }
  // A constant column still needs a span for the axis; half a unit either side shows the one value.
  if (max <= min) {
    min -= 0.5;
    max += 0.5;
  }
  const axis: MapAxis = { feature: info.name, kind: 'numeric', min, max };
  const values = new Float64Array(resolution);
  for (let i = 0; i < resolution; i++) values[i] = cellCentre(axis, resolution, i);
  return { feature: f, axis, n: resolution, values };
}

export interface GridPlan {
  readonly x: AxisPlan;
  readonly y: AxisPlan;
  readonly p: number;
  /** Reference rows, row-major [s * p + f]; one row unless averaging. */
  readonly base: Float64Array;
  readonly baseRows: number;
}

export interface GridBatch {
  readonly x: Float64Array;
  readonly rows: number;
  /** Which reference rows this batch covers: [from, to). */
  readonly from: number;
  readonly to: number;
}

/**
 * Yields scoring batches: each holds whole copies of the grid, one per reference row, so a batch never splits
 * a copy and memory stays near `maxRows * p` numbers however many rows are averaged.
 */
export function* gridBatches(plan: GridPlan, maxRows = 65_536): Generator<GridBatch> {
  const { x, y, p } = plan;
  const cells = x.n * y.n;
  const perBatch = Math.max(1, Math.floor(maxRows / cells));
  for (let from = 0; from < plan.baseRows; from += perBatch) {
    const to = Math.min(plan.baseRows, from + perBatch);
    const rows = (to - from) * cells;
    const out = new Float64Array(rows * p);
    let o = 0;
    for (let s = from; s < to; s++) {
      const base = plan.base.subarray(s * p, s * p + p);
      for (let j = 0; j < y.n; j++) {
        for (let i = 0; i < x.n; i++) {
          out.set(base, o);
          out[o + x.feature] = x.values[i];
          out[o + y.feature] = y.values[j];
          o += p;
        }
      }
    }
    yield { x: out, rows, from, to };
  }
}

/** Sums predictions per cell over reference rows, then reads off the region cells. */
export class GridAccumulator {
  private readonly sums: Float64Array;
  private copies = 0;

  constructor(
    private readonly task: 'classification' | 'regression',
    private readonly classes: number,
    private readonly cells: number,
  ) {
    this.sums = new Float64Array(cells * (task === 'classification' ? classes : 1));
  }

  /** `proba` (rows * K) for classification or `value` (rows) for regression, for one batch. */
  add(batch: Pick<GridBatch, 'rows'>, scored: { proba?: Float64Array; value?: Float64Array }): void {
    const K = this.task === 'classification' ? this.classes : 1;
    const src = this.task === 'classification' ? scored.proba : scored.value;
    if (!src || src.length !== batch.rows * K) throw new RangeError('grid scores do not match the batch');
    for (let r = 0; r < batch.rows; r++) {
      const c = r % this.cells;
      for (let k = 0; k < K; k++) this.sums[c * K + k] += src[r * K + k];
    }
    this.copies += batch.rows / this.cells;
  }

  finish(): RegionCells {
    const n = this.copies || 1;
    const K = this.task === 'classification' ? this.classes : 1;
    return cellsFromAverages(this.task, K, this.cells, this.sums.map((s) => s / n));
  }
}

/** Map cells from averaged outputs per cell ([c * outputs + k]): the class with the largest mean probability, or the mean value. */
export function cellsFromAverages(task: 'classification' | 'regression', outputs: number, cells: number, values: ArrayLike<number>): RegionCells {
  if (task === 'regression') return { task, value: Array.from({ length: cells }, (_, c) => values[c]) };
  const predicted = new Array<number>(cells);
  const strength = new Array<number>(cells);
  for (let c = 0; c < cells; c++) {
    let best = -1;
    let bestP = 0;
    for (let k = 0; k < outputs; k++) {
      const v = values[c * outputs + k];
      if (v > bestP) {
        best = k;
        bestP = v;
      }
    }
    predicted[c] = best;
    strength[c] = bestP;
  }
  return { task, predicted, strength };
}

/** Index pairs (a < b) among the first `k` features of `ranked`, most important pairs first. */
export function topPairs(ranked: readonly number[], k: number): Array<[number, number]> {
  const top = ranked.slice(0, k);
  const out: Array<[number, number]> = [];
  for (let a = 0; a < top.length; a++) for (let b = a + 1; b < top.length; b++) out.push([top[a], top[b]]);
  return out;
}

/** Feature indices by importance, best first: permutation where it was computed, impurity otherwise. */
export function rankFeatures(permutation: Float64Array, impurity: Float64Array): number[] {
  const p = impurity.length;
  const usePerm = permutation.length === p && Array.from(permutation).some((v) => Number.isFinite(v));
  const score = (f: number): number => {
    const v = usePerm ? permutation[f] : impurity[f];
    return Number.isFinite(v) ? v : -Infinity;
  };
  return Array.from({ length: p }, (_, f) => f).sort((a, b) => score(b) - score(a) || a - b);
}
