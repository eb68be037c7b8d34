// The streamed load: bytes -> checks and fingerprint -> csv-parse -> typed columns -> final table.

import type { Column, ColumnKind, DroppedColumn, Table } from '../data/table';
import { ByteGuard, lineAtOffset, type ByteProblem } from './bytes';
import { CellCleaner } from './cells';
import { commaNote } from './number-marks';
import { finishColumn, type Rows } from './infer';
import { Intake } from './intake';
import { findOpenQuote } from './quote-scan';
import { MAX_RECORD_CHARS, RecordParser, parserOptions } from './record-parser';
import { SNIFF_BYTES, sniffDelimiter } from './sniff';
import { describeReadError, type ByteSource } from './sources';
import { DataError, DEFAULT_MAX_LEVELS, DEFAULT_MISSING_TOKENS, type LoadOptions, type LoadResult } from './types';
import { count, plural, q } from './wording';
import { DEFAULT_MAX_COLUMNS } from '../limits';

const DEFAULT_SEED = 1;

function abortError(label: string): DOMException {
  return new DOMException(`Loading ${label} was stopped.`, 'AbortError');
}

function checkOptions(options: LoadOptions, label: string): void {
  const { delimiter, sampleRows, maxLevels } = options;
  if (delimiter !== undefined && (delimiter.length !== 1 || delimiter === '"' || delimiter === '\n' || delimiter === '\r')) {
    throw new DataError(`${label}: the delimiter must be one character other than a quote or a line break, not ${JSON.stringify(delimiter)}.`);
  }
  if (sampleRows !== undefined && !(Number.isInteger(sampleRows) && sampleRows >= 1)) {
    throw new DataError(`${label}: the number of rows to sample must be a whole number of at least 1, not ${sampleRows}.`);
  }
  if (maxLevels !== undefined && !(Number.isInteger(maxLevels) && maxLevels >= 1)) {
    throw new DataError(`${label}: the most distinct values a text column may have must be a whole number of at least 1, not ${maxLevels}.`);
  }
}

async function byteProblemError(problem: ByteProblem, source: ByteSource): Promise<DataError> {
  const { label } = source;
  if (problem.kind === 'utf16') {
    return new DataError(`${label} is UTF-16 text (it starts with a UTF-16 byte-order mark); save it as UTF-8 to load it.`);
  }
  const line = await lineAtOffset(source.read(0), problem.offset);
  if (problem.kind === 'nul') {
    return new DataError(`${label} line ${line} contains a NUL byte (at byte ${count(problem.offset)}), so it looks like a binary file rather than CSV text.`);
  }
  return new DataError(`${label} line ${line} is not valid UTF-8 (at byte ${count(problem.offset)}); save the file as UTF-8 to load it.`);
}

async function parseError(err: unknown, parser: RecordParser, intake: Intake, source: ByteSource, delimiter: string): Promise<Error> {
  if (err instanceof DataError) return err;
  const { label } = source;
  const code = (err as { code?: unknown }).code;
  const columnName = (index: unknown): string => {
    const header = intake.header;
    return header !== null && typeof index === 'number' && index >= 0 && index < header.length ? `, column ${q(header[index])}` : '';
  };
  if (code === 'CSV_QUOTE_NOT_CLOSED' || code === 'CSV_MAX_RECORD_SIZE') {
    const open = await findOpenQuote(source.read(parser.endOffset), parser.endLine + 1, delimiter.charCodeAt(0), parser.endOffset === 0);
    if (open !== undefined) {
      return new DataError(`${label} line ${open.line}${columnName(open.field)}: a quoted field starts here and its closing quote is missing.`);
    }
    if (code === 'CSV_MAX_RECORD_SIZE') {
      return new DataError(
        `${label} line ${parser.endLine + 1}: a record is longer than ${count(MAX_RECORD_CHARS / (1024 * 1024))} MB; check the delimiter (${JSON.stringify(delimiter)}).`,
      );
    }
  }
  if (code === 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE') {
    const field = (err as { column?: unknown }).column;
    return new DataError(`${label} line ${parser.currentLine}${columnName(field)}: there is text after the closing quote of a quoted field.`);
  }
  const message = err instanceof Error ? err.message : String(err);
  return new DataError(`${label} line ${parser.currentLine}: could not be read as CSV (${message}).`);
}

