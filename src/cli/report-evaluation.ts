// The readable report's lines for ranking, calibration, thresholds, cross-validation and regression
// diagnostics; every number comes from the fit summary (core), written by core's formatter.
import { formatFixed, formatNumber, formatShare } from '../core/format';
import { readTally } from '../core/metrics/thresholds';
import type { CrossValidationSummary, FitSummary, ScoresSummary } from '../core/summary/types';

const num = (v: number | undefined, d = 3) => formatFixed(v, d);

/** ROC AUC, average precision and Brier, or the interval's coverage for regression; '' when there are none. */
export function evaluationLine(s: ScoresSummary): string {
  if (s.auc === undefined && !s.diagnostics?.interval) return '';
  if (s.auc === undefined) {
    const i = s.diagnostics!.interval!;
    return `            ${formatShare(i.level, 0)} interval holds ${formatShare(i.coverage)} of out-of-bag rows (mean width ${formatNumber(i.meanWidth)})\n`;
  }
  const ap = typeof s.averagePrecision === 'number' ? num(s.averagePrecision) : `per class ${Object.entries(s.averagePrecision ?? {}).map(([k, v]) => `${k} ${num(v)}`).join(', ')}`;
  const auc = s.positiveClass ? `ROC AUC ${num(s.auc)}` : `ROC AUC ${num(s.auc)} (mean over classes, each against the rest)`;
  const of = s.positiveClass ? `  (for "${s.positiveClass}")` : '';
  return `            ${auc}  average precision ${ap}  Brier ${num(s.brier)}${of}\n`;
}

/** The threshold presets chosen on out-of-bag rows, and what each gives there and on the held-out rows. */
export function thresholdLines(s: FitSummary): string {
  const t = s.oob?.curves?.thresholds;
  if (!t) return '';
  const held = s.test?.curves?.thresholds;
  let out = `\nThresholds for "${s.oob?.positiveClass ?? ''}" chosen on out-of-bag rows (a row is flagged when its probability exceeds it; copse predict --threshold applies one):\n`;
  for (const p of t.presets) {
    const what = p.kind === 'balanced-accuracy' ? 'best balanced accuracy' : `${p.kind} at least ${num(p.target, 2)}`;
    if (p.threshold === null) {
      out += `  ${what}: no threshold reaches it\n`;
      continue;
    }
    out += `  ${what}: ${num(p.threshold, 2)}  ${reading(t, p.threshold)}${held ? `; held out: ${reading(held, p.threshold)}` : ''}\n`;
  }
  out += held
    ? '  The out-of-bag curve chose these, so the held-out figures are the honest check.\n'
    : '  The out-of-bag curve chose these; check them on rows the forest never saw (--holdout or --test) before relying on one.\n';
  return out;
}

function reading(t: NonNullable<NonNullable<ScoresSummary['curves']>['thresholds']>, threshold: number): string {
  const tally = t.tallies.find((x) => x.threshold === threshold);
  if (!tally) return '';
  const r = readTally(t, tally);
  return `precision ${formatShare(r.precision)}, recall ${formatShare(r.recall)}, flags ${formatShare(r.flagged)}`;
}

export function crossValidationLines(cv: CrossValidationSummary | undefined, task: FitSummary['task']): string {
  if (!cv) return '';
  const keys = task === 'classification' ? ['accuracy', 'balancedAccuracy', 'auc', 'brier', 'logLoss'] : ['r2', 'mae', 'rmse'];
  const names: Record<string, string> = { accuracy: 'accuracy', balancedAccuracy: 'balanced accuracy', auc: 'ROC AUC', brier: 'Brier', logLoss: 'log loss', r2: 'R²', mae: 'MAE', rmse: 'RMSE' };
  const shown = (k: string, v: unknown) => (typeof v !== 'number' ? 'n/a' : k === 'mae' || k === 'rmse' ? formatNumber(v) : num(v));
  const rounds = cv.repeats > 1 ? ` × ${cv.repeats} repeats` : '';
  let out = `\nCross-validation (${cv.foldCount} folds${rounds}, ${cv.stratified ? 'stratified by class, ' : ''}same settings and seed): mean ± sd over ${cv.folds.length} folds\n`;
  out += '  ' + keys.map((k) => `${names[k]} ${shown(k, cv.mean[k])} ± ${shown(k, cv.sd[k])}`).join('  ') + '\n';
  return out;
}
