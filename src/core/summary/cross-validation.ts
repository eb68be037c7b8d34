// k-fold cross-validation: K forests, each fitted on all folds but one and scored on that one, with the
// same settings and seed as the fit itself. Folds are stratified by class, shuffled from the seed (a stream
// of its own per repeat), and every forest is grown as any fit is, so the result is the same for any number
// of workers.
import { findColumn, type Table } from '../data/table';
import { fitForest, type FitOptions } from '../forest/fit';
import { defaultParams } from '../forest/params';
import { shuffle, stream } from '../forest/rng';
import { encodeTarget, inferTask } from '../forest/target';
import { evaluateProbabilities } from '../metrics/evaluation';
import { foldsOf, spreadOf } from '../metrics/folds';
import { scoresSummary } from './parts';
import type { CrossValidationSummary, ScoresSummary } from './types';

export interface CrossValidationOptions {
  readonly folds: number;
  /** Times the whole K-fold round is run, each with its own shuffle (default 1). */
  readonly repeats?: number;
  /** Trees grown so far over every fold's forest, of all of them. */
  readonly onProgress?: (treesDone: number, treesTotal: number) => void;
}

/** Scores averaged over folds: the numbers each fold's score object carries. */
const CLASSIFICATION_KEYS = ['accuracy', 'balancedAccuracy', 'logLoss', 'auc', 'averagePrecision', 'brier'] as const;
const REGRESSION_KEYS = ['r2', 'mae', 'rmse'] as const;

export async function crossValidate(table: Table, fit: FitOptions, cv: CrossValidationOptions): Promise<CrossValidationSummary> {
  const column = findColumn(table, fit.target);
  if (!column) throw new RangeError(`There is no column "${fit.target}" to predict.`);
  const task = fit.task ?? inferTask(column);
  const params = defaultParams(task, fit.params);
  const encoded = encodeTarget(column, task);
  const repeats = cv.repeats ?? 1;
  const classes = encoded.classes ?? [];
  const stratified = task === 'classification';
  const total = params.trees * cv.folds * repeats;
  const folds: ScoresSummary[] = [];
  for (let r = 0; r < repeats; r++) {
    const random = stream(params.seed, 'folds', r);
    const fold = foldsOf(encoded.rows.length, cv.folds, (a) => shuffle(a, random), stratified ? (i) => encoded.y[i] : undefined);
    for (let k = 0; k < cv.folds; k++) {
      const train = encoded.rows.filter((_, i) => fold[i] !== k);
      const holdout = encoded.rows.filter((_, i) => fold[i] === k);
      const before = (r * cv.folds + k) * params.trees;
      const report = await fitForest(table, {
        ...fit,
        holdout: undefined,
        test: undefined,
        split: { train, holdout },
        keepTrees: true,
        onTree: undefined,
        permutationImportance: false,
        onProgress: (d) => cv.onProgress?.(before + d, total),
      });
      const truth = report.testTruth!;
      const p = report.testPrediction!;
      const extra = p.proba ? { evaluation: evaluateProbabilities(truth, p.proba, classes, undefined, false) } : {};
      folds.push(scoresSummary(report.test!, classes, undefined, extra));
    }
  }
  const keys: readonly string[] = stratified ? CLASSIFICATION_KEYS : REGRESSION_KEYS;
  const mean: Record<string, number | Record<string, number>> = {};
  const sd: Record<string, number | Record<string, number>> = {};
  for (const key of keys) {
    const values = folds.map((f) => (f as unknown as Record<string, unknown>)[key]);
    if (values.every((v) => typeof v === 'number')) {
      const s = spreadOf(values);
      mean[key] = s.mean;
      sd[key] = s.sd;
    } else if (values.every((v) => v && typeof v === 'object')) {
      // Per class (average precision with more than two classes).
      const m = Object.create(null) as Record<string, number>;
      const d = Object.create(null) as Record<string, number>;
      for (const label of classes) {
        const s = spreadOf(values.map((v) => (v as Record<string, number>)[label]));
        m[label] = s.mean;
        d[label] = s.sd;
      }
      mean[key] = m;
      sd[key] = d;
    }
  }
  return { folds, repeats, foldCount: cv.folds, stratified, mean, sd };
}
