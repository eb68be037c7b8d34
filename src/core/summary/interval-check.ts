// How often a regression forest's prediction interval (quantile regression forest, core/explain/quantiles.ts)
// holds the truth on rows its trees never saw: each training row's interval from its out-of-bag trees only,
// so its own label is in none of the leaves that speak for it. A 90% interval that holds 75% is too narrow.
import type { Table } from '../data/table';
import { inBagCounts } from '../forest/bootstrap';
import type { FitReport } from '../forest/fit';
import { encodeTable } from '../forest/predict';
import { predictQuantiles, quantileIndexFromFit } from '../explain/quantiles';
import { intervalCoverage, type IntervalCoverage } from '../metrics/residual-plot';

/** The level checked (common practice for a prediction interval). */
export const CHECKED_LEVEL = 0.9;

/**
 * Training rows × trees above which the check is skipped: the summary is built on the editor's own thread,
 * and this walks every row down every tree once more (about a second at the budget).
 */
export const COVERAGE_BUDGET = 5_000_000;

/** Undefined when the fit did not keep its trees (they are needed to find each row's leaves), or is over the budget. */
export function outOfBagCoverage(report: FitReport, table: Table, level = CHECKED_LEVEL): IntervalCoverage | undefined {
  const { forest, trainRows } = report;
  if (forest.schema.target.task !== 'regression' || forest.trees.length === 0) return undefined;
  const n = trainRows.length;
  if (n * forest.trees.length > COVERAGE_BUDGET) return undefined;
  const inBag = report.rows.inBag ?? inBagCounts(forest.params, forest.trees.length, n);
  const index = quantileIndexFromFit(report, table);
  const p = forest.schema.features.length;
  const all = encodeTable(forest.schema, table);
  const x = new Float64Array(n * p);
  trainRows.forEach((r, i) => x.set(all.subarray(r * p, r * p + p), i * p));
  const q = predictQuantiles(index, x, n, [(1 - level) / 2, (1 + level) / 2], (i, t) => inBag[t * n + i] === 0);
  const lower = new Float64Array(n);
  const upper = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    lower[i] = report.rows.oobTrees[i] > 0 ? q[2 * i] : NaN;
    upper[i] = report.rows.oobTrees[i] > 0 ? q[2 * i + 1] : NaN;
  }
  return intervalCoverage(report.rows.truth, lower, upper, level);
}
