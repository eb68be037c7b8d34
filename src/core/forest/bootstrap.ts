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
