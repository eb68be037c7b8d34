// Prediction intervals for regression forests: the quantile regression forest of Meinshausen (2006),
// "Quantile regression forests", JMLR 7, 983-999. A tree's leaf keeps the targets of the training rows that
// reached it, not only their mean; a new row's conditional distribution is the average over trees of its
// leaf's empirical distribution, and quantiles are read off that. Rows weigh by how often the tree's
// bootstrap drew them, the weighting whose mean is exactly the forest's prediction. (Pages cited from memory.)
import { loadCsv } from '../csv/load';
import { findColumn, type Table } from '../data/table';
import { inBagCounts } from '../forest/bootstrap';
import type { FitReport } from '../forest/fit';
import { trainingRowsIn } from '../forest/membership';
import type { Forest } from '../forest/forest';
import { encodeTable, leafOf, levelCounts } from '../forest/predict';
import { encodeTarget, targetOf } from '../forest/target';

export interface QuantileTraining {
  /** Target of each training row, in the fit's training order (FitReport.rows.truth). */
  readonly y: ArrayLike<number>;
  /** Tree-major: inBag[t * n + i] is how often tree t drew training row i (FitReport.rows.inBag). */
  readonly inBag: ArrayLike<number>;
  /** Tree-major: leaves[t * n + i] is the leaf of training row i in tree t (see trainingLeaves). */
  readonly leaves: Int32Array;
}

export interface QuantileIndex {
  readonly forest: Forest;
  /** Training rows. */
  readonly rows: number;
  /** Training targets in increasing order; entries below refer to positions here. */
  readonly sortedY: Float64Array;
  /** Per tree, the entries of node v are start[v] .. start[v + 1] (empty for split nodes). */
  readonly start: readonly Int32Array[];
  readonly position: readonly Int32Array[];
  /** A row's share of its leaf: times drawn / draws that reached the leaf. */
  readonly share: readonly Float64Array[];
}

export class TrainingMismatchError extends RangeError {
  constructor(message: string) {
    super(message);
    this.name = 'TrainingMismatchError';
  }
}

/** Leaf of each of `rows` encoded rows in every tree, tree-major. */
export function trainingLeaves(forest: Forest, x: ArrayLike<number>, rows: number): Int32Array {
  const p = forest.schema.features.length;
  const counts = levelCounts(forest.schema);
  const out = new Int32Array(forest.trees.length * rows);
  forest.trees.forEach((tree, t) => {
    for (let i = 0; i < rows; i++) out[t * rows + i] = leafOf(tree, counts, x, i * p);
  });
  return out;
}

/**
 * Indexes the training rows by leaf. Checks that the rows reproduce every leaf of the forest (its cover and
 * its mean), so data other than the training rows, or in another order, is refused rather than explained.
 */
