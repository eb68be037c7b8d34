// Where a table came from: the one record of a CSV as the editor read it, used by a fit, an opened forest,
// a fit restored after a reload, and the reload store (which keeps the part that says how to read it again).
// No `vscode` here.

import * as path from 'node:path';
import type { LoadResult } from '../engine';

/** How a CSV was read: enough to read the same rows again, since sampling is seeded. */
export interface CsvReading {
  readonly path: string;
  /** true when the table is a random sample of the file's rows. */
  readonly sampled: boolean;
  readonly sampleRows?: number;
  readonly sampleSeed?: number;
  /** The target the loader was told to keep (a column it would otherwise leave out, such as an identifier). */
  readonly loadTarget?: string;
  readonly bytes: number;
}

/** A CSV as read: how, and what came of it. */
export interface LoadedCsv extends CsvReading {
  readonly load: LoadResult;
  readonly seconds: number;
}

/** The file's name, as the panel, hovers and messages call it. */
export function csvLabel(csv: Pick<CsvReading, 'path'>): string {
  return path.basename(csv.path);
}

/** The part of a read CSV that the reload store keeps. */
export function readingOf(csv: LoadedCsv): CsvReading {
  return { path: csv.path, sampled: csv.sampled, sampleRows: csv.sampleRows, sampleSeed: csv.sampleSeed, loadTarget: csv.loadTarget, bytes: csv.bytes };
}
