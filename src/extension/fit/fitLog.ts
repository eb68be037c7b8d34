// What the output channel records about each fit: enough to reproduce it and to see where time went.

import type { FitSummary } from '../../protocol/messages';
import type { ForestParams, LoadResult } from '../engine';
import { formatNumber, formatSeconds, formatShare } from '../engine';

export interface FitLogInput {
  readonly path: string;
  readonly load: Pick<LoadResult, 'rowsRead' | 'notes' | 'warnings' | 'dropped' | 'delimiter' | 'fingerprint'>;
  readonly tableRows: number;
  readonly sampled: boolean;
  readonly params: ForestParams;
  readonly exclude: readonly string[];
  readonly holdout: number;
  readonly workers: number;
  readonly fitNotes: readonly string[];
  readonly summary: FitSummary;
  readonly seconds: { load: number; fit: number; score: number; summary: number };
}

export function fitLogLines(i: FitLogInput): string[] {
  const p = i.params;
  const lines = [
    `Fit on ${i.path}`,
    `  data: ${i.tableRows} rows used of ${i.load.rowsRead} read${i.sampled ? ' (random sample)' : ''}; delimiter ${JSON.stringify(i.load.delimiter)}; sha256 ${i.load.fingerprint.slice(0, 16)}…`,
    `  target: ${i.summary.target} (${p.task}${i.summary.classes.length ? `, ${i.summary.classes.length} classes` : ''}); ${i.summary.features.length} features`,
    `  parameters: trees ${p.trees}, features per split ${p.featuresPerSplit}, impurity ${p.criterion}, depth limit ${p.maxDepth ?? 'none'}, ` +
      `smallest split ${p.minSplit}, smallest leaf ${p.minLeaf}, rows per tree ${formatShare(p.sampleFraction)} ${p.replace ? 'with' : 'without'} replacement, ` +
      `class weights ${p.classWeight}, seed ${p.seed}`,
    `  left out by choice: ${i.exclude.length ? i.exclude.join(', ') : 'none'}; holdout ${i.holdout > 0 ? formatShare(i.holdout) : 'none'}; worker threads ${i.workers || 'one per core'}`,
  ];
  for (const d of i.load.dropped) lines.push(`  dropped column ${d.name}: ${d.reason}`);
  for (const n of i.load.notes) lines.push(`  note: ${n}`);
  for (const w of i.load.warnings) lines.push(`  data warning: ${w}`);
  for (const n of i.fitNotes) lines.push(`  fit note: ${n}`);
  const oob = i.summary.oob;
  if (oob?.kind === 'classification') {
    lines.push(`  out-of-bag: accuracy ${formatShare(oob.accuracy)}, balanced accuracy ${formatShare(oob.balancedAccuracy)} on ${oob.rows} rows`);
  } else if (oob?.kind === 'regression') {
    lines.push(`  out-of-bag: R² ${oob.r2.toFixed(3)}, MAE ${formatNumber(oob.mae)}, RMSE ${formatNumber(oob.rmse)} on ${oob.rows} rows`);
  }
  const held = i.summary.heldOut;
  if (held?.scores.kind === 'classification') lines.push(`  ${held.from}: accuracy ${formatShare(held.scores.accuracy)} on ${held.scores.rows} rows`);
  else if (held?.scores.kind === 'regression') lines.push(`  ${held.from}: R² ${held.scores.r2.toFixed(3)} on ${held.scores.rows} rows`);
  for (const w of i.summary.warnings) lines.push(`  caution: ${w}`);
  const s = i.seconds;
  lines.push(
    `  timings: read ${formatSeconds(s.load)}, fit ${formatSeconds(s.fit)}, scoring rows for hovers ${formatSeconds(s.score)}, summary ${formatSeconds(s.summary)}`,
  );
  return lines;
}
