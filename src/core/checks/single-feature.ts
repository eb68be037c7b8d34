// How well one column predicts the target by itself, the check behind the leakage caution.
import type { Column } from '../data/table';
import type { CautionInput } from './cautions';

interface SingleScore {
  score: number;
  baseline: number;
}

/**
 * How well one feature predicts the target by itself: bin it (16 quantile bins for numbers, one bin per level),
 * tally the target per bin on one half of the rows, and score that lookup on the other half. The held-back half
 * keeps identifier-like columns (one row per value) from looking perfect.
 */
export function singleFeatureScore(col: Column, input: Pick<CautionInput, 'task' | 'classes' | 'trainRows' | 'truth'>, fit: Int32Array, check: Int32Array): SingleScore | undefined {
  const binOf = binner(col, input.trainRows, fit);
  const bins = binOf.count;
  if (input.task === 'classification') {
    const K = input.classes.length;
    const counts = new Float64Array(bins * K);
    const overall = new Float64Array(K);
    for (const i of fit) {
      const c = input.truth[i];
      if (!(c >= 0 && c < K)) continue;
      counts[binOf(i) * K + c]++;
      overall[c]++;
    }
    const globalBest = argmax(overall, 0, K);
    const best = new Int32Array(bins);
    for (let b = 0; b < bins; b++) {
      let any = false;
      for (let k = 0; k < K; k++) if (counts[b * K + k] > 0) any = true;
      best[b] = any ? argmax(counts, b * K, K) : globalBest;
    }
    let hit = 0;
    let base = 0;
    let m = 0;
    for (const i of check) {
      const c = input.truth[i];
      if (!(c >= 0 && c < K)) continue;
      m++;
      if (best[binOf(i)] === c) hit++;
      if (globalBest === c) base++;
    }
    return m ? { score: hit / m, baseline: base / m } : undefined;
  }
  const sum = new Float64Array(bins);
  const cnt = new Float64Array(bins);
  let all = 0;
  let allN = 0;
  for (const i of fit) {
    const y = input.truth[i];
    if (Number.isNaN(y)) continue;
    sum[binOf(i)] += y;
    cnt[binOf(i)]++;
    all += y;
    allN++;
  }
  if (allN === 0) return undefined;
  const globalMean = all / allN;
  let mean = 0;
  let m = 0;
  for (const i of check) {
    if (!Number.isNaN(input.truth[i])) {
      mean += input.truth[i];
      m++;
    }
  }
  if (m === 0) return undefined;
  mean /= m;
  let sse = 0;
  let sst = 0;
  for (const i of check) {
    const y = input.truth[i];
    if (Number.isNaN(y)) continue;
    const b = binOf(i);
    const pred = cnt[b] > 0 ? sum[b] / cnt[b] : globalMean;
    sse += (y - pred) ** 2;
    sst += (y - mean) ** 2;
  }
  return sst > 0 ? { score: 1 - sse / sst, baseline: 0 } : undefined;
}

type Binner = ((i: number) => number) & { count: number };

/** Maps a training-row index to a bin; the last bin holds missing cells. */
function binner(col: Column, trainRows: Int32Array, fit: Int32Array): Binner {
  if (col.kind !== 'numeric') {
    const L = col.levels.length;
    const f = ((i: number) => {
      const c = col.codes[trainRows[i]];
      return c >= 0 && c < L ? c : L;
    }) as Binner;
    f.count = L + 1;
    return f;
  }
  const vals: number[] = [];
  for (const i of fit) {
    const v = col.values[trainRows[i]];
    if (!Number.isNaN(v)) vals.push(v);
  }
  vals.sort((a, b) => a - b);
  const edges: number[] = [];
  for (let q = 1; q < 16; q++) {
    if (vals.length === 0) break;
    const e = vals[Math.min(vals.length - 1, Math.floor((q * vals.length) / 16))];
    if (edges.length === 0 || e > edges[edges.length - 1]) edges.push(e);
  }
  const B = edges.length + 1;
  const f = ((i: number) => {
    const v = col.values[trainRows[i]];
    if (Number.isNaN(v)) return B;
    let lo = 0;
    let hi = edges.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (v <= edges[mid]) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  }) as Binner;
  f.count = B + 1;
  return f;
}

function argmax(a: Float64Array, from: number, n: number): number {
  let best = 0;
  for (let k = 1; k < n; k++) if (a[from + k] > a[from + best]) best = k;
  return best;
}
