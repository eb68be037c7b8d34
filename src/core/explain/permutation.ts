// Permutation importance on rows given after the fit: a forest opened from a file has no out-of-bag rows, so
// what it leans on is measured on the labelled rows it is shown against instead. Each feature's column is
// shuffled among those rows and the rows rescored; the rise in error is what the forest loses without that
// feature's link to the target (Breiman 2001, section 10, with the given rows in place of out-of-bag ones).
//
// Scoring is passed in, so a caller can keep it off its own thread (the editor scores in a worker).
import type { Prediction } from '../forest/predict';
import { shuffle, stream } from '../forest/rng';

export interface PermutationInput {
  /** Encoded rows, row-major: x[row * features + f]. */
  readonly x: Float64Array;
  readonly rows: number;
  readonly features: number;
  /** Per row: class code or value; NaN rows are left out. */
  readonly truth: Float64Array;
  readonly task: 'classification' | 'regression';
  readonly seed: number;
  /** Shuffles per feature; their spread says how much of a feature's figure is the shuffle's luck. */
  readonly repeats?: number;
  /** Labelled rows used at most (a seeded sample beyond that), to bound the rescoring. */
  readonly maxRows?: number;
  /** Stops between shuffles (an AbortError) when aborted. */
  readonly signal?: AbortSignal;
}

export interface PermutationImportance {
  /** Per feature: mean rise in error (1 − accuracy, or mean squared error) over the repeats. */
  readonly mean: Float64Array;
  /** Per feature: standard deviation of that rise over the repeats. */
  readonly spread: Float64Array;
  /** The error with no column shuffled. */
  readonly baseline: number;
  /** Labelled rows it was measured on. */
  readonly rows: number;
}

export type ScoreRows = (x: Float64Array, rows: number) => Promise<Prediction>;

export async function permutationOnRows(input: PermutationInput, score: ScoreRows): Promise<PermutationImportance> {
  const { features: p, task, seed } = input;
  const repeats = input.repeats ?? 3;
  const labelled: number[] = [];
  for (let r = 0; r < input.rows; r++) if (!Number.isNaN(input.truth[r])) labelled.push(r);
  let chosen = Int32Array.from(labelled);
  const cap = input.maxRows ?? 5000;
  if (chosen.length > cap) {
    shuffle(chosen, stream(seed, 'permutation-rows'));
    chosen = chosen.slice(0, cap).sort();
  }
  const n = chosen.length;
  const mean = new Float64Array(p);
  const spread = new Float64Array(p);
  if (n === 0) return { mean: mean.fill(NaN), spread: spread.fill(NaN), baseline: NaN, rows: 0 };
  const x = new Float64Array(n * p);
  const truth = new Float64Array(n);
  chosen.forEach((r, i) => {
    x.set(input.x.subarray(r * p, r * p + p), i * p);
    truth[i] = input.truth[r];
  });
  const errorOf = (pred: Prediction): number => {
    let e = 0;
    for (let i = 0; i < n; i++) {
      const d = pred.predicted[i] - truth[i];
      e += task === 'classification' ? (d === 0 ? 0 : 1) : d * d;
    }
    return e / n;
  };
  const baseline = errorOf(await score(x, n));
  const order = new Int32Array(n);
  const rises = new Float64Array(repeats);
  for (let f = 0; f < p; f++) {
    const column = Float64Array.from({ length: n }, (_, i) => x[i * p + f]);
    for (let k = 0; k < repeats; k++) {
      input.signal?.throwIfAborted();
      for (let i = 0; i < n; i++) order[i] = i;
      // One stream per (feature, repeat): a feature's figure does not depend on how many others there are.
      shuffle(order, stream(seed, 'permutation', f * repeats + k));
      const shuffled = x.slice();
      for (let i = 0; i < n; i++) shuffled[i * p + f] = column[order[i]];
      rises[k] = errorOf(await score(shuffled, n)) - baseline;
    }
    let s = 0;
    for (const v of rises) s += v;
    const m = s / repeats;
    let sq = 0;
    for (const v of rises) sq += (v - m) ** 2;
    mean[f] = m;
    spread[f] = repeats > 1 ? Math.sqrt(sq / (repeats - 1)) : 0;
  }
  return { mean, spread, baseline, rows: n };
}
