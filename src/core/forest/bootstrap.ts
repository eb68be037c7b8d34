import { stream } from './rng';

/**
 * Times each of n rows is drawn for tree t: m draws with replacement (the bootstrap), or m distinct rows
 * without. Depends only on (seed, t, n, m, replace), so a saved model can recompute which rows were out-of-bag.
 */
export function drawSample(seed: number, t: number, n: number, m: number, replace: boolean): Int32Array {
  const counts = new Int32Array(n);
  const random = stream(seed, 'sample', t);
  if (replace) {
    for (let d = 0; d < m; d++) counts[Math.floor(random() * n)]++;
  } else {
    // Selection sampling (Knuth's Algorithm S): m distinct rows in one pass, no index array.
    let need = Math.min(m, n);
    for (let i = 0; i < n && need > 0; i++) {
      if (random() * (n - i) < need) {
        counts[i] = 1;
        need--;
      }
    }
  }
  return counts;
}

export function sampleSize(n: number, fraction: number): number {
  return Math.max(1, Math.round(n * fraction));
}

/**
 * Tree-major in-bag counts of every tree (inBag[t * n + i], capped at 255), drawn again from the forest's seed.
 * A fit does not keep them: for millions of rows they would cost a byte per row and tree, and the draw is cheap
 * to repeat for the few callers that need all of them.
 */
export function inBagCounts(params: { seed: number; sampleFraction: number; replace: boolean }, trees: number, n: number): Uint8Array {
  const inBag = new Uint8Array(trees * n);
  const m = sampleSize(n, params.sampleFraction);
  for (let t = 0; t < trees; t++) {
    const counts = drawSample(params.seed, t, n, m, params.replace);
    for (let i = 0; i < n; i++) inBag[t * n + i] = Math.min(255, counts[i]);
  }
  return inBag;
}

/** The trees that never drew row i (ascending), from tree-major in-bag counts over n rows (inBag[t * n + i]). */
export function outOfBagTrees(inBag: ArrayLike<number>, trees: number, n: number, i: number): Int32Array {
  if (!(Number.isInteger(i) && i >= 0 && i < n)) throw new RangeError(`There is no training row ${i}; there are ${n}.`);
  if (inBag.length !== trees * n) throw new RangeError(`In-bag counts for ${trees} trees and ${n} rows need ${trees * n} entries; got ${inBag.length}.`);
  let count = 0;
  for (let t = 0; t < trees; t++) if (inBag[t * n + i] === 0) count++;
  const out = new Int32Array(count);
  for (let t = 0, at = 0; t < trees; t++) if (inBag[t * n + i] === 0) out[at++] = t;
  return out;
}
