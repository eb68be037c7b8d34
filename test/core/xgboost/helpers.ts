// What scripts/xgboost_reference.py recorded from XGBoost (its version is in each file), and the model opened
// against the rows it scored, ready for the checks in read.test.ts and the CLI tests.
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { loadCsv } from '../../../src/core/csv/load';
import type { Forest } from '../../../src/core/forest/forest';
import { encodeTable } from '../../../src/core/forest/predict';
import { nameByPosition } from '../../../src/core/open/open';
import { loadXgboostFile } from '../../../src/core/xgboost/load';

export const ROOT = path.join(__dirname, '..', '..', '..', '..');
export const FIXTURES = path.join(ROOT, 'test', 'fixtures', 'xgboost');

export interface Expected {
  xgboost: string;
  csv: string;
  target: string;
  features: string[];
  classes: string[] | null;
  /** Per row: XGBoost's predict (a probability, the class probabilities, a label or a value). */
  predict: number[][];
  margin: number[][];
  /** Per row: features + 1 entries (the last the bias), or per class such a list. */
  contribs: number[][] | number[][][];
}

export interface Case {
  readonly name: string;
  readonly expected: Expected;
  readonly forest: Forest;
  readonly x: Float64Array;
  readonly rows: number;
  readonly modelPath: string;
  readonly csvPath: string;
}

export async function openCase(name: string): Promise<Case> {
  const expected = JSON.parse(readFileSync(path.join(FIXTURES, `${name}.expected.json`), 'utf8')) as Expected;
  const modelPath = path.join(FIXTURES, `${name}.model.json`);
  const csvPath = path.join(ROOT, expected.csv);
  const imported = await loadXgboostFile(modelPath);
  const { table } = await loadCsv(csvPath);
  const header = table.columns.map((c) => c.name);
  const forest = imported.names === 'positions' ? nameByPosition(imported.forest, header, [expected.target]) : imported.forest;
  return { name, expected, forest, x: encodeTable(forest.schema, table), rows: table.rowCount, modelPath, csvPath };
}

export interface Gap {
  abs: number;
  rel: number;
}

/** Largest absolute and relative differences seen; relative to the reference's size, floored at `floor`. */
export function widen(g: Gap, ours: number, theirs: number, floor = 1e-6): void {
  const d = Math.abs(ours - theirs);
  g.abs = Math.max(g.abs, d);
  g.rel = Math.max(g.rel, d / Math.max(Math.abs(theirs), floor));
}
