// Whether a column can be meant as the thing to predict. A row identifier has nothing to learn, and a class
// column with a class for every few rows cannot be learnt: a forest fitted on either still prints scores, and
// they mean nothing. The command line refuses such a target and the editor can ask the same question.
// The thresholds are our own choices, stated beside each.

import { count, q } from '../csv/wording';
import type { Column } from '../data/table';
import type { Task } from '../forest/params';
import { inferTask, MAX_INTEGER_CLASSES } from '../forest/target';

/** More classes than this is refused outright (our threshold). */
export const MAX_CLASSES = 50;
/**
 * Up to this many classes, or distinct values, is never doubted: the number of distinct whole numbers the
 * loader still reads as classes, so a small table with a few labels is left alone.
 */
export const FEW_VALUES = MAX_INTEGER_CLASSES;
/** Fewer rows per class than this, on average, leaves too little to learn each class from (our threshold). */
export const ROWS_PER_CLASS = 5;

export type TargetDoubtKind = 'identifier' | 'many-classes';

export interface TargetDoubt {
  readonly kind: TargetDoubtKind;
  /** One clause naming the column and what is wrong, without advice (each caller knows its own remedy). */
  readonly message: string;
  /** Rows with a value, and distinct values among them. */
  readonly rows: number;
  readonly distinct: number;
}

/**
 * Why `column` cannot be meant as the target under `task` (inferred from the column when absent), or
 * undefined when it can. Pure counting: no fitting, one pass over the column.
 */
export function targetDoubt(column: Column, task: Task = inferTask(column)): TargetDoubt | undefined {
  const s = survey(column);
  const name = q(column.name);
  if (s.rows > FEW_VALUES && s.distinct === s.rows) {
    // A numeric column counts as an identifier only when its values are a complete run of whole numbers (1 to n,
    // say): measurements that merely never repeat (prices, times) are what regression is for.
    if (column.kind !== 'numeric') {
      return { kind: 'identifier', rows: s.rows, distinct: s.distinct, message: `${name} looks like a row identifier: each of its ${count(s.rows)} rows has a different value` };
    }
    if (s.wholeRun) {
      return {
        kind: 'identifier',
        rows: s.rows,
        distinct: s.distinct,
        message: `${name} looks like a row identifier: its ${count(s.rows)} rows number them from ${count(s.min)} to ${count(s.max)}, each once`,
      };
    }
  }
  if (task === 'classification' && s.distinct > FEW_VALUES && (s.distinct > MAX_CLASSES || s.distinct * ROWS_PER_CLASS > s.rows)) {
    const why = s.distinct > MAX_CLASSES ? `more than ${MAX_CLASSES}` : `fewer than ${ROWS_PER_CLASS} rows per class on average`;
    return {
      kind: 'many-classes',
      rows: s.rows,
      distinct: s.distinct,
      message: `${name} has ${count(s.distinct)} distinct values in ${count(s.rows)} rows, too many classes to learn (${why})`,
    };
  }
  return undefined;
}

interface Survey {
  readonly rows: number;
  readonly distinct: number;
  readonly min: number;
  readonly max: number;
  /** Numeric: every value a whole number, and max - min + 1 equal to the number of rows. */
  readonly wholeRun: boolean;
}

function survey(column: Column): Survey {
  if (column.kind === 'numeric') {
    const seen = new Set<number>();
    let rows = 0;
    let whole = true;
    let min = Infinity;
    let max = -Infinity;
    for (const v of column.values) {
      if (Number.isNaN(v)) continue;
      rows++;
      seen.add(v);
      if (!Number.isInteger(v)) whole = false;
      if (v < min) min = v;
      if (v > max) max = v;
    }
    return { rows, distinct: seen.size, min, max, wholeRun: whole && rows > 0 && max - min + 1 === rows };
  }
  const used = new Uint8Array(column.levels.length);
  let rows = 0;
  let distinct = 0;
  for (const c of column.codes) {
    if (c < 0) continue;
    rows++;
    if (used[c] === 0) {
      used[c] = 1;
      distinct++;
    }
  }
  return { rows, distinct, min: NaN, max: NaN, wholeRun: false };
}
