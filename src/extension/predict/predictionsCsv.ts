// Writes predictions as a new CSV: every input record copied byte for byte (so columns the model ignored,
// quoting and number formats survive), with the prediction columns appended. Pure.

import { lineEnding, recordSpan, splitLines } from '../rows/lineMap';

export interface AddedColumn {
  readonly name: string;
  /** One cell per table row. */
  readonly cells: readonly string[];
}

/** Quotes a field when it holds the delimiter, a quote or a line break (RFC 4180, section 2). */
export function csvField(text: string, delimiter: string): string {
  if (text.includes(delimiter) || /["\r\n]/.test(text) || text !== text.trim()) return `"${text.replace(/"/g, '""')}"`;
  return text;
}

/** Names for the added columns that do not clash with the file's own. */
export function uniqueNames(wanted: readonly string[], existing: readonly string[]): string[] {
  const taken = new Set(existing);
  return wanted.map((w) => {
    let name = w;
    for (let k = 2; taken.has(name); k++) name = `${w}_${k}`;
    taken.add(name);
    return name;
  });
}

export function predictionsCsv(text: string, lineOfRow: Int32Array, delimiter: string, added: readonly AddedColumn[]): string {
  const eol = lineEnding(text);
  const clean = splitLines(text);
  const read = (line: number): string | undefined => clean[line - 1];
  const record = (start: number): string => clean.slice(start - 1, start - 1 + recordSpan(read, start, delimiter)).join(eol);
  const out: string[] = [];
  // The header is the first non-blank record before the first data row.
  let firstData = clean.length + 1;
  for (const l of lineOfRow) if (l < firstData) firstData = l;
  let headerLine = 1;
  while (headerLine < firstData && (clean[headerLine - 1] ?? '').trim() === '') headerLine++;
  const header = headerLine < firstData ? record(headerLine) : '';
  out.push([header, ...added.map((a) => csvField(a.name, delimiter))].join(delimiter));
  // File order, even when the table's rows were reordered.
  const order = Array.from(lineOfRow.keys()).sort((a, b) => lineOfRow[a] - lineOfRow[b]);
  for (const r of order) {
    out.push([record(lineOfRow[r]), ...added.map((a) => csvField(a.cells[r] ?? '', delimiter))].join(delimiter));
  }
  return out.join(eol) + eol;
}
