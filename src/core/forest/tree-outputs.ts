// What each tree of a boosted ensemble adds on one row: its own raw score (the leaf the row reaches, in the
// margin's units) and the running total of the output it serves, from the base score on. This is the boosted
// counterpart of a forest's per-tree votes, for `copse votes` and the editor's per-tree view.
import { outputCount } from '../base/schema';
import { treeRawOutput } from './boosting';
import type { Forest } from './forest';
import { leafOf, levelCounts } from './predict';

export interface TreeOutputs {
  /** Per tree: the output (class index, 0 for a value) it adds to. */
  readonly output: Int32Array;
  /** Per tree: its raw score on the row. */
  readonly raw: Float64Array;
  /** Per tree: the raw score of its output after it and every earlier tree, base score included. */
  readonly cumulative: Float64Array;
  /** Per output: the base score, and the final raw score (base plus every tree). */
  readonly base: Float64Array;
  readonly total: Float64Array;
}

/** Each tree's raw output on the encoded row at x[offset..offset+p); the forest must be boosted. */
export function treeOutputs(forest: Forest, x: ArrayLike<number>, offset: number): TreeOutputs {
  const b = forest.boosting;
  if (!b) throw new RangeError('Per-tree raw scores belong to a boosted ensemble; a forest\'s trees vote.');
  const K = outputCount(forest.schema.target);
  const T = forest.trees.length;
  const counts = levelCounts(forest.schema);
  const output = Int32Array.from(b.treeOutput);
  const raw = new Float64Array(T);
  const cumulative = new Float64Array(T);
  const base = Float64Array.from({ length: K }, (_, k) => b.base[k]);
  const total = base.slice();
  for (let t = 0; t < T; t++) {
    raw[t] = treeRawOutput(forest, t, leafOf(forest.trees[t], counts, x, offset), K);
    total[output[t]] += raw[t];
    cumulative[t] = total[output[t]];
  }
  return { output, raw, cumulative, base, total };
}
