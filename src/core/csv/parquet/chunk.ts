// One column chunk of one row group, decoded on its own: memory stays at one chunk, and a failure can name both.

import type * as HyparquetModule from 'hyparquet' with { 'resolution-mode': 'import' };
import type { AsyncBuffer, Compressors, FileMetaData, ParquetParsers } from 'hyparquet' with { 'resolution-mode': 'import' };
import { DataError } from '../types';
import { count, plural, q } from '../wording';

export type Hyparquet = typeof HyparquetModule;

export interface ChunkReading {
  readonly hp: Hyparquet;
  readonly compressors: Compressors;
  readonly file: AsyncBuffer;
  readonly metadata: FileMetaData;
  readonly label: string;
  /** How dates and timestamps arrive: ISO text for the table, Date objects to write them back out. */
  readonly parsers?: Partial<ParquetParsers>;
}

export function reason(err: unknown): string {
  const m = err instanceof Error ? err.message : String(err);
  return m.replace(/^parquet /, '').replace(/\.$/, '');
}

/** The values of column `name` for rows rowStart .. rowStart + rows (row group `group`), in order. */
export async function readChunk(r: ChunkReading, name: string, group: number, rowStart: number, rows: number): Promise<unknown[]> {
  const out = new Array<unknown>(rows);
  let filled = 0;
  try {
    await r.hp.parquetRead({
      file: r.file,
      metadata: r.metadata,
      columns: [name],
      rowStart,
      rowEnd: rowStart + rows,
      compressors: r.compressors,
      parsers: r.parsers,
      onChunk: ({ columnData, rowStart: at }) => {
        // Chunks may reach outside the requested rows; keep only this group's.
        for (let k = 0; k < columnData.length; k++) {
          const i = at + k - rowStart;
          if (i >= 0 && i < rows) {
            out[i] = columnData[k];
            filled++;
          }
        }
      },
    });
  } catch (err) {
    if (err instanceof DataError) throw err;
    throw new DataError(`${r.label}: column ${q(name)} in row group ${group + 1} could not be decoded (${reason(err)}); the file is damaged or truncated.`);
  }
  if (filled < rows) {
    throw new DataError(`${r.label}: column ${q(name)} in row group ${group + 1} holds ${count(filled)} values for ${plural(rows, 'row')}; the file is damaged.`);
  }
  return out;
}
