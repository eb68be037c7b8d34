// Maps editor lines to table rows and back. Pure: the caller hands in a way to read a line's text.
//
// Core tells us only where each row *starts* (table.lineOfRow, 1-based). A row's last line is not known:
// quoted fields may span lines, rows may have been sampled away, and rows with a missing target were
// dropped. So a line after a row's start belongs to that row only if the record is still open there,
// which we find by scanning the record's text with the same quoting rules as RFC 4180.

/** Reads the text of a 1-based line, or undefined past the end of the document. */
export type LineReader = (line: number) => string | undefined;

/** The file's lines the way core and the editor count them: LF, CRLF and a lone CR each end a line. */
export function splitLines(text: string): string[] {
  return text.split(/\r\n|\r|\n/);
}

/** The line ending a file mostly uses (its first one), so a rewritten file keeps it. */
export function lineEnding(text: string): '\n' | '\r\n' | '\r' {
  const m = /\r\n|\r|\n/.exec(text);
  return (m?.[0] as '\n' | '\r\n' | '\r' | undefined) ?? '\n';
}

/** How many lines the record starting at `startLine` occupies (at least 1). */
export function recordSpan(read: LineReader, startLine: number, delimiter: string, maxLines = 10_000): number {
  let inQuotes = false;
  for (let line = startLine; line < startLine + maxLines; line++) {
    const text = read(line);
    if (text === undefined) return Math.max(1, line - startLine);
    inQuotes = scanLine(text, inQuotes, delimiter);
    if (!inQuotes) return line - startLine + 1;
  }
  return maxLines;
}

/** Scans one line; returns whether a quoted field is still open at its end. */
export function scanLine(text: string, inQuotesAtStart: boolean, delimiter: string): boolean {
  let inQuotes = inQuotesAtStart;
  let atFieldStart = !inQuotes;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (inQuotes) {
      if (ch === '"') {
        if (text[i + 1] === '"') i++;
        else inQuotes = false;
      }
    } else if (ch === '"' && atFieldStart) {
      inQuotes = true;
      atFieldStart = false;
    } else if (text.startsWith(delimiter, i)) {
      atFieldStart = true;
      i += delimiter.length - 1;
    } else if (ch !== ' ' && ch !== '\t') {
      atFieldStart = false;
    }
  }
  return inQuotes;
}

/**
 * Line ↔ row lookup for one loaded table. Rows are usually in file order, but a sampled table need not be,
 * so lookups go through rows sorted by start line.
 */
export class LineIndex {
  private readonly order: Int32Array; // row indices sorted by start line
  private readonly starts: Int32Array; // start line of order[k]

  constructor(
    private readonly lineOfRow: Int32Array,
    private readonly delimiter: string,
  ) {
    const n = lineOfRow.length;
    let sorted = true;
    for (let i = 1; i < n; i++) {
      if (lineOfRow[i] < lineOfRow[i - 1]) {
        sorted = false;
        break;
      }
    }
    const order = new Int32Array(n);
    for (let i = 0; i < n; i++) order[i] = i;
    if (!sorted) order.sort((a, b) => lineOfRow[a] - lineOfRow[b]);
    this.order = order;
    this.starts = new Int32Array(n);
    for (let k = 0; k < n; k++) this.starts[k] = lineOfRow[order[k]];
  }

  get rowCount(): number {
    return this.lineOfRow.length;
  }

  /** 1-based line where table row `row` starts. */
  lineOf(row: number): number {
    return this.lineOfRow[row];
  }

  /** The table row whose record covers 1-based `line`, or undefined for header, blank, dropped or unsampled lines. */
  rowAt(line: number, read: LineReader): number | undefined {
    const k = this.lastStartAtOrBefore(line);
    if (k < 0) return undefined; // header (or anything before the first data row)
    const row = this.order[k];
    const start = this.starts[k];
    if (start === line) {
      const text = read(line);
      return text === undefined || text.trim() === '' ? undefined : row;
    }
    // A later line belongs to this row only while its quoted field is still open.
    return this.openThrough(read, start, line - 1) ? row : undefined;
  }

  /** Table rows whose records touch any line in [fromLine, toLine] (1-based, inclusive), in file order. */
  rowsBetween(fromLine: number, toLine: number, read: LineReader): number[] {
    const out: number[] = [];
    let k = this.lastStartAtOrBefore(fromLine);
    if (k >= 0 && this.starts[k] < fromLine) {
      if (this.openThrough(read, this.starts[k], fromLine - 1)) out.push(this.order[k]);
      k++;
    } else if (k < 0) {
      k = 0;
    }
    for (; k < this.starts.length && this.starts[k] <= toLine; k++) {
      const text = read(this.starts[k]);
      if (text !== undefined && text.trim() !== '') out.push(this.order[k]);
    }
    return out;
  }

  private openThrough(read: LineReader, start: number, untilLine: number): boolean {
    let inQuotes = false;
    for (let l = start; l <= untilLine; l++) {
      const text = read(l);
      if (text === undefined) return false;
      inQuotes = scanLine(text, inQuotes, this.delimiter);
      if (!inQuotes) return false;
    }
    return inQuotes;
  }

  private lastStartAtOrBefore(line: number): number {
    let lo = 0;
    let hi = this.starts.length - 1;
    let best = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (this.starts[mid] <= line) {
        best = mid;
        lo = mid + 1;
      } else {
        hi = mid - 1;
      }
    }
    return best;
  }
}
