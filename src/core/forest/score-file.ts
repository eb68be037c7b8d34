// Reading a CSV to score with a saved forest, and writing the input back out with the forest's answers.
import { parse } from 'csv-parse';
import { createReadStream, createWriteStream, promises as fs } from 'node:fs';
import * as path from 'node:path';
import { tempBeside } from '../atomic';
import type { Schema } from '../base/schema';
import { loadCsv } from '../csv/load';
import type { LoadResult } from '../csv/types';
import { parserOptions } from '../csv/record-parser';
import { csvField } from '../csv/write';
import type { ColumnKind } from '../data/table';
import type { Forest } from './forest';
import type { Prediction } from './predict';

/** Loads a file with the model's column types forced, so no feature is dropped or retyped by inference. */
export function loadForScoring(file: string, schema: Schema, signal?: AbortSignal): Promise<LoadResult> {
  const columnTypes = Object.create(null) as Record<string, ColumnKind>;
  for (const f of schema.features) columnTypes[f.name] = f.kind;
  return loadCsv(file, { columnTypes, signal });
}

/** Columns the forest appends to a scored file: a header name and one cell per table row. */
export interface AddedColumns {
  readonly names: readonly string[];
  readonly cells: (row: number) => string[];
}

/** Interval bounds from a quantile regression forest, to append beside the value. */
export interface IntervalCells {
  readonly level: number;
  readonly lower: Float64Array;
  readonly upper: Float64Array;
}

/**
 * The prediction, each class's probability and the share of trees that agree (or the value, the trees'
 * spread and any interval), named clear of the file's own columns.
 */
export function predictionColumns(forest: Forest, p: Prediction, header: readonly string[], interval?: IntervalCells): AddedColumns {
  const t = forest.schema.target;
  const classification = t.task === 'classification';
  const pct = interval ? `${Math.round(interval.level * 1000) / 10}` : '';
  const wanted = classification
    ? [`predicted_${t.name}`, ...t.classes!.map((c) => `probability_${c}`), 'tree_agreement']
    : [`predicted_${t.name}`, 'tree_spread', ...(interval ? [`lower_${pct}`, `upper_${pct}`] : [])];
  const taken = new Set(header);
  const names = wanted.map((name) => {
    let n = name;
    for (let k = 2; taken.has(n); k++) n = `${name}_${k}`;
    taken.add(n);
    return n;
  });
  const cells = (i: number): string[] => {
    if (classification) {
      const K = t.classes!.length;
      const probs = Array.from({ length: K }, (_, k) => round(p.proba![i * K + k]));
      return [t.classes![p.predicted[i]], ...probs, round(p.agreement![i])];
    }
    const base = [String(p.predicted[i]), round(p.spread![i])];
    return interval ? [...base, String(interval.lower[i]), String(interval.upper[i])] : base;
  };
  return { names, cells };
}

function round(v: number): string {
  return Number.isFinite(v) ? String(Number(v.toFixed(6))) : '';
}

export class OverwriteError extends Error {}

/** The file's own line ending, from its first line break (LF when there is none). */
async function lineEndingOf(file: string): Promise<string> {
  const handle = await fs.open(file, 'r');
  try {
    const { buffer, bytesRead } = await handle.read(Buffer.alloc(64 * 1024), 0, 64 * 1024, 0);
    const head = buffer.subarray(0, bytesRead).toString('latin1');
    const at = head.search(/[\r\n]/);
    if (at < 0 || head[at] === '\n') return '\n';
    return head[at + 1] === '\n' ? '\r\n' : '\r';
  } finally {
    await handle.close();
  }
}

/** A record's own text: csv-parse's raw form also carries the line breaks around it. */
function recordText(raw: string): string {
  return raw.replace(/^[\r\n]+/, '').replace(/(\r\n|\r|\n)$/, '');
}

/**
 * Streams the input again and writes each record as it stands in the file (quoting, number formats and
 * columns the model ignored survive) with the added columns after it; never touches the input.
 * `rowOfRecord` maps the k-th data record (0-based) to its table row, or -1 for a record the table lacks.
 */
export async function writePredictions(input: string, out: string, delimiter: string, added: AddedColumns, rowOfRecord: (k: number) => number = (k) => k): Promise<void> {
  const [a, b] = await Promise.all([fs.realpath(input), fs.realpath(out).catch(() => path.resolve(out))]);
  if (a === b) throw new OverwriteError(`Refusing to write predictions over the input file ${input}; choose another --out.`);
  const eol = await lineEndingOf(input);
  const tmp = tempBeside(out);
  const sink = createWriteStream(tmp, { flags: 'wx' });
  try {
    const parser = createReadStream(input).pipe(parse({ ...parserOptions(delimiter), raw: true }));
    let k = -1;
    // Lines go out in batches: one stream write per line cost more than building the line.
    let batch = '';
    const flush = async () => {
      const full = !sink.write(batch);
      batch = '';
      if (full) await new Promise<void>((resolve) => sink.once('drain', () => resolve()));
    };
    for await (const { raw } of parser as AsyncIterable<{ raw: string }>) {
      const r = k < 0 ? -1 : rowOfRecord(k);
      const cells = k < 0 ? added.names : r < 0 ? added.names.map(() => '') : added.cells(r);
      k++;
      batch += recordText(raw) + delimiter + cells.map((c) => csvField(c, delimiter)).join(delimiter) + eol;
      if (batch.length >= 1 << 16) await flush();
    }
    if (batch.length > 0) await flush();
    await new Promise<void>((resolve, reject) => sink.end((e?: Error | null) => (e ? reject(e) : resolve())));
    await fs.rename(tmp, out);
  } catch (e) {
    sink.destroy();
    await fs.rm(tmp, { force: true });
    throw e;
  }
}
