// Loads one file with Copse's loader and prints what it read and how long it took, as one JSON line; run under
// GNU time by bench/formats.ts so the process's peak memory is the loader's.
import { loadCsv } from '../src/core/csv/load';

async function main(): Promise<void> {
  const file = process.argv[2];
  const started = performance.now();
  const r = await loadCsv(file, { target: 'label' });
  const seconds = (performance.now() - started) / 1000;
  process.stdout.write(JSON.stringify({ file, rows: r.table.rowCount, columns: r.table.columns.length, seconds }) + '\n');
}

void main();
