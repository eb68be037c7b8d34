// The one place core's summary (src/core/summary) becomes the panel's: plain JSON, null for missing numbers,
// arrays in feature order. Nothing is computed here; every number was computed once, in core.

import type { FitSummary as PanelSummary, ScoreSummary } from '../../protocol/messages';
import type { CoreFitSummary, CoreScoresSummary } from '../engine';
import { panelCrossValidation, panelDiagnostics, panelEvaluation } from './evaluation';

export interface PanelExtras {
  /** Names this fit for the panel (see FitSummary.fit). */
  readonly fit: string;
  /** The data file's URI, so the host can refit after the panel is restored. */
  readonly uri: string;
}

export function panelSummary(s: CoreFitSummary, extras: PanelExtras): PanelSummary {
  const imp = s.importance;
  return {
    fit: extras.fit,
    dataset: { label: s.data.file, uri: extras.uri },
    target: s.target,
    task: s.task,
    classes: [...s.classes],
    trees: s.trees,
    rowsUsed: s.rows + s.scoredRows,
    rowsRead: s.data.rowsRead,
    sampled: s.data.sampled,
    features: s.features.map((name, k) => ({ name, kind: s.featureKinds[k] })),
    dropped: s.dropped.map((d) => ({ name: d.name, reason: d.reason })),
    oob: s.oob ? panelScores(s.oob, s.task) : null,
    heldOut: s.test ? heldOut(s.test, s.task, s.testFrom) : null,
    curve: s.curve.map(finiteOrNull),
    importance: s.features.map((feature) => ({
      feature,
      impurity: finiteOrNull(imp.impurity[feature]) ?? 0,
      permutation: finiteOrNull(imp.permutation[feature]),
      permutationSpread: finiteOrNull(imp.permutationSpread[feature]),
    })),
    warnings: [...s.notes, ...s.warnings, ...s.cautions.map((c) => c.message)],
    fitSeconds: finiteOrNull(s.fitSeconds),
    suspectCount: s.suspectCount,
    // Absent rather than undefined, so the summary reads back from JSON (the reload store) as it was.
    ...(imp.permutationOn ? { permutationOn: imp.permutationOn } : {}),
    ...(!s.oob && s.oobUnavailable ? { oobUnavailable: s.oobUnavailable } : {}),
    ...(imp.permutationMissing ? { permutationNote: imp.permutationMissing } : {}),
    ...optional('cv', panelCrossValidation(s)),
  };
}

function heldOut(t: CoreScoresSummary, task: PanelSummary['task'], from: CoreFitSummary['testFrom']): PanelSummary['heldOut'] {
  const scores = panelScores(t, task);
  return scores ? { from: from === 'holdout' ? 'holdout' : 'test', scores } : null;
}

function panelScores(s: CoreScoresSummary, task: PanelSummary['task']): ScoreSummary | null {
  if (s.rows === 0) return null;
  if (task === 'classification') {
    if (!Number.isFinite(s.accuracy)) return null;
    return {
      kind: 'classification',
      rows: s.rows,
      accuracy: s.accuracy!,
      balancedAccuracy: finiteOrNull(s.balancedAccuracy) ?? s.accuracy!,
      logLoss: finiteOrNull(s.logLoss),
      perClass: (s.perClass ?? []).map((c) => ({ label: c.label, precision: finiteOrNull(c.precision), recall: finiteOrNull(c.recall), support: c.support })),
      confusion: (s.confusion?.counts ?? []).map((r) => r.slice()),
      ...optional('evaluation', panelEvaluation(s, s.confusion?.labels ?? [])),
    };
  }
  if (!Number.isFinite(s.r2) || !Number.isFinite(s.mae) || !Number.isFinite(s.rmse)) return null;
  return { kind: 'regression', rows: s.rows, r2: s.r2!, mae: s.mae!, rmse: s.rmse!, residuals: s.residuals ?? null, ...optional('diagnostics', panelDiagnostics(s)) };
}

/** Absent rather than undefined, so the summary reads back from JSON (the reload store) as it was. */
function optional<K extends string, V>(key: K, v: V | undefined): { [k in K]?: V } {
  return (v === undefined ? {} : { [key]: v }) as { [k in K]?: V };
}

function finiteOrNull(v: number | null | undefined): number | null {
  return v !== undefined && v !== null && Number.isFinite(v) ? v : null;
}
