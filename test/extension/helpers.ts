// Shared set-up for the host tests: real core fits on the open fixtures, kept small (few trees, two workers).
import * as path from 'node:path';
import { fitForest } from '../../src/core/forest/fit';
import { loadCsv } from '../../src/core/csv/load';
import { Scorer } from '../../src/core/forest/scorer';
import type { FitReport } from '../../src/core/forest/fit';
import type { LoadResult } from '../../src/core/csv/types';
import { ForestSession } from '../../src/extension/session/session';
import { ExplainClient } from '../../src/extension/workers/explainClient';
import { summarizeFit } from '../../src/core/summary/fit';
import { panelSummary } from '../../src/extension/summary/panel';
import type { LoadedCsv } from '../../src/extension/session/csvSource';
import type { FitSummary } from '../../src/protocol/messages';
import { readFileSync } from 'node:fs';

export const FIXTURES = path.resolve(__dirname, '..', '..', '..', 'test', 'fixtures', 'open');

export interface Fitted {
  file: string;
  load: LoadResult;
  report: FitReport;
  session: ForestSession;
}

export async function fitFixture(
  file: string,
  target: string,
  params: { trees: number; seed: number; minLeaf?: number },
  extra: { holdout?: number; intervalLevel?: number; sampleRows?: number } = {},
): Promise<Fitted> {
  const load = await loadCsv(file, extra.sampleRows ? { sampleRows: extra.sampleRows, sampleSeed: params.seed } : undefined);
  const report = await fitForest(load.table, { target, params, workers: 2, holdout: extra.holdout, keepInBag: true });
  const summary = summaryFor(report, load, file, extra.sampleRows !== undefined);
  const session = await ForestSession.create({
    forest: report.forest,
    csv: csvOf(file, load, extra.sampleRows !== undefined),
    text: () => readFileSync(file, 'utf8'),
    oob: { trainRows: report.trainRows, holdoutRows: report.holdoutRows, inBag: report.rows.inBag! },
    summary,
    scorer: new Scorer(report.forest),
    explainer: (setup) => new ExplainClient(setup),
    quantiles: { from: 'fit', report },
    intervalLevel: extra.intervalLevel,
  });
  return { file, load, report, session };
}

/** The panel's summary of a fit, as the fit command makes it (core's summary, reshaped). */
export function summaryFor(report: FitReport, load: Pick<LoadResult, 'table' | 'rowsRead'>, file: string, sampled = false): (fit: string) => FitSummary {
  const core = summarizeFit(report, load.table, { file: path.basename(file), rowsRead: load.rowsRead, sampled });
  return (fit) => panelSummary(core, { fit, uri: `file://${file}` });
}

/** A CSV as the editor would have read it, for building sessions in tests. */
export function csvOf(file: string, load: LoadResult, sampled = false): LoadedCsv {
  return { path: file, load, sampled, seconds: 0, bytes: 0 };
}

/** A 1-based line reader over a file's text (what the editor seam supplies). */
export function readerOf(text: string): (line: number) => string | undefined {
  const lines = text.split('\n').map((l) => l.replace(/\r$/, ''));
  return (line) => lines[line - 1];
}
