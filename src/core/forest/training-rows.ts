// Which rows of a saved forest's own training file trained which trees. The model keeps the seed, the number
// of training rows and the sampling settings, so the fit's holdout split and every tree's bootstrap draw can be
// drawn again; what the model does not keep (a --sample-rows load, other missing-value tokens or column types)
// could make the same file give other rows. So the recovered rows are checked against the trees themselves:
// the in-bag rows must add up to every leaf's cover, which a wrong mapping practically never does.
import { findColumn, type Table } from '../data/table';
import { outputCount } from '../model/schema';
import { drawSample, sampleSize } from './bootstrap';
import { rowWeights, splitRows } from './fit';
import type { Forest } from './forest';
import { leafOf, levelCounts } from './predict';
import { codesFor, encodeTarget } from './target';

/** Row walks spent checking covers: whole trees until this many (at least one tree), so a large file stays quick. */
const CHECK_WALKS = 4_000_000;

export interface RecoveredDraws {
  /** Table rows the forest was trained on, in training order. */
  readonly trainRows: Int32Array;
  /**
   * Per asked-for table row, the trees that never drew it (ascending); null for a row the forest was not
   * trained on (held out, or without a target), which no tree drew.
   */
  readonly outOfBag: Array<Int32Array | null>;
  /** Trees whose leaf covers were checked against the recovered rows. */
  readonly checkedTrees: number;
}

/**
 * The training rows of `table` (the file the forest was fitted on, read with its feature types), and for the
 * table rows asked for, the trees that never drew each. x is the whole table encoded for the forest
 * (predict.ts encodeTable). Returns why not, as the end of a sentence, when the rows cannot be told for certain.
 * The caller checks first that the file is the training file (its fingerprint).
 */
export function recoverDraws(forest: Forest, table: Table, x: Float64Array, tableRows: readonly number[]): RecoveredDraws | string {
  const { schema, params, training } = forest;
  const n = training.rows;
  if (n <= 0) return 'the model does not record its training rows.';
  const column = findColumn(table, schema.target.name);
  if (!column) return `the data has no column "${schema.target.name}", the forest's target.`;
  const task = schema.target.task;
  if (task === 'regression' && column.kind !== 'numeric') return `the column "${schema.target.name}" does not read as numbers here.`;
  const withTarget = encodeTarget(column, task).rows;
  if (withTarget.length < n) return `the forest was fitted on ${n} rows, and the file has only ${withTarget.length} with a target.`;
  // More rows than the fit trained on: a holdout (drawn again here) or a sampled load (which the check refuses).
  const { train } = splitRows(withTarget, withTarget.length - n, params.seed);

  let weight: Float64Array | undefined;
  if (task === 'classification' && params.classWeight === 'balanced') {
    const K = outputCount(schema.target);
    const all = codesFor(column, schema.target.classes ?? []);
    const codes = Int32Array.from(train, (r) => all[r]);
    if (codes.some((c) => c < 0)) return 'some training rows have a class the forest does not know.';
    weight = rowWeights({ kind: 'classes', y: codes, classes: K }, 'balanced');
  }

  const position = new Int32Array(table.rowCount).fill(-1);
  train.forEach((r, i) => (position[r] = i));
  const wanted = tableRows.map((r) => position[r]);
  const T = forest.trees.length;
  const m = sampleSize(n, params.sampleFraction);
  const p = schema.features.length;
  const counts = levelCounts(schema);
  const checkedTrees = Math.min(T, Math.max(1, Math.floor(CHECK_WALKS / n)));
  const lists: number[][] = wanted.map(() => []);
  for (let t = 0; t < T; t++) {
    const drawn = drawSample(params.seed, t, n, m, params.replace);
    if (t < checkedTrees) {
      const tree = forest.trees[t];
      const sum = new Float64Array(tree.nodeCount);
      for (let i = 0; i < n; i++) if (drawn[i] > 0) sum[leafOf(tree, counts, x, train[i] * p)] += drawn[i] * (weight ? weight[i] : 1);
      for (let v = 0; v < tree.nodeCount; v++) {
        // Covers are float32: allow their rounding, nothing more.
        if (tree.left[v] < 0 && Math.abs(sum[v] - tree.cover[v]) > 1e-6 * Math.max(1, tree.cover[v])) {
          return `its rows do not reproduce the trees (tree ${t + 1}, leaf ${v}: a cover of ${tree.cover[v]} in the forest, ${sum[v]} from these rows), so the fit read other rows of it: a sample, or other missing-value or column-type options.`;
        }
      }
    }
    wanted.forEach((at, j) => at >= 0 && drawn[at] === 0 && lists[j].push(t));
  }
  return { trainRows: train, outOfBag: lists.map((l, j) => (wanted[j] < 0 ? null : Int32Array.from(l))), checkedTrees };
}
