// Parquet files for tests, written by an independent writer (DuckDB's npm package, @duckdb/node-api, a
// devDependency) from a CSV, so the reader is checked against files it had no part in making.
import { DuckDBInstance } from '@duckdb/node-api';

export interface ParquetWrite {
  readonly compression: 'snappy' | 'zstd' | 'gzip' | 'uncompressed';
  readonly rowGroupRows: number;
  /** A SELECT over the CSV, named `src`; default every column as DuckDB types it. */
  readonly select?: string;
  /** Columns DuckDB must keep as text (its sniffer reads yes/no as BOOLEAN, which would spell the levels true/false). */
  readonly text?: readonly string[];
}

function sqlText(s: string): string {
  return `'${s.replace(/'/g, "''")}'`;
}

/** Reads `csv` with DuckDB's own CSV reader and type detection and writes it to `parquet`. */
export async function writeParquetWithDuckDb(csv: string, parquet: string, how: ParquetWrite): Promise<void> {
  const db = await DuckDBInstance.create(':memory:', { threads: '1' });
  try {
    const c = await db.connect();
    try {
      const select = how.select ?? 'SELECT * FROM src';
      const types = how.text?.length ? `, types = {${how.text.map((n) => `${sqlText(n)}: 'VARCHAR'`).join(', ')}}` : '';
      await c.run(`CREATE VIEW src AS SELECT * FROM read_csv(${sqlText(csv)}, header = true${types})`);
      await c.run(
        `COPY (${select}) TO ${sqlText(parquet)} (FORMAT parquet, COMPRESSION ${how.compression}, ROW_GROUP_SIZE ${how.rowGroupRows})`,
      );
    } finally {
      c.closeSync();
    }
  } finally {
    db.closeSync();
  }
}
