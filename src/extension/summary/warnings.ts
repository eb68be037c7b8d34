// Cautions shown with every fit: things that make a good-looking score mean less than it seems.
// Thresholds are our own choices (stated beside each); the checks are cheap counting over at most
// CHECK_ROWS rows, not model fitting, so they run in the host without holding it up.

import type { Column, Task } from '../engine';
import { formatShare } from '../format';

export type CautionKind = 'imbalance' | 'leakage' | 'cardinality' | 'missing';

export interface Caution {
  readonly kind: CautionKind;
  readonly feature?: string;
  readonly message: string;
}

export interface CautionInput {
  readonly task: Task;
  readonly classes: readonly string[];
  readonly target: string;
  /** The table's columns for the model's features, in feature order. */
  readonly features: readonly Column[];
  /** Table row of each training row. */
  readonly trainRows: Int32Array;
  /** Class code or value per training row (indexed like trainRows). */
  readonly truth: Float64Array;
  readonly permutation?: Float64Array;
  /** OOB accuracy (classification) or R² (regression); NaN when unknown. */
  readonly oobScore: number;
  readonly oobBalancedAccuracy?: number;
  readonly seed: number;
}

/** Rows looked at by the single-feature check; enough to tell "nearly perfect" from "good". */
const CHECK_ROWS = 20_000;
/** Minority share below which accuracy is dominated by the larger classes (our threshold). */
const MINORITY_SHARE = 0.1;
/** A feature whose held-back single-feature accuracy reaches this "nearly predicts" the target. */
const LEAK_ACCURACY = 0.98;
const LEAK_R2 = 0.98;
/** Share of all positive permutation importance above which one feature "dominates". */
const DOMINANT_SHARE = 0.9;
const MANY_LEVELS = 50;
const MISSING_SHARE = 0.2;

export function cautions(input: CautionInput): Caution[] {
  const out: Caution[] = [];
  if (input.task === 'classification') imbalance(input, out);
  leakage(input, out);
  cardinality(input, out);
  missing(input, out);
  return out;
}

function imbalance(input: CautionInput, out: Caution[]): void {
  const K = input.classes.length;
  if (K < 2) return;
  const counts = new Array<number>(K).fill(0);
  for (const c of input.truth) if (c >= 0 && c < K) counts[c]++;
  const total = counts.reduce((a, b) => a + b, 0);
  if (total === 0) return;
  let minK = 0;
  for (let k = 1; k < K; k++) if (counts[k] < counts[minK]) minK = k;
  const share = counts[minK] / total;
  if (share >= MINORITY_SHARE) return;
  const bal =
    input.oobBalancedAccuracy !== undefined && Number.isFinite(input.oobBalancedAccuracy)
      ? ` Out-of-bag balanced accuracy is ${formatShare(input.oobBalancedAccuracy)}.`
      : '';
  out.push({
    kind: 'imbalance',
    message:
      `Class imbalance: "${input.classes[minK]}" is ${formatShare(share)} of training rows (${counts[minK]} of ${total}). ` +
      `Plain accuracy can look good by favouring the larger classes; read per-class recall.${bal} ` +
      'The copse.training.balanceClasses setting weights classes equally.',
  });
}

function leakage(input: CautionInput, out: Caution[]): void {
  const rows = sampleRows(input.trainRows.length, CHECK_ROWS, input.seed);
  const half = rows.length >> 1;
  if (half < 30) return;
  const fit = rows.subarray(0, half);
  const check = rows.subarray(half);
  let flagged = false;
  input.features.forEach((col) => {
    const s = singleFeatureScore(col, input, fit, check);
    if (!s) return;
    const nearly =
      input.task === 'classification'
        ? s.score >= LEAK_ACCURACY && 1 - s.score <= 0.1 * (1 - s.baseline)
        : s.score >= LEAK_R2;
    if (!nearly) return;
    flagged = true;
    const what = input.task === 'classification' ? `${formatShare(s.score)} accuracy` : `R² ${s.score.toFixed(3)}`;
    out.push({
      kind: 'leakage',
      feature: col.name,
      message:
        `Possible leakage: "${col.name}" alone predicts "${input.target}" with ${what} on rows it was not tallied on. ` +
        'If it is recorded after the outcome, or computed from it, leave it out and fit again.',
    });
  });
  if (flagged || !input.permutation || input.features.length < 3) return;
  let total = 0;
  let top = 0;
  for (let f = 0; f < input.permutation.length; f++) {
    const v = input.permutation[f];
    if (v > 0) total += v;
    if (v > input.permutation[top]) top = f;
  }
  if (total <= 0) return;
  const share = input.permutation[top] / total;
  if (share >= DOMINANT_SHARE) {
    out.push({
      kind: 'leakage',
      feature: input.features[top].name,
      message:
        `One feature dominates: "${input.features[top].name}" carries ${formatShare(share)} of the permutation importance. ` +
        `Check that it is known before "${input.target}" is, not a restatement of it.`,
    });
  }
}

function cardinality(input: CautionInput, out: Caution[]): void {
  const n = input.trainRows.length;
  for (const col of input.features) {
    if (col.kind === 'numeric') continue;
    const levels = col.levels.length;
    if (levels > MANY_LEVELS || (levels > 10 && levels >= 0.5 * n)) {
      out.push({
        kind: 'cardinality',
        feature: col.name,
        message:
          `"${col.name}" has ${levels} distinct values for ${n} training rows. Splits on many-valued categories fit noise ` +
          'easily and inflate impurity importance (Strobl et al. 2007, BMC Bioinformatics 8:25); trust its permutation importance instead, or leave it out.',
      });
    }
  }
}

function missing(input: CautionInput, out: Caution[]): void {
  const n = input.trainRows.length;
  if (n === 0) return;
  const heavy: string[] = [];
  for (const col of input.features) {
    let miss = 0;
    for (const r of input.trainRows) {
      if (col.kind === 'numeric' ? Number.isNaN(col.values[r]) : col.codes[r] < 0) miss++;
    }
    if (miss / n > MISSING_SHARE) heavy.push(`"${col.name}" ${formatShare(miss / n)}`);
  }
  if (heavy.length) {
    out.push({
      kind: 'missing',
      message:
        `Many missing values: ${heavy.join(', ')} of training rows. Each split sends missing cells one way, ` +
        'so the model learns where values tend to be absent as much as what they are.',
    });
  }
}

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
  for (const i of check) if (!Number.isNaN(input.truth[i])) (mean += input.truth[i]), m++;
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

/** A seeded shuffle of 0..n-1, cut to at most `max`: reproducible across runs of the same fit. */
export function sampleRows(n: number, max: number, seed: number): Int32Array {
  const idx = new Int32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  let s = (seed ^ 0x9e3779b9) >>> 0 || 1;
  const next = (): number => {
    // xorshift32: small, seeded, good enough to split rows at random.
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 4294967296;
  };
  const m = Math.min(n, max);
  for (let i = 0; i < m; i++) {
    const j = i + Math.floor(next() * (n - i));
    const t = idx[i];
    idx[i] = idx[j];
    idx[j] = t;
  }
  return idx.subarray(0, m);
}
