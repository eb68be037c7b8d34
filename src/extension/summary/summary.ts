// Turns core's FitReport (typed arrays, NaN) into the panel's FitSummary (plain JSON, null).

import type { FitSummary, ScoreSummary, ResidualSummary } from '../../protocol/messages';
import type { Forest, FitReport, Scores } from '../engine';

export interface SummaryInput {
  readonly forest: Forest;
  readonly report: Pick<FitReport, 'oob' | 'test' | 'curve' | 'importance' | 'rows' | 'seconds' | 'holdoutRows'>;
  readonly dataset: { label: string; uri: string };
  readonly rowsRead: number;
  readonly sampled: boolean;
  /** 'test' when scores came from a separate file rather than held-out rows. */
  readonly heldOutFrom?: 'holdout' | 'test';
  readonly warnings: readonly string[];
}

export function buildSummary(input: SummaryInput): FitSummary {
  const { forest, report } = input;
  const schema = forest.schema;
  const task = schema.target.task;
  const impurity = Array.from(report.importance.impurity);
  const impTotal = impurity.reduce((a, b) => (Number.isFinite(b) && b > 0 ? a + b : a), 0);
  const residuals = task === 'regression' && report.rows.oobValue ? residualSummary(report.rows.truth, report.rows.oobValue) : null;
  return {
    dataset: input.dataset,
    target: schema.target.name,
    task,
    classes: task === 'classification' ? [...(schema.target.classes ?? [])] : [],
    trees: forest.trees.length,
    rowsUsed: report.rows.count + (report.holdoutRows?.length ?? 0),
    rowsRead: input.rowsRead,
    sampled: input.sampled,
    features: schema.features.map((f) => ({ name: f.name, kind: f.kind })),
    dropped: forest.training.dropped.map((d) => ({ name: d.name, reason: d.reason })),
    oob: scoreSummary(report.oob, residuals),
    heldOut: report.test ? scoreHeldOut(report.test, input.heldOutFrom ?? 'holdout') : null,
    curve: Array.from(report.curve, finiteOrNull),
    importance: schema.features.map((f, i) => ({
      feature: f.name,
      impurity: impTotal > 0 && Number.isFinite(impurity[i]) ? Math.max(0, impurity[i]) / impTotal : 0,
      permutation: finiteOrNull(report.importance.permutation[i]),
      permutationSpread: finiteOrNull(report.importance.permutationSpread[i]),
    })),
    warnings: [...input.warnings],
    fitSeconds: finiteOrNull(report.seconds.fit),
  };
}

function scoreHeldOut(s: Scores, from: 'holdout' | 'test'): FitSummary['heldOut'] {
  const scores = scoreSummary(s, null);
  return scores ? { from, scores } : null;
}

export function scoreSummary(s: Scores | undefined, residuals: ResidualSummary | null): ScoreSummary | null {
  if (!s || s.rows === 0) return null;
  if (s.kind === 'classification') {
    if (!Number.isFinite(s.accuracy)) return null;
    return {
      kind: 'classification',
      rows: s.rows,
      accuracy: s.accuracy,
      balancedAccuracy: Number.isFinite(s.balancedAccuracy) ? s.balancedAccuracy : s.accuracy,
      logLoss: finiteOrNull(s.logLoss),
      perClass: s.perClass.map((c) => ({
        label: c.label,
        precision: finiteOrNull(c.precision),
        recall: finiteOrNull(c.recall),
        support: c.support,
      })),
      confusion: s.confusion.map((r) => r.slice()),
    };
  }
  if (!Number.isFinite(s.r2) || !Number.isFinite(s.mae) || !Number.isFinite(s.rmse)) return null;
  return { kind: 'regression', rows: s.rows, r2: s.r2, mae: s.mae, rmse: s.rmse, residuals };
}

/** Five-number summary of truth − OOB prediction over rows that have both. */
export function residualSummary(truth: Float64Array, predicted: Float64Array): ResidualSummary | null {
  const r: number[] = [];
  for (let i = 0; i < truth.length; i++) {
    const d = truth[i] - predicted[i];
    if (Number.isFinite(d)) r.push(d);
  }
  if (r.length === 0) return null;
  r.sort((a, b) => a - b);
  return { min: r[0], q1: quantile(r, 0.25), median: quantile(r, 0.5), q3: quantile(r, 0.75), max: r[r.length - 1] };
}

/** Linear interpolation between order statistics (type 7 in Hyndman & Fan 1996, R's default). */
export function quantile(sorted: readonly number[], q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

function finiteOrNull(v: number | undefined): number | null {
  return v !== undefined && Number.isFinite(v) ? v : null;
}
