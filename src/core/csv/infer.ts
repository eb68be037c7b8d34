// From a streamed column to its final kind, or to the reason it is left out.

import type { Column, ColumnKind, DroppedColumn, LevelColumn } from '../data/table';
import type { ColumnBuilder } from './column-builder';
import { DataError } from './types';
import { count, plural, q } from './wording';

/** Share of non-missing cells that may be text in a column still read as numeric (common practice: a few typos). */
export const STRAY_TEXT_SHARE = 0.05;

const BOOLEAN_PAIRS: readonly (readonly [string, string])[] = [
  ['false', 'true'],
  ['no', 'yes'],
  ['f', 't'],
  ['n', 'y'],
  // Never met by inference (0 and 1 read as numbers); orders a 0/1 column forced to boolean.
  ['0', '1'],
];

/** The rows that make up the table: `order[i]` is the slot of final row i (null: slot i is row i). */
export interface Rows {
  readonly order: Int32Array | null;
  readonly count: number;
  readonly lineOfRow: Int32Array;
}

export interface ColumnContext {
  readonly label: string;
  readonly maxLevels: number;
  readonly forced?: ColumnKind;
  /** The target is never dropped; its own checks happen once its missing rows are gone. */
  readonly isTarget: boolean;
}

export type Finished =
  | { readonly column: Column; readonly note?: string; readonly warning?: string }
  | { readonly dropped: DroppedColumn };

interface Survey {
  numbers: number;
  texts: number;
  missing: number;
  allIntegers: boolean;
  min: number;
  max: number;
  /** Final row index of the first text cell, -1 if none. */
  firstText: number;
}

function slotOf(rows: Rows, i: number): number {
  return rows.order === null ? i : rows.order[i];
}

function survey(b: ColumnBuilder, rows: Rows): Survey {
  const s: Survey = { numbers: 0, texts: 0, missing: 0, allIntegers: true, min: Infinity, max: -Infinity, firstText: -1 };
  const values = b.values;
  for (let i = 0; i < rows.count; i++) {
    const slot = slotOf(rows, i);
    const v = values[slot];
    if (v === v) {
      s.numbers++;
      if (v < s.min) s.min = v;
      if (v > s.max) s.max = v;
      if (s.allIntegers && !Number.isInteger(v)) s.allIntegers = false;
    } else if (b.isText(slot)) {
      s.texts++;
      if (s.firstText < 0) s.firstText = i;
    } else {
      s.missing++;
    }
  }
  return s;
}

function gather(source: Float64Array, rows: Rows): Float64Array {
  if (rows.order === null) return source.slice(0, rows.count);
  const out = new Float64Array(rows.count);
  for (let i = 0; i < rows.count; i++) out[i] = source[rows.order[i]];
  return out;
}

function distinctSorted(values: Float64Array): number {
  let n = 0;
  const sorted = values.sort();
  for (let i = 0; i < sorted.length; i++) {
    const v = sorted[i];
    if (v !== v) break; // NaN sorts last
    if (i === 0 || v !== sorted[i - 1]) n++;
  }
  return n;
}

function allDistinct(values: Float64Array): boolean {
  const sorted = values.slice().sort();
  for (let i = 1; i < sorted.length; i++) if (sorted[i] === sorted[i - 1]) return false;
  return true;
}

/** Distinct non-missing values of a column whose dictionary was dropped: numbers by value, text by hash. */
function distinctWithoutCodes(b: ColumnBuilder, rows: Rows): number {
  let n = distinctSorted(gather(b.values, rows));
  if (b.textHash !== null) n += distinctSorted(gather(b.textHash, rows));
  return n;
}

/** Codes for the final rows with levels renumbered by first appearance, unused ones gone. */
export function compactLevels(codesBySlot: Int32Array, levels: readonly string[], rows: Rows): { codes: Int32Array; levels: string[] } {
  const renumber = new Int32Array(levels.length).fill(-1);
  const kept: string[] = [];
  const codes = new Int32Array(rows.count);
  for (let i = 0; i < rows.count; i++) {
    const c = codesBySlot[slotOf(rows, i)];
    if (c < 0) {
      codes[i] = -1;
      continue;
    }
    let r = renumber[c];
    if (r < 0) {
      r = kept.length;
      renumber[c] = r;
      kept.push(levels[c]);
    }
    codes[i] = r;
  }
  return { codes, levels: kept };
}

/** Levels merged case-insensitively into at most two, ordered false-like then true-like when they are a known pair. */
function asBoolean(codes: Int32Array, levels: readonly string[]): { codes: Int32Array; levels: string[] } | undefined {
  const lower = levels.map((l) => l.toLowerCase());
  const distinct = [...new Set(lower)];
  if (distinct.length > 2) return undefined;
  const pair = BOOLEAN_PAIRS.find(([f, t]) => distinct.every((d) => d === f || d === t));
  const order = pair ? pair.filter((p) => distinct.includes(p)) : distinct;
  const spelled = order.map((key) => levels[lower.indexOf(key)]);
  const map = lower.map((l) => order.indexOf(l));
  const merged = new Int32Array(codes.length);
  for (let i = 0; i < codes.length; i++) merged[i] = codes[i] < 0 ? -1 : map[codes[i]];
  return { codes: merged, levels: spelled };
}

function isKnownBooleanPair(levels: readonly string[]): boolean {
  const distinct = [...new Set(levels.map((l) => l.toLowerCase()))];
  return distinct.length === 2 && BOOLEAN_PAIRS.some(([f, t]) => distinct.includes(f) && distinct.includes(t));
}

