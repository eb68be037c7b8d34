// Worker thread entry: loads one CSV and hands back the typed columns (their buffers move, not copy).
import { parentPort, workerData } from 'node:worker_threads';
import { loadCsv, loadCsvText } from './load';
import type { LoadOptions, LoadResult } from './types';

interface Job {
  readonly path?: string;
  readonly text?: string;
  readonly label?: string;
  readonly options: LoadOptions;
}

function buffersOf(r: LoadResult): ArrayBuffer[] {
  const arrays: ArrayBufferView[] = [r.table.lineOfRow];
  if (r.table.rowNumber) arrays.push(r.table.rowNumber);
  for (const c of r.table.columns) arrays.push(c.kind === 'numeric' ? c.values : c.codes);
  return [...new Set(arrays.map((a) => a.buffer as ArrayBuffer))];
}

const job = workerData as Job;
const run = job.text !== undefined ? loadCsvText(job.text, job.options, job.label) : loadCsv(job.path!, job.options);
run.then(
  (result) => parentPort!.postMessage({ ok: true, result }, buffersOf(result)),
  (e: Error) => parentPort!.postMessage({ ok: false, name: e.name, message: e.message }),
);
