// The CSV loader's public entry points.

import { gzipFileSource, sniffFormat } from './gzip';
import { loadFromSource } from './loader';
import { loadParquet } from './parquet/load';
import { isOneWayInput, oneWayFileSource } from './pipe-source';
import { fileSource, textSource } from './sources';
import type { LoadOptions, LoadResult } from './types';

export { DataError, DEFAULT_MAX_LEVELS, DEFAULT_MISSING_TOKENS } from './types';
export type { LoadOptions, LoadResult } from './types';

/**
 * Reads a CSV file (plain or gzip-compressed) or a Parquet file (src/core/csv/parquet) into typed columns, streaming it (the text is never held whole) and never writing to it.
 *
 * - Header row first; delimiter detected among , ; TAB | unless given; UTF-8 with or without BOM; any of
 *   LF, CRLF, CR line ends; RFC 4180 quoting (delimiters and line breaks inside quotes). Cells are trimmed;
 *   blank lines are skipped (they are not rows) but still count as lines.
 * - Column kinds are inferred (numeric, categorical, boolean; ISO dates become numeric days since 1970-01-01)
 *   unless forced by `columnTypes`. Identifier-like, constant, empty and free-text columns are left out, each
 *   with a reason; the target never is, and rows without a target value are dropped with a note.
 * - Any problem with the input rejects with a DataError: one sentence naming the file, and the line and column
 *   where they apply. Lines are 1-based physical lines; `table.lineOfRow[i]` is where data row i starts.
 * - `path` "-" reads standard input; it and other input that cannot be read at an offset (a FIFO, <(...)) are
 *   streamed once (see pipe-source.ts). The fingerprint is of the bytes read, so it matches the file's.
 * - `signal` stops the load; it then rejects with a DOMException named 'AbortError'.
 */
export async function loadCsv(path: string, options?: LoadOptions): Promise<LoadResult> {
  // "-" (standard input), a FIFO or <(...): streamed once as CSV text, before any sniffing, which would use up
  // bytes a pipe cannot give back; a private copy places errors on their lines and is removed after.
  if (isOneWayInput(path)) return loadOneWay(path, options);
  // By content, not by name: a .gz (or a gzip file under any name) is decompressed as it streams.
  const format = await sniffFormat(path);
  if (format === 'gzip') return { ...(await loadFromSource(gzipFileSource(path), options)), format };
  if (format === 'parquet') return { ...(await loadParquet(path, options)), format };
  return loadFromSource(fileSource(path), options);
}

async function loadOneWay(path: string, options?: LoadOptions): Promise<LoadResult> {
  const source = oneWayFileSource(path);
  const onExit = () => source.dispose();
  process.once('exit', onExit);
  try {
    return await loadFromSource(source, options);
  } finally {
    source.dispose();
    process.removeListener('exit', onExit);
  }
}

/** The same load for text already in memory (an editor buffer, a test); `label` names it in messages. */
export function loadCsvText(text: string, options?: LoadOptions, label = '<text>'): Promise<LoadResult> {
  return loadFromSource(textSource(text, label), options);
}
