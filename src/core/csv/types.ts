import type { ColumnKind, DroppedColumn, Table } from '../data/table';

export const DEFAULT_MISSING_TOKENS: readonly string[] = ['', 'NA', 'N/A', 'NaN', 'null', '?', '-'];

export interface LoadOptions {
  /** The column to predict: never dropped as an identifier or constant, rows where it is missing are dropped. */
  readonly target?: string;
  /** Cells equal to one of these (after trimming, case-sensitive) are missing. Default DEFAULT_MISSING_TOKENS.
   *  An empty cell is always missing, whatever this list says: it can hold no value. */
  readonly missingTokens?: readonly string[];
  /** Per-column override: force a type, or leave the column out. Forced columns are never dropped by the rules.
   *  A name the file does not have is a warning, not an error (a forest forces its features on any file). */
  readonly columnTypes?: Readonly<Record<string, ColumnKind | 'exclude'>>;
  /** Forced delimiter; detected among , ; TAB | when absent. */
  readonly delimiter?: string;
  /** Keep a uniform random sample of at most this many rows (reservoir, seeded). */
  readonly sampleRows?: number;
  readonly sampleSeed?: number;
  /** Text columns with more distinct values than this are dropped as free text (not the target, not forced). Default 1000. */
  readonly maxLevels?: number;
  readonly signal?: AbortSignal;
  /** The decimal mark, when the file's numbers use one the caller knows: ',' or '.', the other then groups thousands
   *  (number-marks.ts). Absent: a dot, no grouping, and cells that look like comma numbers are named in a note. */
  readonly decimalMark?: '.' | ',';
  /** Most columns the header may have; default DEFAULT_MAX_COLUMNS (src/core/limits.ts). */
  readonly maxColumns?: number;
}

export interface LoadResult {
  readonly table: Table;
  readonly dropped: readonly DroppedColumn[];
  /** Information the user should read (date columns converted, rows dropped for a missing target, sampling). */
  readonly notes: readonly string[];
  /** Problems the load survived (stray text in a numeric column: count and first line). */
  readonly warnings: readonly string[];
  readonly delimiter: string;
  /** Data rows read from the file before any were dropped or sampled. */
  readonly rowsRead: number;
  /** sha256 of the file's bytes, hex. */
  readonly fingerprint: string;
  readonly header: readonly string[];
  /** What the file was: text (a CSV, or text in memory), gzip-compressed text, or Parquet. Absent means text. */
  readonly format?: 'text' | 'gzip' | 'parquet';
}

export const DEFAULT_MAX_LEVELS = 1000;

/** Every input problem becomes one of these: one sentence naming file, line and column where they apply. */
export class DataError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'DataError';
  }
}