export function buildQuantileIndex(forest: Forest, training: QuantileTraining): QuantileIndex {
  if (forest.schema.target.task !== 'regression') throw new RangeError('Prediction intervals are for regression forests; this forest classifies.');
  const n = training.y.length;
  const T = forest.trees.length;
  if (training.inBag.length !== T * n || training.leaves.length !== T * n) {
    throw new RangeError(`Training data for ${T} trees and ${n} rows needs ${T * n} in-bag counts and leaves; got ${training.inBag.length} and ${training.leaves.length}.`);
  }
  const order = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => training.y[a] - training.y[b] || a - b);
  const positionOf = new Int32Array(n);
  const sortedY = new Float64Array(n);
  order.forEach((row, pos) => {
    positionOf[row] = pos;
    sortedY[pos] = training.y[row];
  });
  const start: Int32Array[] = [];
  const position: Int32Array[] = [];
  const share: Float64Array[] = [];
  for (let t = 0; t < T; t++) {
    const tree = forest.trees[t];
    const base = t * n;
    const begin = new Int32Array(tree.nodeCount + 1);
    const weight = new Float64Array(tree.nodeCount);
    const sum = new Float64Array(tree.nodeCount);
    for (let i = 0; i < n; i++) {
      const c = training.inBag[base + i];
      if (c === 0) continue;
      const leaf = training.leaves[base + i];
      begin[leaf + 1]++;
      weight[leaf] += c;
      sum[leaf] += c * training.y[i];
    }
    for (let v = 0; v < tree.nodeCount; v++) {
      begin[v + 1] += begin[v];
      if (tree.left[v] >= 0) continue;
      const cover = tree.cover[v];
      const mean = weight[v] > 0 ? sum[v] / weight[v] : NaN;
      const value = tree.value[v];
      // Leaf values are float32: allow its rounding, nothing more.
      if (Math.abs(weight[v] - cover) > 1e-6 * cover || !(Math.abs(mean - value) <= 2 ** -22 * Math.abs(value) + 1e-12)) {
        throw new TrainingMismatchError(
          `These training rows do not reproduce the forest (tree ${t + 1}, leaf ${v}: ${weight[v]} draws with mean ${mean}, the forest has ${cover} with ${value}); ` +
            'use the rows, in the order and with the load options, the forest was fitted on.',
        );
      }
    }
    const fill = begin.slice(0, tree.nodeCount);
    const pos = new Int32Array(begin[tree.nodeCount]);
    const w = new Float64Array(pos.length);
    for (let i = 0; i < n; i++) {
      const c = training.inBag[base + i];
      if (c === 0) continue;
      const leaf = training.leaves[base + i];
      const at = fill[leaf]++;
      pos[at] = positionOf[i];
      w[at] = c / weight[leaf];
    }
    start.push(begin);
    position.push(pos);
    share.push(w);
  }
  return { forest, rows: n, sortedY, start, position, share };
}

/** The index for a fit still in memory: its training rows are report.trainRows of the table it was fitted on. */
export function quantileIndexFromFit(report: FitReport, table: Table): QuantileIndex {
  const { forest, trainRows } = report;
  const p = forest.schema.features.length;
  const all = encodeTable(forest.schema, table);
  const x = new Float64Array(trainRows.length * p);
  trainRows.forEach((r, i) => x.set(all.subarray(r * p, r * p + p), i * p));
  return buildQuantileIndex(forest, { y: report.rows.truth, inBag: report.rows.inBag ?? inBagCounts(forest.params, forest.trees.length, trainRows.length), leaves: trainingLeaves(forest, x, trainRows.length) });
}

/**
 * The index for a saved forest, from the table it was fitted on. A saved model keeps the seed, so each tree's
 * bootstrap draw and the holdout split can be drawn again; the rows are the table's rows with a target, less
 * the holdout, which is recovered from the row count the model records.
 */
export function quantileIndexFromTrainingTable(forest: Forest, table: Table): QuantileIndex {
  const { schema } = forest;
  const column = findColumn(table, schema.target.name);
  if (!column) throw new TrainingMismatchError(`The training data has no column "${schema.target.name}", the forest's target.`);
  if (column.kind !== 'numeric') throw new TrainingMismatchError(`The column "${schema.target.name}" is not numeric here, so this is not the data the forest was fitted on.`);
  const rows = trainingRowsIn(forest, table, null);
  if ('unknown' in rows) throw new TrainingMismatchError(`${rows.unknown[0].toUpperCase()}${rows.unknown.slice(1)}.`);
  const n = rows.trainRows.length;
  const y = targetOf(encodeTarget(column, 'regression'), rows.trainRows);
  const p = schema.features.length;
  const all = encodeTable(schema, table, 'the training data');
  const x = new Float64Array(n * p);
  rows.trainRows.forEach((r, i) => x.set(all.subarray(r * p, r * p + p), i * p));
  return buildQuantileIndex(forest, { y, inBag: rows.inBag, leaves: trainingLeaves(forest, x, n) });
}

export interface TrainingFileOptions {
  /** The missing-value tokens the fit was loaded with, when not the default. */
  readonly missingTokens?: readonly string[];
  /** The row sample the fit was loaded with (drawn again under the forest's seed). */
  readonly sampleRows?: number;
  readonly signal?: AbortSignal;
}

/**
 * The index for a saved forest from its training CSV, read with the model's column types and the load
 * options the fit used. The file must be the one the forest was fitted on (its fingerprint is compared when
 * the model has one), and its rows must reproduce every leaf, or a TrainingMismatchError says so.
 */
