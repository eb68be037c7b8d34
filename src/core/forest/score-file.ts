// Reading a CSV to score with a saved forest, and writing the input back out with the forest's answers.
import { parse } from 'csv-parse';
import { createReadStream, createWriteStream, promises as fs } from 'node:fs';
import { randomBytes } from 'node:crypto';
import * as path from 'node:path';
import { loadCsv } from '../csv/load';
import type { LoadResult } from '../csv/types';
import { csvLine } from '../csv/write';
import type { ColumnKind } from '../data/table';
import type { Schema } from '../model/schema';
import type { Forest } from './forest';
import type { Prediction } from './predict';

/** Loads a file with the model's column types forced, so no feature is dropped or retyped by inference. */
export function loadForScoring(file: string, schema: Schema, signal?: AbortSignal): Promise<LoadResult> {
  const columnTypes: Record<string, ColumnKind> = Object.create(null);
  for (const f of schema.features) columnTypes[f.name] = f.kind;
  return loadCsv(file, { columnTypes, signal });
}

/** Names of the columns the forest adds, kept clear of the input's own names. */
export function predictionColumns(forest: Forest, header: readonly string[]): string[] {
  const t = forest.schema.target;
  const base =
    t.task === 'classification'
      ? [`predicted ${t.name}`, ...t.classes!.map((c) => `probability ${c}`), 'tree agreement']
      : [`predicted ${t.name}`, 'tree spread'];
  const taken = new Set(header);
  return base.map((name) => {
    let n = name;
    while (taken.has(n)) n = `copse ${n}`;
    taken.add(n);
    return n;
  });
}

export function predictionCells(forest: Forest, p: Prediction, i: number): string[] {
  const t = forest.schema.target;
  if (t.task === 'classification') {
    const K = t.classes!.length;
    const probs = Array.from({ length: K }, (_, k) => round(p.proba![i * K + k]));
    return [t.classes![p.predicted[i]], ...probs, round(p.agreement![i])];
  }
  return [round(p.predicted[i]), round(p.spread![i])];
}

function round(v: number): string {
  return String(Number(v.toPrecision(6)));
}

export class OverwriteError extends Error {}

/** Streams the input again and writes each record with the forest's columns appended; never touches the input. */
export async function writePredictions(input: string, out: string, delimiter: string, forest: Forest, p: Prediction): Promise<void> {
  const [a, b] = await Promise.all([fs.realpath(input), fs.realpath(out).catch(() => path.resolve(out))]);
  if (a === b) throw new OverwriteError(`Refusing to write predictions over the input file ${input}; choose another --out.`);
  const tmp = `${out}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
  const sink = createWriteStream(tmp, { flags: 'wx' });
  try {
    const parser = createReadStream(input).pipe(parse({ delimiter, bom: true, skip_empty_lines: true, relax_column_count: false }));
    let row = -1;
    for await (const record of parser as AsyncIterable<string[]>) {
      const cells = row < 0 ? [...record, ...predictionColumns(forest, record)] : [...record, ...predictionCells(forest, p, row)];
      row++;
      if (!sink.write(csvLine(cells, delimiter))) await new Promise<void>((r) => sink.once('drain', () => r()));
    }
    await new Promise<void>((resolve, reject) => sink.end((e?: Error | null) => (e ? reject(e) : resolve())));
    await fs.rename(tmp, out);
  } catch (e) {
    sink.destroy();
    await fs.rm(tmp, { force: true });
    throw e;
  }
}
