// Scoring a forest's own training file. Most trees drew each of its rows and fitted them closely, so what all
// the trees say about such a row looks better than the forest is; the trees that never drew the row give the
// honest answer. Here the command line finds out whether DATA.csv is that file and, if so, which trees drew
// which row (core recovers that from the forest's seed and checks it against the trees), so predict and votes
// can lead with the honest answer.
import type { LoadResult } from '../core/csv/types';
import { cellText, findColumn, type Column } from '../core/data/table';
import { checkedDraws } from '../core/forest/checked-draws';
import type { Forest } from '../core/forest/forest';
import type { Membership } from '../core/forest/predict';
import { membershipOf, type RowRole } from '../core/forest/row-votes';
import { knowsTraining } from '../core/open/open';

export interface TrainingView {
  /** Which table rows the forest trained on, and how often each tree drew them. */
  readonly membership: Membership;
  /** Table rows the fit held out. */
  readonly holdout: ReadonlySet<number>;
}

export interface Training {
  /** Present when DATA.csv is the forest's training file, read as the fit read it. */
  readonly view?: TrainingView;
  /** Why the training rows cannot be told although the file is the training file, as the end of a sentence. */
  readonly unknown?: string;
}

/** True when the loaded file is the one the forest was fitted on (its bytes' fingerprint is the model's). */
function isTrainingFile(forest: Forest, loaded: LoadResult): boolean {
  return knowsTraining(forest) && forest.training.fingerprint !== '' && forest.training.fingerprint === loaded.fingerprint;
}

/**
 * The training rows of DATA.csv, when it is the forest's training file: recovered from the seed over the whole
 * table (training rows are drawn from all rows with a target), and checked against the trees' leaf covers so a
 * file read otherwise than the fit read it (a sample, other options) is told rather than shown wrong answers.
 * `encoded` is the whole table encoded for the forest.
 */
export function trainingOf(forest: Forest, loaded: LoadResult, encoded: Float64Array): Training {
  if (!isTrainingFile(forest, loaded)) return {};
  const table = loaded.table;
  if (!findColumn(table, forest.schema.target.name)) {
    const dropped = loaded.dropped.find((d) => d.name === forest.schema.target.name);
    return { unknown: `its column "${forest.schema.target.name}" was left out${dropped ? ` (${dropped.reason})` : ''}.` };
  }
  // The checked draws are the recovered ones: no second draw from the seed.
  const rows = checkedDraws(forest, table, encoded, loaded.fingerprint, []);
  if (typeof rows === 'string') return { unknown: rows };
  return { view: { membership: membershipOf(rows.trainRows, table.rowCount, rows.inBag), holdout: new Set(rows.holdoutRows ?? []) } };
}

/** The membership of chosen table rows only, for scoring those rows alone; rows keep their training index. */
export function membershipOfRows(m: Membership, tableRows: readonly number[]): Membership {
  return { trainPos: Int32Array.from(tableRows, (r) => m.trainPos[r]), trainCount: m.trainCount, inBag: m.inBag };
}

/** The label as written in the file; a number for regression; undefined when missing or absent. */
export function labelOf(forest: Forest, target: Column | undefined, r: number): string | number | undefined {
  if (!target) return undefined;
  const text = cellText(target, r);
  if (text === '') return undefined;
  return forest.schema.target.task === 'regression' ? Number(text) : text;
}

/** Our names for a row's part in the fit. */
export type Role = 'training' | 'holdout' | 'other';

export function roleName(role: RowRole): Role {
  return role === 'scored' ? 'other' : role;
}
