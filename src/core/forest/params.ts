// Training parameters, in our own names. Defaults follow common practice for random forests (Breiman 2001).

import type { Criterion, Task } from '../base/task';
import { InputError } from '../base/input-error';
import { MAX_SEED, MAX_TREES, MIN_SEED } from '../limits';

// Defined in base/task.ts (the tree grower needs them too); named here as well for this module's callers.
export type { Criterion, Task };
/** 'sqrt' | 'third' | 'log2' | 'all', an integer count >= 1, or a fraction in (0, 1). */
export type FeaturesPerSplit = 'sqrt' | 'third' | 'log2' | 'all' | number;

export interface ForestParams {
  readonly task: Task;
  readonly trees: number;
  readonly featuresPerSplit: FeaturesPerSplit;
  readonly criterion: Criterion;
  /** null: grow until leaves are pure or too small. */
  readonly maxDepth: number | null;
  readonly minSplit: number;
  readonly minLeaf: number;
  /** Rows drawn per tree, as a fraction of the training rows. */
  readonly sampleFraction: number;
  /** true: bootstrap (with replacement); false: subsample without replacement. */
  readonly replace: boolean;
  readonly classWeight: 'none' | 'balanced';
  readonly seed: number;
}

export function defaultParams(task: Task, overrides: Partial<ForestParams> = {}): ForestParams {
  return {
    task,
    trees: 100,
    featuresPerSplit: task === 'classification' ? 'sqrt' : 'third',
    criterion: task === 'classification' ? 'gini' : 'squared-error',
    maxDepth: null,
    minSplit: 2,
    minLeaf: 1,
    sampleFraction: 1,
    replace: true,
    classWeight: 'none',
    seed: 1,
    ...overrides,
  };
}

/** How many features each split tries, for p features. */
export function resolveFeaturesPerSplit(spec: FeaturesPerSplit, p: number): number {
  let k: number;
  if (spec === 'sqrt') k = Math.floor(Math.sqrt(p));
  else if (spec === 'third') k = Math.floor(p / 3);
  else if (spec === 'log2') k = Math.floor(Math.log2(p));
  else if (spec === 'all') k = p;
  else if (Number.isInteger(spec) && spec >= 1) k = spec;
  else if (spec > 0 && spec < 1) k = Math.floor(spec * p);
  else throw new RangeError(`features per split must be sqrt, third, log2, all, a whole number or a fraction in (0, 1); got ${spec}`);
  return Math.min(p, Math.max(1, k));
}

/** Parses the CLI / settings spelling of features per split. */
export function parseFeaturesPerSplit(text: string): FeaturesPerSplit {
  const t = text.trim().toLowerCase();
  if (t === 'sqrt' || t === 'third' || t === 'log2' || t === 'all') return t;
  const n = Number(t);
  if (t !== '' && Number.isFinite(n) && ((Number.isInteger(n) && n >= 1) || (n > 0 && n < 1))) return n;
  throw new RangeError(`features per split must be sqrt, third, log2, all, a whole number or a fraction in (0, 1); got "${text}"`);
}

/** Throws a RangeError naming the first parameter out of range. */
export function validateParams(p: ForestParams): void {
  const whole = (v: number, min: number) => Number.isInteger(v) && v >= min;
  if (!whole(p.trees, 1) || p.trees > MAX_TREES) throw new RangeError(`trees must be a whole number from 1 to ${MAX_TREES}; got ${p.trees}`);
  if (p.maxDepth !== null && !whole(p.maxDepth, 1)) throw new RangeError(`max depth must be a whole number of at least 1; got ${p.maxDepth}`);
  if (!whole(p.minSplit, 2)) throw new RangeError(`min split must be a whole number of at least 2; got ${p.minSplit}`);
  if (!whole(p.minLeaf, 1)) throw new RangeError(`min leaf must be a whole number of at least 1; got ${p.minLeaf}`);
  if (!(p.sampleFraction > 0 && p.sampleFraction <= 1)) throw new RangeError(`sample fraction must be in (0, 1]; got ${p.sampleFraction}`);
  if (!Number.isSafeInteger(p.seed)) throw new RangeError(`seed must be a whole number from ${MIN_SEED} to ${MAX_SEED}; got ${p.seed}`);
  const classCriterion = p.criterion === 'gini' || p.criterion === 'entropy';
  if ((p.task === 'classification') !== classCriterion) throw new InputError(`The criterion ${p.criterion} is for ${classCriterion ? 'classification' : 'regression'}, not ${p.task}.`);
  resolveFeaturesPerSplit(p.featuresPerSplit, 1);
}
