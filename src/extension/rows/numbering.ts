// Table row index <-> the CSV's own 1-based data row number (the number the panel shows and the protocol
// carries). They differ when rows were sampled or dropped (missing target), and a data row's line differs
// from its number when quoted fields span lines, so the numbering comes from the file's record starts.

import { scanLine, splitLines } from './lineMap';

/** 1-based start line of every non-blank record in `text`, header included (it is the first). */
export function recordStartLines(text: string, delimiter: string): Int32Array {
  const starts: number[] = [];
  let inQuotes = false;
  splitLines(text).forEach((lineText, i) => {
    if (!inQuotes && lineText.trim() !== '') starts.push(i + 1);
    inQuotes = scanLine(lineText, inQuotes, delimiter);
  });
  return Int32Array.from(starts);
}

export class RowNumbering {
  private readonly dataRowOf: Int32Array; // per table row
  private readonly tableRowOf: Map<number, number>;

  private constructor(dataRowOf: Int32Array) {
    this.dataRowOf = dataRowOf;
    this.tableRowOf = new Map();
    for (let i = 0; i < dataRowOf.length; i++) if (dataRowOf[i] > 0) this.tableRowOf.set(dataRowOf[i], i);
  }

  /**
   * When every table row sits on its own line straight after a one-line header, data row = table row + 1
   * and the file need not be read again. Otherwise `text()` supplies it and records are counted.
   */
  static build(lineOfRow: Int32Array, delimiter: string, text: () => string, rowNumber?: Int32Array): RowNumbering {
    // Core's loader now numbers kept rows itself; the scan below serves tables built without it.
    if (rowNumber && rowNumber.length === lineOfRow.length) return new RowNumbering(Int32Array.from(rowNumber));
    const n = lineOfRow.length;
    if (n === 0 || (lineOfRow[0] === 2 && lineOfRow[n - 1] === n + 1 && strictlyIncreasing(lineOfRow))) {
      const ids = new Int32Array(n);
      for (let i = 0; i < n; i++) ids[i] = i + 1;
      return new RowNumbering(ids);
    }
    const starts = recordStartLines(text(), delimiter);
    const ids = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      // starts[0] is the header, so a record's index in `starts` is its data row number.
      const k = binarySearch(starts, lineOfRow[i]);
      ids[i] = k > 0 ? k : 0;
    }
    return new RowNumbering(ids);
  }

  /** Identity numbering, for tables not read from a file we can re-read. */
  static identity(rows: number): RowNumbering {
    const ids = new Int32Array(rows);
    for (let i = 0; i < rows; i++) ids[i] = i + 1;
    return new RowNumbering(ids);
  }

  dataRow(tableRow: number): number {
    return this.dataRowOf[tableRow];
  }

  tableRow(dataRow: number): number | undefined {
    return this.tableRowOf.get(dataRow);
  }
}

function strictlyIncreasing(a: Int32Array): boolean {
  for (let i = 1; i < a.length; i++) if (a[i] <= a[i - 1]) return false;
  return true;
}

function binarySearch(sorted: Int32Array, value: number): number {
  let lo = 0;
  let hi = sorted.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid] === value) return mid;
    if (sorted[mid] < value) lo = mid + 1;
    else hi = mid - 1;
  }
  return -1;
}
