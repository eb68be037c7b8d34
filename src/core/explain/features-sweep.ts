// How many features each split should try, chosen by the out-of-bag error: Breiman (2001), "Random forests",
// Machine Learning 45, suggests exactly this use of the out-of-bag estimate. The forest is refitted
// with a handful of counts around the default and the error of each is reported; the data are never split.
import { findColumn, type Table } from '../data/table';
import { fitForest, inferTask, type FitOptions } from '../forest/fit';
import { defaultParams, resolveFeaturesPerSplit } from '../forest/params';

export interface SweepPoint {
  readonly featuresPerSplit: number;
  /** The forest's out-of-bag error: misclassification rate (classification) or mean squared error (regression). */
  readonly oobError: number;
  /** Out-of-bag accuracy (classification) or R² (regression), for reading beside the error. */
  readonly oobScore: number;
  readonly seconds: number;
}

export interface FeaturesSweep {
  readonly task: 'classification' | 'regression';
  readonly features: number;
  /** The count the fit options would use. */
  readonly defaultCount: number;
  /** One point per count tried, in increasing count. */
  readonly points: readonly SweepPoint[];
  /** The count with the lowest error (the smaller count on a tie: it is faster and no worse). */
  readonly best: number;
}

/** 1, sqrt(p)/2, sqrt(p), 2 sqrt(p), p/3, p/2 and p, rounded down, kept within 1..p, without repeats. */
export function sweepCandidates(p: number): number[] {
  if (!Number.isInteger(p) || p < 1) throw new RangeError(`a sweep needs at least one feature; got ${p}`);
  const s = Math.sqrt(p);
  const raw = [1, s / 2, s, 2 * s, p / 3, p / 2, p].map((v) => Math.min(p, Math.max(1, Math.floor(v))));
  return [...new Set(raw)].sort((a, b) => a - b);
}

/**
 * Refits the forest once per count (default: sweepCandidates plus the default count) with the same seed and
 * settings otherwise, and reports each out-of-bag error. onProgress, if given, counts trees over all fits.
 */
export async function sweepFeaturesPerSplit(table: Table, options: FitOptions, values?: readonly number[]): Promise<FeaturesSweep> {
  const target = findColumn(table, options.target);
  if (!target) throw new RangeError(`There is no column "${options.target}" to predict.`);
  const exclude = new Set(options.exclude ?? []);
  const p = table.columns.filter((c) => c.name !== options.target && !exclude.has(c.name)).length;
  if (p === 0) throw new RangeError('No feature columns are left to fit on.');
  const task = options.task ?? inferTask(target);
  const params = defaultParams(task, options.params);
  const defaultCount = resolveFeaturesPerSplit(params.featuresPerSplit, p);
  let counts: number[];
  if (values) {
    for (const v of values) if (!Number.isInteger(v) || v < 1) throw new RangeError(`features per split must be whole numbers of at least 1; got ${v}`);
    counts = [...new Set(values.map((v) => Math.min(p, v)))].sort((a, b) => a - b);
    if (counts.length === 0) throw new RangeError('The sweep was given no counts to try.');
  } else {
    counts = [...new Set([...sweepCandidates(p), defaultCount])].sort((a, b) => a - b);
  }
  const points: SweepPoint[] = [];
  const total = params.trees * counts.length;
  for (const [step, count] of counts.entries()) {
    const report = await fitForest(table, {
      ...options,
      task,
      params: { ...options.params, featuresPerSplit: count },
      // Only the out-of-bag error is read: skip the test scoring and permutation importance of each refit.
      test: undefined,
      permutationImportance: false,
      onProgress: options.onProgress ? (done) => options.onProgress!(step * params.trees + done, total) : undefined,
    });
    const oobError = report.curve[report.curve.length - 1];
    const oobScore = report.oob.kind === 'classification' ? report.oob.accuracy : report.oob.r2;
    points.push({ featuresPerSplit: count, oobError, oobScore, seconds: report.seconds.fit });
  }
  let best = points[0];
  for (const pt of points) if (pt.oobError < best.oobError) best = pt;
  return { task, features: p, defaultCount, points, best: best.featuresPerSplit };
}
