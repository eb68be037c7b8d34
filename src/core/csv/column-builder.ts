// One column's cells as they stream in, kept only in typed form. The kind is not known until the end, so a
// column is held as numbers and, once it shows text and while it has few distinct values, as dictionary codes.

import type { CellCleaner } from './cells';
import { looksCommaNumber, parseWithMark } from './number-marks';
import { parseDecimal, parseIsoDate } from './numbers';

const PENDING = 0; // no text seen yet: numbers alone describe the column, no dictionary is kept
const OPEN = 1; // dictionary codes are kept
const CLOSED = 2; // too many distinct values: the dictionary is gone, text cells are hashed instead

/**
 * Cells are written to slots: slot = row without sampling, a reservoir slot with it (later rows may overwrite
 * earlier ones). Per slot:
 *  - values: the number, or NaN (missing or text);
 *  - codes: index into levels, -1 missing, while the column is OPEN. Text cells are keyed by their text, number
 *    cells by their value (so '1.0' and '1' are one level, shown as '1'). A column only opens at its first text
 *    cell, so a purely numeric column never pays for a dictionary; earlier numbers are coded from their values;
 *  - textHash: once CLOSED, a 53-bit hash of each text cell (NaN otherwise), so distinct values can still be
 *    counted for the drop reason and the identifier check;
 *  - dates: days since 1970-01-01, while every non-missing cell so far is an ISO date.
 * A column forced to categorical or boolean keeps every cell's exact text ('007' stays '007') from the start.
 */
export class ColumnBuilder {
  values: Float64Array;
  codes: Int32Array | null = null;
  levels: string[] | null = null;
  textHash: Float64Array | null = null;
  dates: Float64Array | null = null;
  /** Cells admitted so far (including ones a reservoir later overwrote). */
  numbers = 0;
  texts = 0;
  /** First text cell admitted, for the stray-text warning. */
  firstText = '';
  /** Text cells that look like numbers written with a comma, and the first of them (for the loader's note). */
  commaNumbers = 0;
  firstCommaNumber = '';
  private state = PENDING;
  private textCodes: Map<string, number> | null = null;
  private numberCodes: Map<number, number> | null = null;
  private datesPossible = true;
  private filled = 0;
  private capacity: number;

  constructor(
    readonly name: string,
    capacity: number,
    private readonly levelLimit: number,
    private readonly cleaner: CellCleaner,
    private readonly exactText = false,
  ) {
    this.capacity = capacity;
    this.values = new Float64Array(capacity);
    if (exactText) this.open();
  }

  grow(capacity: number): void {
    if (capacity <= this.capacity) return;
    this.capacity = capacity;
    this.values = growFloat(this.values, capacity, 0);
    if (this.codes !== null) {
      const codes = new Int32Array(capacity);
      codes.set(this.codes);
      this.codes = codes;
    }
    if (this.textHash !== null) this.textHash = growFloat(this.textHash, capacity, NaN);
    if (this.dates !== null) this.dates = growFloat(this.dates, capacity, NaN);
  }

  add(raw: string, slot: number): void {
    if (slot >= this.filled) this.filled = slot + 1;
    const s = this.cleaner.clean(raw);
    if (s.length === 0) {
      this.values[slot] = NaN;
      if (this.codes !== null) this.codes[slot] = -1;
      if (this.textHash !== null) this.textHash[slot] = NaN;
      if (this.dates !== null) this.dates[slot] = NaN;
      return;
    }
    const mark = this.cleaner.decimalMark;
    const v = mark === undefined ? parseDecimal(s) : parseWithMark(s, mark);
    this.values[slot] = v;
    if (v === v) {
      this.numbers++;
      if (this.datesPossible) this.stopDates();
      if (this.state === OPEN) {
        const code = this.exactText ? this.textCode(s) : this.numberCode(v);
        if (this.codes !== null) this.codes[slot] = code;
      }
      if (this.textHash !== null) this.textHash[slot] = NaN;
      return;
    }
    this.texts++;
    if (this.firstText === '') this.firstText = s;
    if (mark === undefined && looksCommaNumber(s) && this.commaNumbers++ === 0) this.firstCommaNumber = s;
    if (this.datesPossible) {
      const d = parseIsoDate(s);
      if (d === d) {
        if (this.dates === null) this.dates = new Float64Array(this.capacity).fill(NaN);
        this.dates[slot] = d;
      } else {
        this.stopDates();
      }
    }
    if (this.state === PENDING) this.open();
    if (this.state === OPEN) {
      const code = this.textCode(s);
      if (this.codes !== null) {
        this.codes[slot] = code;
        return;
      }
    }
    if (this.textHash === null) this.textHash = new Float64Array(this.capacity).fill(NaN);
    this.textHash[slot] = hashText(s);
  }

