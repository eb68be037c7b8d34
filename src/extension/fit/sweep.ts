// The features-per-split sweep in pure form: which fit options it refits with, when an earlier sweep still
// applies to the forest shown, and the summary the panel draws. The flow with progress and cancelling is
// in sweepFlow.ts. No `vscode` here.

import type { SweepSummary } from '../../protocol/messages';
import type { FeaturesSweep, FitOptions, Forest } from '../engine';
import { resolveFeaturesPerSplit } from '../engine';
import type { TrainingSettings } from '../settings';
import { paramsFor, type FitChoices } from './choices';

/** What a sweep refits from: the last fit's data and choices. */
export interface SweepOrigin {
  readonly path: string;
  readonly fingerprint: string;
  readonly sampleRows?: number;
  readonly choices: FitChoices;
}

/**
 * Everything a sweep's errors depend on except the features per split: a sweep still describes a refit that
 * changed only that count (the one it offers), and nothing else.
 */
export function sweepKey(o: SweepOrigin): string {
  const c = o.choices;
  return JSON.stringify([o.path, o.fingerprint, o.sampleRows ?? null, c.target, c.task, c.trees, c.maxDepth, c.minLeaf, c.seed, c.holdout, [...c.exclude].sort()]);
}

/** The refits' options: those of the fit itself (same seed, rows and holdout), without its extras. */
export function sweepOptions(choices: FitChoices, training: TrainingSettings): Omit<FitOptions, 'signal' | 'onProgress'> {
  return {
    target: choices.target,
    task: choices.task,
    params: paramsFor(choices, training),
    exclude: [...choices.exclude],
    workers: training.workers > 0 ? training.workers : undefined,
    holdout: choices.holdout > 0 ? choices.holdout : undefined,
    permutationImportance: false,
  };
}

/** The count a forest was grown with. */
export function featuresPerSplitOf(forest: Forest): number {
  return resolveFeaturesPerSplit(forest.params.featuresPerSplit, forest.schema.features.length);
}

export function sweepSummary(s: FeaturesSweep, current: number | null): SweepSummary {
  return {
    task: s.task,
    features: s.features,
    defaultCount: s.defaultCount,
    points: s.points.map((q) => ({ featuresPerSplit: q.featuresPerSplit, oobError: q.oobError, oobScore: q.oobScore, seconds: q.seconds })),
    best: s.best,
    current,
  };
}
