// The trees that never drew chosen rows of a forest's own training file, for explaining a training row by the
// trees that never saw it. membership.ts recovers the training rows and every tree's draw from the seed; what
// the model does not record (a load on a sample of the file, other missing-value tokens or column types, and
// for files written before it was kept, the holdout's size) could still make the same file give other rows.
// So the draws are checked against the trees themselves: the in-bag rows must add up to every leaf's cover,
// which a wrong mapping practically never does.
import { outputCount } from '../base/schema';
import { findColumn, type Table } from '../data/table';
import { outOfBagTrees } from './bootstrap';
import { rowWeights } from './fit';
import type { Forest } from './forest';
import { trainingRowsIn, type TrainingRows } from './membership';
import { leafOf, levelCounts } from './predict';
import { membershipOf } from './row-votes';
import { codesFor } from './target';

/** Row walks spent checking covers: whole trees until this many (at least one tree), so a large file stays quick. */
const CHECK_WALKS = 4_000_000;

/** The recovered training rows and draws (see membership.ts), once checked against the trees. */
export interface CheckedDraws extends TrainingRows {
  /**
   * Per asked-for table row, the trees that never drew it (ascending); null for a row the forest was not
   * trained on (held out, or without a target), which no tree drew.
   */
  readonly outOfBag: Array<Int32Array | null>;
  /** Trees whose leaf covers were checked against the recovered rows. */
  readonly checkedTrees: number;
}

/**
 * The out-of-bag trees of the given rows of `table`, the file the forest was fitted on read with its feature
 * types (fingerprint: the file's, or null when the caller vouches for it; see membership.ts). x is the whole
 * table encoded for the forest (predict.ts encodeTable). Returns why not, as the end of a sentence, when the
 * rows cannot be told for certain.
 */
export function checkedDraws(forest: Forest, table: Table, x: Float64Array, fingerprint: string | null, tableRows: readonly number[]): CheckedDraws | string {
  const recovered = trainingRowsIn(forest, table, fingerprint);
  if ('unknown' in recovered) return `${recovered.unknown}.`;
  const { trainRows, inBag } = recovered;
  const { schema, params } = forest;
  const n = trainRows.length;
  const T = forest.trees.length;

  let weight: Float64Array | undefined;
  if (schema.target.task === 'classification' && params.classWeight === 'balanced') {
    const all = codesFor(findColumn(table, schema.target.name)!, schema.target.classes ?? []);
    const codes = Int32Array.from(trainRows, (r) => all[r]);
    if (codes.some((c) => c < 0)) return 'some training rows have a class the forest does not know.';
    weight = rowWeights({ kind: 'classes', y: codes, classes: outputCount(schema.target) }, 'balanced');
  }
  const p = schema.features.length;
  const counts = levelCounts(schema);
  const checkedTrees = Math.min(T, Math.max(1, Math.floor(CHECK_WALKS / n)));
  for (let t = 0; t < checkedTrees; t++) {
    const tree = forest.trees[t];
    const sum = new Float64Array(tree.nodeCount);
    for (let i = 0; i < n; i++) {
      const drawn = inBag[t * n + i];
      if (drawn > 0) sum[leafOf(tree, counts, x, trainRows[i] * p)] += drawn * (weight ? weight[i] : 1);
    }
    for (let v = 0; v < tree.nodeCount; v++) {
      // Covers are float32: allow their rounding, nothing more.
      if (tree.left[v] < 0 && Math.abs(sum[v] - tree.cover[v]) > 1e-6 * Math.max(1, tree.cover[v])) {
        return `its rows do not reproduce the trees (tree ${t + 1}, leaf ${v}: a cover of ${tree.cover[v]} in the forest, ${sum[v]} from these rows), so the fit read other rows of it: a sample, or other missing-value or column-type options.`;
      }
    }
  }
  const position = membershipOf(trainRows, table.rowCount, inBag).trainPos;
  const outOfBag = tableRows.map((r) => (position[r] < 0 ? null : outOfBagTrees(inBag, T, n, position[r])));
  return { ...recovered, outOfBag, checkedTrees };
}
