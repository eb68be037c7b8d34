// Core's ranking, calibration and regression figures reshaped for the panel: null for missing numbers, a
// curve's points as x and y. Nothing is computed here.
import type { CrossValidationView, EvaluationView, RegressionDiagnosticsView } from '../../protocol/messages';
import type { CoreFitSummary, CoreScoresSummary } from '../engine';

const finite = (v: number | undefined | null): number | null => (v !== undefined && v !== null && Number.isFinite(v) ? v : null);

export function panelEvaluation(s: CoreScoresSummary, classes: readonly string[]): EvaluationView | undefined {
  if (s.auc === undefined || !s.curves) return undefined;
  const t = s.curves.thresholds;
  return {
    auc: finite(s.auc),
    brier: finite(s.brier),
    curves: s.curves.byClass.map((c) => ({
      label: c.label,
      code: classes.indexOf(c.label),
      auc: finite(c.auc),
      averagePrecision: finite(c.averagePrecision),
      baseRate: finite(c.baseRate),
      roc: c.roc.map((p) => ({ x: p.falsePositiveRate, y: p.truePositiveRate, threshold: finite(p.threshold) })),
      precisionRecall: c.precisionRecall.map((p) => ({ x: p.recall, y: p.precision, threshold: finite(p.threshold) })),
      calibration: {
        equalWidth: c.calibration.equalWidth.map((b) => ({ lower: b.lower, upper: b.upper, rows: b.rows, meanPredicted: finite(b.meanPredicted), observed: finite(b.observed) })),
        equalCount: c.calibration.equalCount.map((b) => ({ lower: b.lower, upper: b.upper, rows: b.rows, meanPredicted: finite(b.meanPredicted), observed: finite(b.observed) })),
      },
    })),
    thresholds: t
      ? {
          positiveClass: s.positiveClass ?? classes[1] ?? '',
          positives: t.positives,
          negatives: t.negatives,
          tallies: t.tallies.map((x) => ({ threshold: x.threshold, truePositives: x.truePositives, falsePositives: x.falsePositives })),
          presets: t.presets.map((p) => ({ kind: p.kind, target: p.target ?? null, threshold: p.threshold })),
        }
      : null,
  };
}

export function panelDiagnostics(s: CoreScoresSummary): RegressionDiagnosticsView | undefined {
  const d = s.diagnostics;
  if (!d) return undefined;
  return { pairs: d.pairs.map((p) => ({ actual: p.actual, predicted: p.predicted })), rows: d.rows, interval: d.interval ? { ...d.interval } : null };
}

export function panelCrossValidation(s: CoreFitSummary): CrossValidationView | undefined {
  const cv = s.cv;
  if (!cv) return undefined;
  const keys = s.task === 'classification' ? ['accuracy', 'balancedAccuracy', 'auc', 'brier', 'logLoss'] : ['r2', 'mae', 'rmse'];
  const number = (v: unknown) => (typeof v === 'number' ? finite(v) : null);
  return {
    foldCount: cv.foldCount,
    repeats: cv.repeats,
    stratified: cv.stratified,
    scores: keys.map((key) => ({
      key,
      perFold: cv.folds.map((f) => number((f as unknown as Record<string, unknown>)[key])),
      mean: number(cv.mean[key]),
      sd: number(cv.sd[key]),
    })),
  };
}
