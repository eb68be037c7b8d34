// Lines of the fitted file whose rows the session's table does not hold: a large file fitted on a random sample.
// Hovering one scores that line alone, so the hover answers for any row of the file, not only sampled ones.
// No `vscode` here: the caller hands in a line reader and a loader, as for other files.

import { csvLine, type LoadOptions, type LoadResult } from '../engine';
import type { LineReader } from '../rows/lineMap';
import { loadForForest } from '../session/loadFor';
import { csvLabel } from '../session/csvSource';
import type { ForestSession, ScoredFile } from '../session/session';
import { RowNumbering } from '../rows/numbering';

export type TextLoader = (text: string, options: LoadOptions, label: string) => Promise<LoadResult>;

/** Whether the session's table leaves rows of its file out, so a line outside it may still be a data row. */
export function hasLoneLines(session: ForestSession): boolean {
  return session.table.rowCount < session.source.load.rowsRead;
}

const offsets = new WeakMap<ForestSession, number | null>();

/**
 * The data row number at `line`, when the table shows one record per line below a fixed header (every table
 * row's line minus its data row number is the same); undefined otherwise (quoted line breaks, blank lines),
 * where the hover names the line instead.
 */
export function dataRowAtLine(session: ForestSession, line: number): number | undefined {
  let offset = offsets.get(session);
  if (offset === undefined) {
    const { lineOfRow } = session.table;
    offset = lineOfRow.length ? lineOfRow[0] - session.numbering.dataRow(0) : null;
    for (let i = 1; i < lineOfRow.length && offset !== null; i++) if (lineOfRow[i] - session.numbering.dataRow(i) !== offset) offset = null;
    offsets.set(session, offset);
  }
  return offset === null || line - offset < 1 ? undefined : line - offset;
}

/**
 * The line scored on its own, read with the file's header and delimiter; undefined for the header, blank lines
 * and lines that are not a whole record (a line inside a quoted field that spans lines fails to load as one).
 */
export async function scoreLoneLine(session: ForestSession, line: number, read: LineReader, load: TextLoader): Promise<ScoredFile | undefined> {
  const text = read(line);
  if (text === undefined || text.trim() === '') return undefined;
  // The first non-blank line is the header.
  let first = 1;
  while (first < line && (read(first) ?? '').trim() === '') first++;
  if (first === line) return undefined;
  const { delimiter, header } = session.source.load;
  const record = csvLine(header, delimiter) + text + '\n';
  const label = `line ${line} of ${csvLabel(session.source)}`;
  let loaded: LoadResult;
  try {
    // One row makes every column look constant; the target is kept by naming its kind, so the hover shows it.
    const target = session.forest.schema.target;
    const kinds = header.includes(target.name) ? { [target.name]: target.task === 'regression' ? ('numeric' as const) : ('categorical' as const) } : {};
    loaded = await loadForForest((o) => load(record, o, label), session.forest.schema, { columnTypes: kinds });
  } catch {
    return undefined;
  }
  if (loaded.table.rowCount !== 1) return undefined;
  const file = await session.scoreOther(loaded.table, delimiter, label, () => record);
  const dataRow = dataRowAtLine(session, line) ?? 0;
  return { ...file, numbering: RowNumbering.build(Int32Array.of(line), delimiter, () => record, Int32Array.of(dataRow)), outsideSample: { line } };
}