  /** A cell that is a number already (a typed file's column): what `add` does once a cell has parsed, NaN missing. */
  addNumber(v: number, slot: number): void {
    if (slot >= this.filled) this.filled = slot + 1;
    this.values[slot] = v;
    if (v !== v) {
      if (this.codes !== null) this.codes[slot] = -1;
      if (this.textHash !== null) this.textHash[slot] = NaN;
      if (this.dates !== null) this.dates[slot] = NaN;
      return;
    }
    this.numbers++;
    if (this.datesPossible) this.stopDates();
    if (this.state === OPEN) {
      const code = this.exactText ? this.textCode(String(v)) : this.numberCode(v);
      if (this.codes !== null) this.codes[slot] = code;
    }
    if (this.textHash !== null) this.textHash[slot] = NaN;
  }

  /** Whether the cell in `slot` holds text (not a number, not missing). */
  isText(slot: number): boolean {
    const v = this.values[slot];
    if (v === v) return false;
    if (this.codes !== null) return this.codes[slot] >= 0;
    if (this.textHash !== null) return this.textHash[slot] === this.textHash[slot];
    return false;
  }

  private open(): void {
    this.state = OPEN;
    this.levels = [];
    this.textCodes = new Map();
    this.numberCodes = new Map();
    // -1 (missing) everywhere first: if the loop below closes the column early, unvisited slots must not look like text.
    const codes = new Int32Array(this.capacity).fill(-1);
    this.codes = codes;
    // Everything before the first text cell was a number or missing.
    for (let slot = 0; slot < this.filled; slot++) {
      const v = this.values[slot];
      const code = v === v ? this.numberCode(v) : -1;
      if (this.codes === null) return; // closed on the way
      codes[slot] = code;
    }
  }

  private numberCode(v: number): number {
    const map = this.numberCodes as Map<number, number>;
    const code = map.get(v);
    if (code !== undefined) return code;
    return this.newLevel(String(v), (c) => map.set(v, c));
  }

  private textCode(s: string): number {
    const map = this.textCodes as Map<string, number>;
    const code = map.get(s);
    if (code !== undefined) return code;
    return this.newLevel(s, (c) => map.set(s, c));
  }

  private newLevel(text: string, remember: (code: number) => void): number {
    const levels = this.levels as string[];
    if (levels.length >= this.levelLimit) {
      this.close();
      return -1;
    }
    const code = levels.length;
    levels.push(text);
    remember(code);
    return code;
  }

  private close(): void {
    const codes = this.codes as Int32Array;
    const levels = this.levels as string[];
    if (this.texts > 0) {
      const hashes = new Float64Array(this.capacity).fill(NaN);
      for (let slot = 0; slot < this.filled; slot++) {
        const c = codes[slot];
        const v = this.values[slot];
        if (c >= 0 && v !== v) hashes[slot] = hashText(levels[c]);
      }
      this.textHash = hashes;
    }
    this.state = CLOSED;
    this.codes = null;
    this.levels = null;
    this.textCodes = null;
    this.numberCodes = null;
  }

  private stopDates(): void {
    this.datesPossible = false;
    this.dates = null;
  }
}

function growFloat(a: Float64Array, capacity: number, fill: number): Float64Array {
  const b = new Float64Array(capacity);
  b.set(a);
  if (fill !== 0) b.fill(fill, a.length);
  return b;
}

/** Two 32-bit FNV-style hashes joined into 53 bits: for a million distinct texts a collision is ~1e-4 likely. */
export function hashText(s: string): number {
  let h1 = 0x811c9dc5;
  let h2 = 0x9e3779b9 ^ s.length;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    h1 = Math.imul(h1 ^ c, 0x01000193);
    h2 = Math.imul(h2 ^ c, 0x5bd1e995);
    h2 ^= h2 >>> 15;
  }
  return (h1 >>> 0) * 2097152 + ((h2 >>> 0) >>> 11);
}