/** Streams `source` through csv-parse into typed columns; see loadCsv for the rules. */
export async function loadFromSource(source: ByteSource, options: LoadOptions = {}): Promise<LoadResult> {
  const { label } = source;
  const signal = options.signal;
  if (signal?.aborted) throw abortError(label);
  checkOptions(options, label);
  const columnTypes = options.columnTypes ?? {};
  const maxLevels = options.maxLevels ?? DEFAULT_MAX_LEVELS;
  const cleaner = new CellCleaner(options.missingTokens ?? DEFAULT_MISSING_TOKENS, options.decimalMark);
  const sampleSeed = options.sampleSeed ?? DEFAULT_SEED;
  const intake = new Intake({
    label,
    target: options.target,
    columnTypes,
    cleaner,
    maxLevels,
    maxColumns: options.maxColumns ?? DEFAULT_MAX_COLUMNS,
    sample: options.sampleRows !== undefined ? { rows: options.sampleRows, seed: sampleSeed } : undefined,
  });

  const guard = new ByteGuard();
  const chunks = source.read(0)[Symbol.asyncIterator]();
  let parser: RecordParser | undefined;
  let delimiter = options.delimiter ?? ',';
  let streamError: unknown;
  let finished = false;
  try {
    const next = async (): Promise<Buffer | undefined> => {
      let r: IteratorResult<Buffer>;
      try {
        r = await chunks.next();
      } catch (err) {
        if (signal?.aborted) throw abortError(label);
        const message = describeReadError(err, label);
        throw message !== undefined ? new DataError(message) : err;
      }
      if (signal?.aborted) throw abortError(label);
      if (r.done) return undefined;
      const problem = guard.check(r.value);
      if (problem !== undefined) throw await byteProblemError(problem, source);
      return r.value;
    };

    // The delimiter is decided from the first bytes, before csv-parse sees any of them.
    const head: Buffer[] = [];
    let headBytes = 0;
    let ended = false;
    while (headBytes < SNIFF_BYTES) {
      const chunk = await next();
      if (chunk === undefined) {
        ended = true;
        break;
      }
      head.push(chunk);
      headBytes += chunk.length;
    }
    if (options.delimiter === undefined) {
      delimiter = sniffDelimiter(Buffer.concat(head).subarray(0, SNIFF_BYTES), ended && headBytes <= SNIFF_BYTES);
    }

    const p = new RecordParser(parserOptions(delimiter), intake.onRecord);
    parser = p;
    p.on('error', (err) => {
      streamError ??= err;
    });
    const done = new Promise<void>((resolve) => {
      p.once('finish', resolve);
      p.once('error', () => resolve());
      p.once('close', resolve);
    });
    const stopIfFailed = async (): Promise<void> => {
      if (intake.failure !== null) throw intake.failure;
      if (streamError !== undefined) throw await parseError(streamError, p, intake, source, delimiter);
    };
    for (const chunk of head) {
      p.write(chunk);
      await stopIfFailed();
    }
    head.length = 0;
    if (!ended) {
      for (let chunk = await next(); chunk !== undefined; chunk = await next()) {
        await stopIfFailed();
        p.write(chunk);
        await stopIfFailed();
      }
    }
    const tail = guard.finish();
    if (tail !== undefined) throw await byteProblemError(tail, source);
    await stopIfFailed();
    p.end();
    await done;
    await stopIfFailed();
    finished = true;
  } finally {
    if (!finished) {
      parser?.destroy();
      await chunks.return?.();
    }
  }

  if (signal?.aborted) throw abortError(label);
  return finishLoad(intake, {
    label,
    target: options.target,
    columnTypes,
    maxLevels,
    sampleSeed,
    delimiter,
    fingerprint: guard.digest(),
    signal,
  });
}

export interface FinishConfig {
  readonly label: string;
  readonly target?: string;
  readonly columnTypes: Readonly<Record<string, ColumnKind | 'exclude'>>;
  readonly maxLevels: number;
  readonly sampleSeed: number;
  readonly delimiter: string;
  readonly fingerprint: string;
  readonly signal?: AbortSignal;
}

function gatherLines(lineOfSlot: Int32Array, order: Int32Array | null, n: number): Int32Array {
  if (order === null) return lineOfSlot.slice(0, n);
  const lines = new Int32Array(n);
  for (let i = 0; i < n; i++) lines[i] = lineOfSlot[order[i]];
  return lines;
}

