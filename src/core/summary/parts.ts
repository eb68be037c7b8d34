// Pieces every summary is built from, whether of a fresh fit or of a forest opened against a file.
import type { Table } from '../data/table';
import type { Doubt } from '../forest/doubtful';
import type { Evaluation } from '../metrics/evaluation';
import type { RegressionDiagnostics } from '../metrics/residual-plot';
import type { Scores } from '../metrics/scores';
import type { ResidualSummary, ScoresSummary, SuspectRow } from './types';

export interface ScoresExtra {
  /** Classification: ranking and calibration figures of the same rows' probabilities. */
  readonly evaluation?: Evaluation;
  readonly diagnostics?: RegressionDiagnostics;
}

export function scoresSummary(s: Scores, labels: readonly string[] = [], residuals?: ResidualSummary, extra: ScoresExtra = {}): ScoresSummary {
  if (s.kind === 'regression') return { rows: s.rows, r2: s.r2, mae: s.mae, rmse: s.rmse, residuals, ...(extra.diagnostics ? { diagnostics: extra.diagnostics } : {}) };
  const e = extra.evaluation;
  return {
    rows: s.rows,
    accuracy: s.accuracy,
    balancedAccuracy: s.balancedAccuracy,
    logLoss: s.logLoss,
    perClass: s.perClass,
    confusion: { labels, counts: s.confusion },
    ...(e ? evaluationPart(e, labels) : {}),
  };
}

function evaluationPart(e: Evaluation, labels: readonly string[]): Partial<ScoresSummary> {
  const two = labels.length === 2;
  const aucByClass = Object.create(null) as Record<string, number>;
  for (const c of e.curves) aucByClass[c.label] = c.auc;
  return {
    auc: e.auc,
    ...(two || e.curves.length === 0 ? {} : { aucByClass }),
    averagePrecision: e.averagePrecision,
    brier: e.brier,
    ...(two ? { positiveClass: labels[1] } : {}),
    ...(e.curves.length ? { curves: { byClass: e.curves, ...(e.thresholds ? { thresholds: e.thresholds } : {}) } } : {}),
  };
}

/** Five-number summary of truth − prediction over the rows that have both; undefined when none do. */
export function residualSummary(truth: ArrayLike<number>, predicted: ArrayLike<number>): ResidualSummary | undefined {
  const r: number[] = [];
  for (let i = 0; i < truth.length; i++) {
    const d = truth[i] - predicted[i];
    if (Number.isFinite(d)) r.push(d);
  }
  if (r.length === 0) return undefined;
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

/** Maps feature index to name, in the model's feature order. */
export function byName(names: readonly string[], values: ArrayLike<number>): Record<string, number> {
  const out = Object.create(null) as Record<string, number>;
  names.forEach((n, i) => (out[n] = values[i]));
  return out;
}

/** The data row number (1-based) of a table row: the loader's own count where it kept one. */
export function dataRowOf(table: Table, tableRow: number): number {
  return table.rowNumber ? table.rowNumber[tableRow] : tableRow + 1;
}

export interface SuspectSource {
  readonly table: Table;
  /** Class names; [] for regression. */
  readonly classes: readonly string[];
  /** For a doubt's index: its table row, its label (code or value) and what its out-of-bag trees say. */
  readonly tableRow: (index: number) => number;
  readonly truth: (index: number) => number;
  readonly oobPredicted: (index: number) => number;
}

/** Doubtful rows as users read them: row and line numbers, labels and votes by name. */
export function suspectRows(doubts: readonly Doubt[], at: SuspectSource): SuspectRow[] {
  const classification = at.classes.length > 0;
  return doubts.map((d) => {
    const r = at.tableRow(d.index);
    const name = (v: number): string | number => (classification ? (at.classes[v] ?? String(v)) : v);
    return {
      row: dataRowOf(at.table, r),
      line: at.table.lineOfRow[r],
      label: name(at.truth(d.index)),
      oobPredicted: name(at.oobPredicted(d.index)),
      ...(classification ? { margin: d.score } : { zScore: d.score }),
    };
  });
}
