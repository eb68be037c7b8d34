// Keeps the last fit in the extension's storage so a window reload brings the panel, hovers and
// out-of-bag votes back without refitting: the model file (core's format), the CSV it was fitted on and
// which rows trained it. Each tree's bootstrap counts are drawn again from the forest's seed on load.
// No `vscode`: the caller passes the folder.

import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { isFitSummary, type FitSummary } from '../../protocol/messages';
import type { Forest } from '../engine';
import type { FitChoices } from '../fit/choices';
import type { CsvReading } from './csvSource';
import { inBagCounts, loadModel, saveModel, writeFileAtomic } from '../engine';

// 3: the CSV's reading is one record (csv), as the session keeps it.
export const LAST_FIT_VERSION = 3;

export interface LastFitMeta {
  readonly version: number;
  /** How the CSV was read, so the same rows come back (sampling is seeded). */
  readonly csv: CsvReading;
  /** The CSV's fingerprint when it was fitted: a changed file gets no out-of-bag views. */
  readonly fingerprint: string;
  readonly trainRows: string;
  readonly holdoutRows?: string;
  readonly trees: number;
  readonly summary: FitSummary;
  /** What the user chose for the fit, so a restored session can be refitted from the panel. */
  readonly choices?: FitChoices;
}

export interface LastFit {
  readonly forest: Forest;
  readonly meta: LastFitMeta;
  readonly trainRows: Int32Array;
  readonly holdoutRows?: Int32Array;
  /** Tree-major bootstrap counts of the training rows, drawn again from the seed. */
  readonly inBag: Uint8Array;
}

const MODEL = 'forest.json';
const META = 'meta.json';

type Fit = { forest: Forest; trainRows: Int32Array; holdoutRows?: Int32Array };
type Meta = Omit<LastFitMeta, 'version' | 'trainRows' | 'holdoutRows' | 'trees'>;

/** Saves one after another: two fits in quick succession must not interleave their files. */
let queue: Promise<void> = Promise.resolve();

export function saveLastFit(dir: string, fit: Fit, meta: Meta): Promise<void> {
  const run = queue.then(() => save(dir, fit, meta));
  queue = run.catch(() => undefined);
  return run;
}

async function save(dir: string, fit: Fit, meta: Meta): Promise<void> {
  await fs.mkdir(dir, { recursive: true });
  const full: LastFitMeta = {
    ...meta,
    version: LAST_FIT_VERSION,
    trainRows: toBase64(fit.trainRows),
    holdoutRows: fit.holdoutRows ? toBase64(fit.holdoutRows) : undefined,
    trees: fit.forest.trees.length,
  };
  // Meta goes last and is what load looks for first, so a save cut short leaves no half-matching set.
  await fs.rm(path.join(dir, META), { force: true });
  await saveModel(path.join(dir, MODEL), fit.forest);
  await fs.rm(path.join(dir, 'inbag.bin'), { force: true }); // kept by version 1
  await writeFileAtomic(path.join(dir, META), JSON.stringify(full));
}

/** The saved fit, or undefined when there is none or it does not hang together. */
export async function loadLastFit(dir: string): Promise<LastFit | undefined> {
  let meta: LastFitMeta;
  try {
    meta = JSON.parse(await fs.readFile(path.join(dir, META), 'utf8')) as LastFitMeta;
  } catch {
    return undefined;
  }
  if (!isMeta(meta)) return undefined;
  const forest = await loadModel(path.join(dir, MODEL));
  const trainRows = fromBase64(meta.trainRows);
  const holdoutRows = meta.holdoutRows ? fromBase64(meta.holdoutRows) : undefined;
  if (forest.trees.length !== meta.trees) return undefined;
  return { forest, meta, trainRows, holdoutRows, inBag: inBagCounts(forest.params, forest.trees.length, trainRows.length) };
}

export async function clearLastFit(dir: string): Promise<void> {
  await fs.rm(path.join(dir, META), { force: true });
}

function isMeta(m: unknown): m is LastFitMeta {
  if (typeof m !== 'object' || m === null) return false;
  const v = m as Record<string, unknown>;
  return (
    v.version === LAST_FIT_VERSION &&
    typeof v.csv === 'object' &&
    v.csv !== null &&
    typeof (v.csv as Record<string, unknown>).path === 'string' &&
    typeof (v.csv as Record<string, unknown>).sampled === 'boolean' &&
    typeof v.fingerprint === 'string' &&
    typeof v.trainRows === 'string' &&
    typeof v.trees === 'number' &&
    isFitSummary(v.summary)
  );
}

export function toBase64(a: Int32Array): string {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64');
}

export function fromBase64(s: string): Int32Array {
  const b = Buffer.from(s, 'base64');
  const out = new Int32Array(b.length >> 2);
  new Uint8Array(out.buffer).set(b.subarray(0, out.length * 4));
  return out;
}
