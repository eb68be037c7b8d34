// The plain-data account of a fit that the command line prints as JSON and the editor panel draws.
import type { DroppedColumn, Table } from '../data/table';
import { argmaxAt, type Scores } from '../metrics/scores';
import type { FitReport } from './fit';
import { resolveFeaturesPerSplit } from './params';

export interface ScoresSummary {
  readonly rows: number;
  readonly accuracy?: number;
  readonly balancedAccuracy?: number;
  readonly logLoss?: number;
  readonly perClass?: ReadonlyArray<{ label: string; precision: number; recall: number; support: number }>;
  readonly confusion?: { labels: readonly string[]; counts: readonly (readonly number[])[] };
  readonly r2?: number;
  readonly mae?: number;
  readonly rmse?: number;
}

export interface SuspectRow {
  /** 1-based data row (the first row after the header is 1). */
  readonly row: number;
  readonly line: number;
  readonly margin: number;
  readonly label: string;
  readonly oobPredicted: string;
}

export interface FitSummary {
  readonly task: string;
  readonly target: string;
  readonly rows: number;
  readonly features: readonly string[];
  readonly dropped: readonly DroppedColumn[];
  readonly trees: number;
  readonly settings: Record<string, unknown>;
  readonly oob: ScoresSummary;
  readonly test?: ScoresSummary;
  readonly importance: {
    readonly impurity: Record<string, number>;
    readonly permutation: Record<string, number>;
    readonly permutationSpread: Record<string, number>;
  };
  readonly curve: readonly number[];
  readonly suspects: readonly SuspectRow[];
  readonly suspectCount: number;
  readonly notes: readonly string[];
  readonly warnings: readonly string[];
}

export function scoresSummary(s: Scores, labels: readonly string[] = []): ScoresSummary {
  if (s.kind === 'regression') return { rows: s.rows, r2: s.r2, mae: s.mae, rmse: s.rmse };
  return {
    rows: s.rows,
    accuracy: s.accuracy,
    balancedAccuracy: s.balancedAccuracy,
    logLoss: s.logLoss,
    perClass: s.perClass,
    confusion: { labels, counts: s.confusion },
  };
}

/** Maps feature index to name, in the model's feature order. */
export function byName(names: readonly string[], values: ArrayLike<number>): Record<string, number> {
  const out: Record<string, number> = Object.create(null);
  names.forEach((n, i) => (out[n] = values[i]));
  return out;
}

/** The data row number (1-based) of a table row: the loader's own count where it kept one. */
export function dataRowOf(table: Table, tableRow: number): number {
  return table.rowNumber ? table.rowNumber[tableRow] : tableRow + 1;
}

export function summarizeFit(report: FitReport, table: Table, extra: { notes?: readonly string[]; warnings?: readonly string[]; suspectLimit?: number } = {}): FitSummary {
  const { forest } = report;
  const names = forest.schema.features.map((f) => f.name);
  const classes = forest.schema.target.classes ?? [];
  const limit = extra.suspectLimit ?? 50;
  const suspects = report.suspects.slice(0, limit).map(({ row, margin }) => {
    const tableRow = report.trainRows[row];
    const best = argmaxAt(report.rows.oobProba!, row * classes.length, classes.length);
    return { row: dataRowOf(table, tableRow), line: table.lineOfRow[tableRow], margin, label: classes[report.rows.truth[row]], oobPredicted: classes[best] };
  });
  const p = forest.params;
  return {
    task: p.task,
    target: forest.schema.target.name,
    rows: report.rows.count,
    features: names,
    dropped: forest.training.dropped,
    trees: p.trees,
    settings: {
      trees: p.trees,
      featuresPerSplit: p.featuresPerSplit,
      featuresTried: resolveFeaturesPerSplit(p.featuresPerSplit, names.length),
      criterion: p.criterion,
      maxDepth: p.maxDepth,
      minSplit: p.minSplit,
      minLeaf: p.minLeaf,
      sampleFraction: p.sampleFraction,
      replace: p.replace,
      classWeight: p.classWeight,
      seed: p.seed,
    },
    oob: scoresSummary(report.oob, classes),
    test: report.test ? scoresSummary(report.test, classes) : undefined,
    importance: {
      impurity: byName(names, report.importance.impurity),
      permutation: byName(names, report.importance.permutation),
      permutationSpread: byName(names, report.importance.permutationSpread),
    },
    curve: Array.from(report.curve),
    suspects,
    suspectCount: report.suspects.length,
    notes: [...report.notes, ...(extra.notes ?? [])],
    warnings: [...(extra.warnings ?? [])],
  };
}