function drop(name: string, reason: string): Finished {
  return { dropped: { name, reason } };
}

function numberText(v: number): string {
  return String(v);
}

export function finishColumn(b: ColumnBuilder, rows: Rows, ctx: ColumnContext): Finished {
  const s = survey(b, rows);
  const name = b.name;
  const nonMissing = s.numbers + s.texts;
  const free = !ctx.isTarget && ctx.forced === undefined; // may be dropped by the rules below
  const lineOf = (i: number): number => rows.lineOfRow[i];

  let kind: 'numeric' | 'date' | 'text';
  if (ctx.forced === 'categorical' || ctx.forced === 'boolean') kind = 'text';
  else if (s.texts === 0) kind = 'numeric';
  else if (s.numbers === 0 && b.dates !== null) kind = 'date';
  else if (ctx.forced === 'numeric') {
    if (s.numbers === 0) {
      throw new DataError(
        `${ctx.label}: column ${q(name)} is set to numeric, but none of its ${count(nonMissing)} non-missing cells is a number (line ${lineOf(s.firstText)} has ${q(exampleText(b, rows, s.firstText))}).`,
      );
    }
    kind = 'numeric';
  } else if (s.numbers > 0 && s.texts <= STRAY_TEXT_SHARE * nonMissing) kind = 'numeric';
  else kind = 'text';

  if (free && nonMissing === 0) return drop(name, `empty: every one of the ${count(rows.count)} cells is missing`);

  if (kind === 'numeric') {
    const values = gather(b.values, rows);
    let warning: string | undefined;
    if (s.texts > 0) {
      const example = exampleText(b, rows, s.firstText);
      warning =
        `${ctx.label}: column ${q(name)} is numeric, but ${plural(s.texts, 'cell')} of text became missing` +
        ` (the first on line ${lineOf(s.firstText)}${example ? `: ${q(example)}` : ''}).`;
    }
    if (free) {
      if (s.min === s.max) return drop(name, `constant: every non-missing value is ${numberText(s.min)}`);
      if (
        s.allIntegers &&
        s.missing === 0 &&
        s.texts === 0 &&
        rows.count >= 2 &&
        s.max - s.min + 1 >= rows.count &&
        allDistinct(values)
      ) {
        return drop(name, `looks like a row identifier: each of the ${count(rows.count)} rows has a different whole number`);
      }
    }
    return { column: { name, kind: 'numeric', values }, warning };
  }

  if (kind === 'date') {
    const values = gather(b.dates as Float64Array, rows);
    let min = Infinity;
    let max = -Infinity;
    let withTime = false;
    for (let i = 0; i < values.length; i++) {
      const v = values[i];
      if (v !== v) continue;
      if (v < min) min = v;
      if (v > max) max = v;
      if (!withTime && !Number.isInteger(v)) withTime = true;
    }
    if (free && min === max) return drop(name, `constant: every non-missing value is the same date`);
    const note = `Column ${q(name)} holds ISO dates: read as days since 1970-01-01${withTime ? ', with the time of day as a fraction' : ''}.`;
    return { column: { name, kind: 'numeric', values }, note };
  }

  // Text: categorical or boolean.
  if (b.codes === null || b.levels === null) {
    // Only columns that may be dropped lose their dictionary (the others have no level limit).
    const distinct = distinctWithoutCodes(b, rows);
    if (s.missing === 0 && distinct === rows.count) {
      return drop(name, `looks like a row identifier: each of the ${count(rows.count)} rows has a different value`);
    }
    return drop(name, `free text or identifier-like: ${count(distinct)} distinct values`);
  }
  const compact = compactLevels(b.codes, b.levels, rows);
  if (ctx.forced === 'boolean') {
    const asBool = asBoolean(compact.codes, compact.levels);
    if (asBool === undefined) {
      throw new DataError(
        `${ctx.label}: column ${q(name)} is set to boolean, but it has ${count(compact.levels.length)} distinct values (${compact.levels.slice(0, 4).map(q).join(', ')}${compact.levels.length > 4 ? ', …' : ''}), not two.`,
      );
    }
    return { column: levelColumn(name, 'boolean', asBool) };
  }
  if (ctx.forced === undefined && isKnownBooleanPair(compact.levels)) {
    return { column: levelColumn(name, 'boolean', asBoolean(compact.codes, compact.levels) as { codes: Int32Array; levels: string[] }) };
  }
  if (free) {
    if (compact.levels.length === 1) return drop(name, `constant: every non-missing value is ${q(compact.levels[0])}`);
    if (s.missing === 0 && compact.levels.length === rows.count && rows.count >= 2) {
      return drop(name, `looks like a row identifier: each of the ${count(rows.count)} rows has a different value`);
    }
    if (compact.levels.length > ctx.maxLevels) {
      return drop(name, `free text or identifier-like: ${count(compact.levels.length)} distinct values`);
    }
  }
  return { column: levelColumn(name, 'categorical', compact) };
}

function levelColumn(name: string, kind: 'categorical' | 'boolean', data: { codes: Int32Array; levels: string[] }): LevelColumn {
  return { name, kind, codes: data.codes, levels: data.levels };
}

/**
 * The text of final row i's cell if it can still be told: its level while codes are kept, or the first text the
 * column ever saw when the rows are all the rows admitted, in order (then that is this cell); else ''.
 */
function exampleText(b: ColumnBuilder, rows: Rows, i: number): string {
  if (b.codes !== null && b.levels !== null) {
    const c = b.codes[slotOf(rows, i)];
    return c >= 0 ? b.levels[c] : '';
  }
  return rows.order === null ? b.firstText : '';
}
