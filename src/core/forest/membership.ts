// Which rows of a table a saved forest trained on, and how each tree drew them, recovered from the forest's
// seed. A fit draws its holdout and every tree's bootstrap sample from named streams of its seed (rng.ts), so
// the same rows, read again, give back the same draws: a forest opened against its own training file can show
// out-of-bag votes, margins and doubtful rows exactly as the fit did.

import { findColumn, type Table } from '../data/table';
import { inBagCounts } from './bootstrap';
import { splitRows } from './fit';
import type { Forest } from './forest';
import { encodeTarget } from './target';

/** The end of every sentence about what an imported forest cannot show: one wording for hover, panel and summary. */
export const UNAVAILABLE_FOR_IMPORT = 'unavailable for an imported forest: its file carries no training sample';

export interface TrainingRows {
  /** Table rows the forest trained on, in training order. */
  readonly trainRows: Int32Array;
  /** Table rows the fit held out of training. */
  readonly holdoutRows?: Int32Array;
  /** Tree-major in-bag counts over the training rows (inBag[t * trainRows.length + i]). */
  readonly inBag: Uint8Array;
}

/**
 * The training rows of `forest` in `table`, or why they cannot be known. The table must be the training file
 * itself (same fingerprint) read the way the fit read it (same rows), so that the rows with a target and the
 * holdout drawn from them are the fit's.
 */
export function trainingRowsIn(forest: Forest, table: Table, fingerprint: string | null): TrainingRows | { readonly unknown: string } {
  const { training, schema, params } = forest;
  if (training.rows === 0) return { unknown: `out-of-bag figures are ${UNAVAILABLE_FOR_IMPORT}` };
  // null: the caller vouches that the table is the training data (a test, or a table already checked).
  if (fingerprint !== null && (training.fingerprint === '' || training.fingerprint !== fingerprint)) {
    return { unknown: 'this file is not the one the forest was trained on' };
  }
  const column = findColumn(table, schema.target.name);
  if (!column) return { unknown: `this file has no column "${schema.target.name}"` };
  let withTarget: Int32Array;
  try {
    withTarget = encodeTarget(column, schema.target.task).rows;
  } catch {
    return { unknown: `"${schema.target.name}" does not read as it did when the forest was fitted` };
  }
  // A file read differently (a sample of it, say) has other rows with a target, and its holdout would be drawn wrong.
  const expected = training.heldOut === undefined ? undefined : training.rows + training.heldOut;
  if (withTarget.length < training.rows || (expected !== undefined && withTarget.length !== expected)) {
    return { unknown: `the forest was fitted on ${training.rows} rows; this reading of the data has ${withTarget.length < training.rows ? 'only ' : ''}${withTarget.length} with a target` };
  }
  const { train, holdout } = splitRows(withTarget, withTarget.length - training.rows, params.seed);
  return { trainRows: train, holdoutRows: holdout, inBag: inBagCounts(params, forest.trees.length, train.length) };
}
