// Cell cleaning: trimming and missing-value tokens, run once per cell before anything else looks at it.

import type { DecimalMark } from './number-marks';

export class CellCleaner {
  private readonly tokens: ReadonlySet<string>;
  private readonly longest: number;
  // Most cells can be ruled out by their first character without hashing the string for a set lookup.
  private readonly firstChars = new Uint8Array(65536);

  /** @param decimalMark the file's decimal mark when the caller names it (number-marks.ts); undefined: a dot, no grouping. */
  constructor(tokens: readonly string[], readonly decimalMark?: DecimalMark) {
    const trimmed = tokens.map((t) => t.trim()).filter((t) => t.length > 0);
    this.tokens = new Set(trimmed);
    this.longest = trimmed.reduce((m, t) => Math.max(m, t.length), 0);
    for (const t of trimmed) this.firstChars[t.charCodeAt(0)] = 1;
  }

  /** The trimmed cell, or '' when it is missing (empty, blank, or a missing token). */
  clean(raw: string): string {
    let s = raw;
    let n = s.length;
    if (n === 0) return s;
    const a = s.charCodeAt(0);
    const b = s.charCodeAt(n - 1);
    // csv-parse trims unquoted cells; a quoted one can still carry blanks, and non-ASCII blanks need trim().
    if (a <= 32 || b <= 32 || a === 160 || b === 160 || a >= 0x1680 || b >= 0x1680) {
      s = s.trim();
      n = s.length;
      if (n === 0) return s;
    }
    if (n <= this.longest && this.firstChars[s.charCodeAt(0)] === 1 && this.tokens.has(s)) return '';
    return s;
  }
}
