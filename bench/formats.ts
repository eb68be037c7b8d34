// Load time and peak memory of one table as CSV, gzip-compressed CSV and Parquet (snappy and zstd, written by
// DuckDB from that CSV). Files go to a temporary folder and are removed afterwards; nothing here is committed data.
//   node out/bench/formats.js [--rows 1000000]
import { mkdtempSync, rmSync, statSync, createReadStream, createWriteStream } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { createGzip } from 'node:zlib';
import { DuckDBInstance } from '@duckdb/node-api';
import { threeClassGenerator } from './data';
import { runProcess } from './run-process';

async function toParquet(csv: string, out: string, compression: string): Promise<void> {
  const db = await DuckDBInstance.create(':memory:', { threads: '1' });
  const c = await db.connect();
  await c.run(`COPY (SELECT * FROM read_csv('${csv}', header = true)) TO '${out}' (FORMAT parquet, COMPRESSION ${compression})`);
  c.closeSync();
  db.closeSync();
}

async function main(): Promise<void> {
  const at = process.argv.indexOf('--rows');
  const rows = at > 0 ? Number(process.argv[at + 1]) : 1_000_000;
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-formats-'));
  try {
    const csv = path.join(dir, 'table.csv');
    await threeClassGenerator('formats').write(csv, rows);
    const gz = `${csv}.gz`;
    await pipeline(createReadStream(csv), createGzip(), createWriteStream(gz));
    const snappy = path.join(dir, 'table.snappy.parquet');
    const zstd = path.join(dir, 'table.zstd.parquet');
    await toParquet(csv, snappy, 'snappy');
    await toParquet(csv, zstd, 'zstd');
    console.log(`| file (${rows.toLocaleString('en-US')} × 20 and a label) | size (MB) | load (s) | peak memory (MB) |`);
    console.log('|---|---|---|---|');
    for (const [what, file] of [['CSV', csv], ['CSV, gzip', gz], ['Parquet, snappy', snappy], ['Parquet, zstd', zstd]]) {
      const r = await runProcess(process.execPath, [path.join(__dirname, 'load-one.js'), file]);
      if (!r.ok) throw new Error(`${what}: ${r.firstError ?? r.stderrTail}`);
      const seconds = Number(r.json?.seconds);
      console.log(`| ${what} | ${(statSync(file).size / 1e6).toFixed(0)} | ${seconds.toFixed(1)} | ${r.peakMegabytes?.toFixed(0) ?? '?'} |`);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

void main();
