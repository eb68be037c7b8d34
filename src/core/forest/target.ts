// Turns the target column into class codes or values, and decides the task when the user has not.
import { InputError } from '../base/input-error';
import { cellText, findColumn, type Column, type Table } from '../data/table';
import type { Forest } from './forest';
import type { Task } from './params';

/** Few distinct integers in a numeric column read as class labels (common practice; the user can override). */
export const MAX_INTEGER_CLASSES = 10;

export function inferTask(column: Column): Task {
  if (column.kind !== 'numeric') return 'classification';
  const distinct = new Set<number>();
  for (const v of column.values) {
    if (Number.isNaN(v)) continue;
    if (!Number.isInteger(v)) return 'regression';
    distinct.add(v);
    if (distinct.size > MAX_INTEGER_CLASSES) return 'regression';
  }
  return 'classification';
}

export interface EncodedTarget {
  /** Rows of the table whose target is present. */
  readonly rows: Int32Array;
  /** Per kept row: class code or value. */
  readonly y: Float64Array;
  readonly classes?: string[];
}

export function encodeTarget(column: Column, task: Task): EncodedTarget {
  const n = column.kind === 'numeric' ? column.values.length : column.codes.length;
  const keep: number[] = [];
  for (let i = 0; i < n; i++) if (cellText(column, i) !== '') keep.push(i);
  const rows = Int32Array.from(keep);
  if (task === 'regression') {
    if (column.kind !== 'numeric') throw new InputError(`The target "${column.name}" is not numeric, so it cannot be fitted as a regression.`);
    return { rows, y: Float64Array.from(keep, (i) => column.values[i]) };
  }
  let classes: string[];
  if (column.kind === 'numeric') {
    classes = [...new Set(keep.map((i) => column.values[i]))].sort((a, b) => a - b).map(String);
  } else {
    const used = new Set(keep.map((i) => column.codes[i]));
    classes = column.levels.filter((_, k) => used.has(k));
  }
  const code = new Map(classes.map((c, k) => [c, k]));
  return { rows, y: Float64Array.from(keep, (i) => code.get(cellText(column, i))!), classes };
}

/** Codes of another table's target cells under known classes; -1 for a label the model never saw. */
export function codesFor(column: Column, classes: readonly string[]): Float64Array {
  const code = new Map(classes.map((c, k) => [c, k]));
  const n = column.kind === 'numeric' ? column.values.length : column.codes.length;
  return Float64Array.from({ length: n }, (_, i) => code.get(cellText(column, i)) ?? -1);
}

/** The encoded target of the given table rows, each of which must have one. */
export function targetOf(encoded: EncodedTarget, rows: Int32Array): Float64Array {
  const { rows: kept, y } = encoded;
  // A position per table row: an Int32Array rather than a Map, which costs tens of bytes per row on large files.
  const position = new Int32Array(kept.length ? kept[kept.length - 1] + 1 : 0).fill(-1);
  kept.forEach((r, i) => (position[r] = i));
  return Float64Array.from(rows, (r) => {
    const i = r < position.length ? position[r] : -1;
    if (i < 0) throw new RangeError(`Row ${r} has no target value.`);
    return y[i];
  });
}

/** The table's own target per row in the forest's codes (NaN: missing, absent, or a class the forest never saw). */
export function targetCodes(forest: Forest, table: Table): Float64Array {
  const target = forest.schema.target;
  const col = findColumn(table, target.name);
  const out = new Float64Array(table.rowCount).fill(NaN);
  if (!col) return out;
  if (target.task === 'regression') {
    if (col.kind === 'numeric') out.set(col.values);
    return out;
  }
  const code = new Map((target.classes ?? []).map((c, k) => [c, k]));
  for (let i = 0; i < table.rowCount; i++) {
    const k = code.get(cellText(col, i));
    if (k !== undefined) out[i] = k;
  }
  return out;
}
