// The summary of a fresh fit (see types.ts): scores, importances, curve, doubtful rows and cautions.
import { cautions } from '../checks/cautions';
import type { Column, Table } from '../data/table';
import type { FitReport } from '../forest/fit';
import { resolveFeaturesPerSplit } from '../forest/params';
import { evaluateProbabilities } from '../metrics/evaluation';
import { predictionPairs } from '../metrics/residual-plot';
import { argmaxAt } from '../metrics/scores';
import { outOfBagCoverage } from './interval-check';
import { byName, residualSummary, scoresSummary, suspectRows, type ScoresExtra } from './parts';
import type { FitSummary } from './types';

export { byName, dataRowOf, residualSummary, scoresSummary } from './parts';

export interface FitSummaryExtra {
  /** The data file's name as the user knows it, its fingerprint, and how many rows were read. */
  readonly file?: string;
  readonly rowsRead?: number;
  readonly sampled?: boolean;
  /** Where report.test came from (default: rows held out of the fit, or a test file when none were). */
  readonly testFrom?: 'holdout' | 'test';
  readonly notes?: readonly string[];
  readonly warnings?: readonly string[];
  /** How many doubtful rows to list (all are counted). */
  readonly suspectLimit?: number;
}

export function summarizeFit(report: FitReport, table: Table, extra: FitSummaryExtra = {}): FitSummary {
  const { forest } = report;
  const schema = forest.schema;
  const names = schema.features.map((f) => f.name);
  const classes = schema.target.classes ?? [];
  const p = forest.params;
  const oob = report.oob;
  // One lookup table, not findColumn per name: that is a scan per feature, minutes on 100,000 columns.
  const columnOf = new Map(table.columns.map((c) => [c.name, c]));
  const columns = names.map((n) => columnOf.get(n)).filter((c): c is Column => c !== undefined);
  const found = cautions({
    task: p.task,
    classes,
    target: schema.target.name,
    features: columns,
    trainRows: report.trainRows,
    truth: report.rows.truth,
    permutation: report.importance.permutation,
    oobScore: oob.kind === 'classification' ? oob.accuracy : oob.r2,
    oobBalancedAccuracy: oob.kind === 'classification' ? oob.balancedAccuracy : undefined,
    seed: p.seed,
  });
  const residuals = report.rows.oobValue ? residualSummary(report.rows.truth, report.rows.oobValue) : undefined;
  const { oobProba, oobValue } = report.rows;
  return {
    task: p.task,
    target: schema.target.name,
    classes,
    data: { file: extra.file ?? '', fingerprint: forest.training.fingerprint, rowsRead: extra.rowsRead ?? table.rowCount, sampled: extra.sampled ?? false },
    rows: report.rows.count,
    scoredRows: report.holdoutRows?.length ?? report.test?.rows ?? 0,
    features: names,
    featureKinds: schema.features.map((f) => f.kind),
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
    oob: scoresSummary(oob, classes, residuals, oobExtra(report, table, classes)),
    test: report.test ? scoresSummary(report.test, classes, undefined, testExtra(report, classes)) : undefined,
    testFrom: report.test ? (extra.testFrom ?? (report.holdoutRows ? 'holdout' : 'test')) : undefined,
    importance: {
      impurity: byName(names, report.importance.impurity),
      permutation: byName(names, report.importance.permutation),
      permutationSpread: byName(names, report.importance.permutationSpread),
      permutationOn: 'out-of-bag',
    },
    curve: Array.from(report.curve),
    suspects: suspectRows(report.suspects.slice(0, extra.suspectLimit ?? 50), {
      table,
      classes,
      tableRow: (i) => report.trainRows[i],
      truth: (i) => report.rows.truth[i],
      oobPredicted: (i) => (oobProba ? argmaxAt(oobProba, i * classes.length, classes.length) : oobValue![i]),
    }),
    suspectCount: report.suspects.length,
    cautions: found.map((c) => ({ kind: c.kind, column: c.column, message: c.message })),
    notes: [...report.notes, ...(extra.notes ?? [])],
    warnings: [...(extra.warnings ?? [])],
    fitSeconds: report.seconds.fit,
  };
}

/** Ranking and calibration of the out-of-bag probabilities, or predicted against actual, over rows with out-of-bag trees. */
function oobExtra(report: FitReport, table: Table, classes: readonly string[]): ScoresExtra {
  const { truth, oobProba, oobValue, oobTrees } = report.rows;
  const has = (i: number) => oobTrees[i] > 0;
  if (oobProba) return { evaluation: evaluateProbabilities(truth, oobProba, classes, has) };
  if (!oobValue) return {};
  const interval = outOfBagCoverage(report, table);
  return { diagnostics: { ...predictionPairs(truth, oobValue, has), ...(interval ? { interval } : {}) } };
}

function testExtra(report: FitReport, classes: readonly string[]): ScoresExtra {
  const p = report.testPrediction;
  const truth = report.testTruth;
  if (!p || !truth) return {};
  if (p.proba) return { evaluation: evaluateProbabilities(truth, p.proba, classes) };
  return { diagnostics: predictionPairs(truth, p.predicted) };
}
