// Split quality from per-side sums ("channels"). Classification: one channel per class, holding that class's
// weight. Regression: channel 0 is the weight, channel 1 the weighted sum of the target.
// For each criterion, score(left) + score(right) - score(parent) is the weighted impurity decrease
// W·i(parent) - W_L·i(left) - W_R·i(right), so the splitter maximises score(left) + score(right).
import type { Criterion } from '../base/task';

export type SideScore = (ch: Float64Array, offset: number, channels: number) => number;

function giniScore(ch: Float64Array, o: number, c: number): number {
  let w = 0;
  let sq = 0;
  for (let k = 0; k < c; k++) {
    const v = ch[o + k];
    w += v;
    sq += v * v;
  }
  return w > 0 ? sq / w : 0;
}

function entropyScore(ch: Float64Array, o: number, c: number): number {
  let w = 0;
  let s = 0;
  for (let k = 0; k < c; k++) {
    const v = ch[o + k];
    if (v > 0) {
      w += v;
      s += v * Math.log(v);
    }
  }
  return w > 0 ? s - w * Math.log(w) : 0;
}

function squaredErrorScore(ch: Float64Array, o: number): number {
  const w = ch[o];
  return w > 0 ? (ch[o + 1] * ch[o + 1]) / w : 0;
}

export function sideScore(criterion: Criterion): SideScore {
  switch (criterion) {
    case 'gini':
      return giniScore;
    case 'entropy':
      return entropyScore;
    case 'squared-error':
      return squaredErrorScore;
  }
}

/** Impurity of one node from its channel sums: Gini index, entropy in bits, or variance. */
export function nodeImpurity(criterion: Criterion, ch: ArrayLike<number>): number {
  if (criterion === 'squared-error') {
    throw new RangeError('regression impurity needs the sum of squares; use varianceOf');
  }
  let w = 0;
  for (let k = 0; k < ch.length; k++) w += ch[k];
  if (w <= 0) return 0;
  let acc = 0;
  for (let k = 0; k < ch.length; k++) {
    const p = ch[k] / w;
    if (criterion === 'gini') acc += p * p;
    else if (p > 0) acc -= p * Math.log2(p);
  }
  return criterion === 'gini' ? 1 - acc : acc;
}

export function varianceOf(y: ArrayLike<number>, w?: ArrayLike<number>): number {
  let sw = 0;
  let s = 0;
  for (let i = 0; i < y.length; i++) {
    const wi = w ? w[i] : 1;
    sw += wi;
    s += wi * y[i];
  }
  const mean = s / sw;
  let v = 0;
  for (let i = 0; i < y.length; i++) v += (w ? w[i] : 1) * (y[i] - mean) ** 2;
  return v / sw;
}