export async function quantileIndexFromTrainingFile(forest: Forest, file: string, options: TrainingFileOptions = {}): Promise<QuantileIndex> {
  const columnTypes = Object.create(null) as Record<string, 'numeric' | 'categorical' | 'boolean'>;
  for (const f of forest.schema.features) columnTypes[f.name] = f.kind;
  columnTypes[forest.schema.target.name] = 'numeric';
  const loaded = await loadCsv(file, {
    target: forest.schema.target.name,
    columnTypes,
    missingTokens: options.missingTokens,
    sampleRows: options.sampleRows,
    sampleSeed: forest.params.seed,
    signal: options.signal,
  });
  if (forest.training.fingerprint && loaded.fingerprint !== forest.training.fingerprint) {
    throw new TrainingMismatchError(`${file} is not the file the forest was fitted on (its contents differ), so its rows cannot give intervals.`);
  }
  return quantileIndexFromTrainingTable(forest, loaded.table);
}

/**
 * Quantiles of the forest's conditional distribution for `rows` encoded rows: out[i * probabilities.length + q].
 * The quantile at a is the smallest training target whose cumulative weight reaches a (Meinshausen 2006).
 */
export function predictQuantiles(index: QuantileIndex, x: ArrayLike<number>, rows: number, probabilities: readonly number[], useTree?: (row: number, tree: number) => boolean): Float64Array {
  for (const a of probabilities) if (!(a >= 0 && a <= 1)) throw new RangeError(`quantile levels must lie in [0, 1]; got ${a}`);
  const { forest, sortedY } = index;
  const p = forest.schema.features.length;
  const counts = levelCounts(forest.schema);
  const T = forest.trees.length;
  const Q = probabilities.length;
  const byLevel = probabilities.map((a, q) => [a, q] as const).sort((u, v) => u[0] - v[0]);
  const weight = new Float64Array(index.rows);
  const touched = new Int32Array(index.rows);
  const out = new Float64Array(rows * Q);
  // Weights are shares like 1/3 summed over trees: allow their rounding when comparing with a * T.
  const slack = 1e-12 * T;
  for (let i = 0; i < rows; i++) {
    let m = 0;
    let used = 0;
    for (let t = 0; t < T; t++) {
      // useTree: only some trees speak for this row (its out-of-bag trees, for an honest interval).
      if (useTree && !useTree(i, t)) continue;
      used++;
      const leaf = leafOf(forest.trees[t], counts, x, i * p);
      const begin = index.start[t][leaf];
      const end = index.start[t][leaf + 1];
      const pos = index.position[t];
      const share = index.share[t];
      for (let e = begin; e < end; e++) {
        const at = pos[e];
        if (weight[at] === 0) touched[m++] = at;
        weight[at] += share[e];
      }
    }
    const seen = touched.subarray(0, m).sort();
    let cumulative = 0;
    let j = 0;
    for (const [a, q] of byLevel) {
      const goal = a * used - slack;
      while (j < m - 1 && cumulative + weight[seen[j]] < goal) cumulative += weight[seen[j++]];
      out[i * Q + q] = m > 0 ? sortedY[seen[j]] : NaN;
    }
    for (let e = 0; e < m; e++) weight[seen[e]] = 0;
  }
  return out;
}

export interface PredictionInterval {
  readonly level: number;
  readonly lower: Float64Array;
  readonly upper: Float64Array;
}

/** Central interval holding `level` (e.g. 0.9) of the conditional distribution: its (1-level)/2 and (1+level)/2 quantiles. */
export function predictInterval(index: QuantileIndex, x: ArrayLike<number>, rows: number, level: number): PredictionInterval {
  if (!(level > 0 && level < 1)) throw new RangeError(`an interval level must lie strictly between 0 and 1, such as 0.9; got ${level}`);
  const q = predictQuantiles(index, x, rows, [(1 - level) / 2, (1 + level) / 2]);
  const lower = new Float64Array(rows);
  const upper = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    lower[i] = q[2 * i];
    upper[i] = q[2 * i + 1];
  }
  return { level, lower, upper };
}