/** The table from everything an intake took in; shared by the CSV and Parquet readers. */
export function finishLoad(intake: Intake, config: FinishConfig): LoadResult {
  const { label, target, columnTypes, maxLevels } = config;
  const header = intake.header;
  if (header === null) throw new DataError(`${label} is empty: there is no header row.`);
  if (intake.rowsRead === 0) throw new DataError(`${label} has a header (line ${intake.headerLine}) but no data rows.`);
  if (intake.slots === 0) {
    throw new DataError(`${label}: none of the ${plural(intake.rowsRead, 'row')} has a value for the target ${q(target ?? '')}, so there is nothing to learn from.`);
  }

  const notes: string[] = [];
  const warnings: string[] = [...intake.warnings];
  const dropped: DroppedColumn[] = [];
  const forcedOf = (name: string): ColumnKind | undefined => {
    const kind = Object.hasOwn(columnTypes, name) ? columnTypes[name] : undefined;
    return kind === 'exclude' ? undefined : kind;
  };

  // A sample's slots are in reservoir order; put the rows back in file order.
  let order: Int32Array | null = null;
  const reservoir = intake.reservoir;
  if (reservoir !== null && reservoir.offered > reservoir.capacity) {
    const rowOfSlot = intake.rowOfSlot as Float64Array;
    order = Int32Array.from({ length: intake.slots }, (_, i) => i).sort((a, b) => rowOfSlot[a] - rowOfSlot[b]);
    notes.push(
      `Kept a uniform random sample of ${count(intake.slots)} of the ${plural(reservoir.offered, 'row')}${target !== undefined ? ` with a target value` : ''} (seed ${config.sampleSeed}).`,
    );
  }
  let rows: Rows = { order, count: intake.slots, lineOfRow: gatherLines(intake.lineOfSlot, order, intake.slots) };

  const columns = new Array<Column | undefined>(header.length);
  const notesOf = new Array<string | undefined>(header.length);
  const warningsOf = new Array<string | undefined>(header.length);
  const droppedOf = new Array<DroppedColumn | undefined>(header.length);

  const t = intake.targetIndex;
  if (t >= 0) {
    const builder = intake.builders[t];
    if (builder === null) throw new Error('the target column has no builder'); // excluded targets are refused earlier
    const ctx = { label, maxLevels, forced: forcedOf(header[t]), isTarget: true };
    let finished = finishColumn(builder, rows, ctx);
    if (!('column' in finished)) throw new Error('the target column was dropped'); // finishColumn never drops it
    const strayWarning = finished.warning;
    // Text cells in a numeric target became missing; those rows go the way of rows with no target at all.
    let removed = 0;
    let firstRemovedLine = 0;
    const col = finished.column;
    if (col.kind === 'numeric') {
      const keep: number[] = [];
      for (let i = 0; i < rows.count; i++) {
        if (col.values[i] === col.values[i]) keep.push(order === null ? i : order[i]);
        else if (removed++ === 0) firstRemovedLine = rows.lineOfRow[i];
      }
      if (removed > 0) {
        const kept = Int32Array.from(keep);
        rows = { order: kept, count: kept.length, lineOfRow: gatherLines(intake.lineOfSlot, kept, kept.length) };
        finished = finishColumn(builder, rows, ctx);
        if (!('column' in finished)) throw new Error('the target column was dropped');
      }
    }
    const missing = intake.missingTarget + removed;
    if (missing > 0) {
      const first = intake.missingTarget > 0 && (removed === 0 || intake.firstMissingTargetLine < firstRemovedLine) ? intake.firstMissingTargetLine : firstRemovedLine;
      notes.push(`Dropped ${plural(missing, 'row')} whose target ${q(header[t])} is missing (the first on line ${first}).`);
    }
    if (rows.count === 0) {
      throw new DataError(`${label}: none of the ${plural(intake.rowsRead, 'row')} has a usable value for the target ${q(header[t])}.`);
    }
    const targetColumn = finished.column;
    const single = singleValue(targetColumn);
    if (single !== undefined) {
      throw new DataError(
        `${label}: the target ${q(header[t])} has a single value (${q(single)}) in all ${plural(rows.count, 'row')}, so there is nothing to predict.`,
      );
    }
    columns[t] = targetColumn;
    notesOf[t] = finished.note ?? commaNote(builder, forcedOf(header[t]));
    warningsOf[t] = strayWarning;
  }

  for (let j = 0; j < header.length; j++) {
    if (j === t) continue;
    if (config.signal?.aborted) throw abortError(label);
    const builder = intake.builders[j];
    if (builder === null) {
      droppedOf[j] = { name: header[j], reason: 'excluded by its column type setting' };
      continue;
    }
    const finished = finishColumn(builder, rows, { label, maxLevels, forced: forcedOf(header[j]), isTarget: false });
    const comma = commaNote(builder, forcedOf(header[j]));
    if ('column' in finished) {
      columns[j] = finished.column;
      notesOf[j] = finished.note ?? comma;
      warningsOf[j] = finished.warning;
    } else {
      droppedOf[j] = finished.dropped;
      notesOf[j] = comma;
    }
    intake.builders[j] = null; // let its arrays go while the rest are finished
  }
  for (let j = 0; j < header.length; j++) {
    if (notesOf[j] !== undefined) notes.push(notesOf[j] as string);
    if (warningsOf[j] !== undefined) warnings.push(warningsOf[j] as string);
    if (droppedOf[j] !== undefined) dropped.push(droppedOf[j] as DroppedColumn);
  }

  const rowOfSlot = intake.rowOfSlot as Float64Array;
  const rowNumber = new Int32Array(rows.count);
  for (let i = 0; i < rows.count; i++) rowNumber[i] = rowOfSlot[rows.order === null ? i : rows.order[i]] + 1;
  const table: Table = {
    rowCount: rows.count,
    columns: columns.filter((c): c is Column => c !== undefined),
    lineOfRow: rows.lineOfRow,
    rowNumber,
  };
  return {
    table,
    dropped,
    notes,
    warnings,
    delimiter: config.delimiter,
    rowsRead: intake.rowsRead,
    fingerprint: config.fingerprint,
    header,
  };
}

/** The one distinct non-missing value of a column, as text, or undefined when it has zero or several. */
function singleValue(column: Column): string | undefined {
  if (column.kind === 'numeric') {
    let first = NaN;
    for (let i = 0; i < column.values.length; i++) {
      const v = column.values[i];
      if (v !== v) continue;
      if (first !== first) first = v;
      else if (v !== first) return undefined;
    }
    return first === first ? String(first) : undefined;
  }
  return column.levels.length === 1 ? column.levels[0] : undefined;
}
