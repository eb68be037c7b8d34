// Commands that look at chosen rows (votes, explain) read --rows and the data the same way.
import type { Forest } from '../core/forest/forest';
import { encodeTable } from '../core/forest/predict';
import { loadForScoring } from '../core/forest/score-file';
import { dataRowOf } from '../core/summary/fit';
import { list, UsageError, type Parsed } from './args';
import type { LoadResult } from '../core/csv/types';

export interface ChosenRows {
  /** The data row numbers asked for, in the order given. */
  readonly wanted: number[];
  /** Their table rows, in the same order. */
  readonly tableRows: number[];
  /** Their encoded features, row-major. */
  readonly x: Float64Array;
  /** Every row of the file, encoded the same way. */
  readonly encoded: Float64Array;
  readonly loaded: LoadResult;
}

/** Parses --rows (data rows counted from 1); throws a UsageError naming the command when it is absent or bad. */
export function wantedRows(args: Parsed, command: string): number[] {
  const wanted = list(args, 'rows').map((r) => {
    const n = Number(r);
    if (!Number.isInteger(n) || n < 1) throw new UsageError(`--rows takes data row numbers counted from 1; got "${r}".`, command);
    return n;
  });
  if (wanted.length === 0) throw new UsageError('needs --rows, such as --rows 1,7,12.', command);
  return wanted;
}

/**
 * Loads the file for the forest (unless the caller already has) and picks out the wanted rows, naming any the
 * file does not have.
 */
export async function chooseRows(forest: Forest, dataPath: string, wanted: number[], command: string, already?: LoadResult): Promise<ChosenRows> {
  const loaded = already ?? (await loadForScoring(dataPath, forest.schema));
  const table = loaded.table;
  const index = new Map<number, number>();
  for (let i = 0; i < table.rowCount; i++) index.set(dataRowOf(table, i), i);
  const missing = wanted.filter((r) => !index.has(r));
  if (missing.length) throw new UsageError(`${dataPath} has ${table.rowCount} data rows; there is no row ${missing.join(', ')}.`, command);
  const all = encodeTable(forest.schema, table, dataPath, loaded.header);
  const p = forest.schema.features.length;
  const tableRows = wanted.map((r) => index.get(r)!);
  const x = new Float64Array(wanted.length * p);
  tableRows.forEach((t, j) => x.set(all.subarray(t * p, (t + 1) * p), j * p));
  return { wanted, tableRows, x, encoded: all, loaded };
}
