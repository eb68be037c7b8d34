// Writes the shareable HTML report (src/report) for `copse fit --report` and `copse report`. The path is checked
// before any work: a report must never replace one of the command's inputs.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { writeFileAtomic } from '../core/atomic';
import type { Table } from '../core/data/table';
import type { Forest } from '../core/forest/forest';
import { encodeTable } from '../core/forest/predict';
import { targetCodes } from '../core/forest/target';
import type { FitSummary } from '../core/summary/types';
import { gatherReport } from '../report/gather';
import { renderReport } from '../report/html';
import type { ReportData } from '../report/types';
import { checkOutput, writeFailure, type Guarded } from './output';

/**
 * Refuses a report path that is one of the inputs, or that cannot be written. One call, so the shared
 * never-write-over-an-input check can take its place.
 */
export async function checkReportPath(out: string, flag: string, inputs: readonly Guarded[]): Promise<void> {
  await checkOutput(out, flag, inputs);
}

export interface CliReport {
  readonly summary: FitSummary;
  readonly forest: Forest;
  readonly table: Table;
  readonly dataPath: string;
  /** Table rows the forest was fitted on; null when not known here. */
  readonly trainRows: ArrayLike<number> | null;
  readonly model?: ReportData['model'];
  readonly version: string;
}

/** Gathers, renders and writes the report; returns its size in bytes. */
export async function writeHtmlReport(out: string, r: CliReport): Promise<number> {
  const bytes = await fs.stat(r.dataPath).then((s) => s.size).catch(() => null);
  const data = gatherReport({
    summary: r.summary,
    forest: r.forest,
    encoded: encodeTable(r.forest.schema, r.table, r.dataPath),
    rows: r.table.rowCount,
    trainRows: r.trainRows,
    truth: targetCodes(r.forest, r.table),
    file: { name: path.basename(r.dataPath), bytes },
    model: r.model,
    version: r.version,
  });
  const html = renderReport(data);
  await writeFileAtomic(out, html).catch((e) => {
    throw writeFailure(e, out);
  });
  return Buffer.byteLength(html);
}
