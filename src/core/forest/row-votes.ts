// Per-row answers for one scored table: what every tree says and, for a row the forest trained on, what the
// trees that never saw it say. Most trees of a forest drew a given training row and fit it closely, so their
// vote on that row says little; the out-of-bag trees' vote is the honest estimate (Breiman 2001, "Random
// Forests", Machine Learning 45, section 3.1; volume from memory). That is why a training row's headline is
// its out-of-bag answer, and the all-trees answer comes second.
//
// Everything here reads the flat arrays core's scoring produced, so a hover costs O(trees).

import { outOfBagTrees } from './bootstrap';
import { doubtfulByMargin, doubtfulByResidual, type Doubt } from './doubtful';
import type { Task } from './params';
import type { RowResults } from './oob';
import type { Membership, Prediction } from './predict';

export interface ClassTally {
  readonly kind: 'classification';
  /** Trees voting for each class (each tree's own majority class), in class order. */
  readonly counts: readonly number[];
  readonly trees: number;
}

export interface ValueTally {
  readonly kind: 'regression';
  readonly mean: number;
  readonly sd: number;
  readonly min: number;
  readonly max: number;
  readonly trees: number;
}

export type VoteTally = ClassTally | ValueTally;

/** One group of trees' answer for a row: all trees, or the out-of-bag ones. */
export interface GroupAnswer {
  /** Class code (argmax of the averaged probabilities) or the mean value. */
  readonly predicted: number;
  /** Classification: probabilities averaged over the group's trees. */
  readonly proba?: readonly number[];
  readonly tally: VoteTally;
  /** Share of the group's trees whose own answer is the group's (or within the tolerance, for regression). */
  readonly agreement: number;
}

export type RowRole = 'training' | 'holdout' | 'scored';

export interface RowAnswer {
  readonly tableRow: number;
  readonly task: Task;
  /** 'training': the forest trained on it; 'holdout': kept out of training; 'scored': any other row. */
  readonly role: RowRole;
  /** Which answer leads: out-of-bag for a training row some tree left out, all trees otherwise. */
  readonly lead: 'out-of-bag' | 'all-trees';
  /** The leading answer (the out-of-bag one when lead is 'out-of-bag'). */
  readonly headline: GroupAnswer;
  readonly all: GroupAnswer;
  /** Training rows only, and only when at least one tree left the row out. */
  readonly oob?: GroupAnswer;
  /** Class code or value; undefined when the table has no (or a missing) target. */
  readonly truth?: number;
  /** Classification: Breiman's margin over the out-of-bag votes (training rows). */
  readonly margin?: number;
}

/**
 * Breiman's (2001) margin: share of votes for the true class minus the largest share for another class.
 * NaN without votes or without a known class. The out-of-bag fold and the row answers both use this one.
 */
export function voteMargin(counts: ArrayLike<number>, truth: number, trees: number): number {
  if (!(trees > 0) || !(truth >= 0 && truth < counts.length)) return NaN;
  let other = 0;
  for (let k = 0; k < counts.length; k++) if (k !== truth && counts[k] > other) other = counts[k];
  return (counts[truth] - other) / trees;
}

/** Entropy in bits of a vote split; 0 when every tree agrees. */
export function voteEntropy(counts: readonly number[]): number {
  const total = counts.reduce((a, b) => a + b, 0);
  if (total === 0) return 0;
  let h = 0;
  for (const c of counts) if (c > 0) h -= (c / total) * Math.log2(c / total);
  return h;
}

export class RowVotes {
  readonly rows: number;
  readonly trees: number;
  private readonly K: number;

  constructor(
    readonly task: Task,
    readonly classes: readonly string[],
    private readonly prediction: Prediction,
    /** Per table row: class code or value, NaN where missing or absent. */
    private readonly truth: Float64Array | undefined,
    /** Which table rows the forest trained on and how each tree drew them; scored with `prediction`. */
    private readonly membership: Membership | undefined,
    /** Table rows held out of training. */
    private readonly holdout: ReadonlySet<number> = new Set(),
    /**
     * Regression: a tree "agrees" when its value is within this distance of its group's mean. A quarter of the
     * training target's standard deviation (our choice; see targetTolerance): small next to the target's
     * spread, yet not so small that every tree disagrees.
     */
    readonly tolerance = 0,
  ) {
    this.rows = prediction.rows;
    this.trees = prediction.rows === 0 ? 0 : prediction.votes.length / prediction.rows;
    this.K = task === 'classification' ? classes.length : 1;
    if (membership && !prediction.oob) throw new RangeError('Row answers with membership need a prediction scored with it.');
  }

  /** Tree t's own answer (class code or value) for table row r. */
  vote(t: number, r: number): number {
    return this.prediction.votes[t * this.rows + r];
  }

  /** Index of table row r among the training rows, or -1. */
  trainingIndex(r: number): number {
    return this.membership ? this.membership.trainPos[r] : -1;
  }

  /** Trees that never drew this row (ascending), or undefined for rows outside training. */
  outOfBagTrees(r: number): number[] | undefined {
    const m = this.membership;
    const pos = this.trainingIndex(r);
    if (!m || pos < 0) return undefined;
    return Array.from(outOfBagTrees(m.inBag, this.trees, m.trainCount, pos));
  }

  role(r: number): RowRole {
    return this.trainingIndex(r) >= 0 ? 'training' : this.holdout.has(r) ? 'holdout' : 'scored';
  }

  answer(r: number): RowAnswer {
    const p = this.prediction;
    const all = this.group(r, range(this.trees), p.predicted[r], p.proba);
    const oobTrees = this.outOfBagTrees(r);
    const oob = oobTrees && oobTrees.length > 0 && p.oob ? this.group(r, oobTrees, p.oob.predicted[r], p.oob.proba) : undefined;
    const t = this.truth ? this.truth[r] : NaN;
    const margin = oob && oob.tally.kind === 'classification' ? voteMargin(oob.tally.counts, t, oob.tally.trees) : NaN;
    return {
      tableRow: r,
      task: this.task,
      role: this.role(r),
      lead: oob ? 'out-of-bag' : 'all-trees',
      headline: oob ?? all,
      all,
      oob,
      truth: Number.isNaN(t) ? undefined : t,
      margin: Number.isNaN(margin) ? undefined : margin,
    };
  }

  private group(r: number, trees: readonly number[], predicted: number, proba: Float64Array | undefined): GroupAnswer {
    const tally = this.tally(r, trees);
    let near = 0;
    for (const t of trees) {
      const v = this.vote(t, r);
      if (this.task === 'classification' ? v === predicted : Math.abs(v - predicted) <= this.tolerance) near++;
    }
    return {
      predicted,
      proba: this.task === 'classification' && proba ? Array.from(proba.subarray(r * this.K, r * this.K + this.K)) : undefined,
      tally,
      agreement: trees.length ? near / trees.length : NaN,
    };
  }

  /**
   * The training rows the forest doubts, most doubtful first (see doubtful.ts); a Doubt's index is the position
   * in `trainRows` (table rows, in training order). Empty without a membership.
   */
  doubtful(trainRows: Int32Array): Doubt[] {
    const r = this.trainingResults(trainRows);
    if (!this.membership || !this.prediction.oob) return [];
    return this.task === 'regression' ? doubtfulByResidual(r.truth, r.oobValue!).rows : doubtfulByMargin(r.margin!);
  }

  /**
   * The training rows' out-of-bag answers in the fit's own shape (oob.ts), so the panel's rows table reads a
   * scored session exactly as it would a fit. Without a membership no tree is out-of-bag for any row.
   */
  trainingResults(trainRows: Int32Array): RowResults {
    const n = trainRows.length;
    const K = this.K;
    const truth = Float64Array.from(trainRows, (r) => (this.truth ? this.truth[r] : NaN));
    const oob = this.membership ? this.prediction.oob : undefined;
    const oobTrees = Int32Array.from(trainRows, (r) => (oob ? oob.trees[r] : 0));
    if (this.task === 'regression') {
      return { count: n, truth, oobTrees, oobValue: Float64Array.from(trainRows, (r) => (oob ? oob.predicted[r] : NaN)) };
    }
    const oobProba = new Float64Array(n * K);
    if (oob?.proba) trainRows.forEach((r, i) => oobProba.set(oob.proba!.subarray(r * K, r * K + K), i * K));
    // The margins count hard votes, one pass over the trees per row: the full answers would cost far more on a large table.
    const m = this.membership;
    const counts = new Int32Array(K);
    const margin = Float64Array.from(trainRows, (r, k) => {
      const pos = m && oob ? m.trainPos[r] : -1;
      if (pos < 0) return NaN;
      counts.fill(0);
      let trees = 0;
      for (let t = 0; t < this.trees; t++) {
        if (m!.inBag[t * m!.trainCount + pos] !== 0) continue;
        const c = this.vote(t, r);
        if (c >= 0 && c < K) counts[c]++;
        trees++;
      }
      return voteMargin(counts, truth[k], trees);
    });
    return { count: n, truth, oobTrees, oobProba, margin };
  }

  tally(r: number, trees: readonly number[]): VoteTally {
    if (this.task === 'classification') {
      const counts = new Array<number>(this.classes.length).fill(0);
      for (const t of trees) {
        const c = this.vote(t, r);
        if (c >= 0 && c < counts.length) counts[c]++;
      }
      return { kind: 'classification', counts, trees: trees.length };
    }
    let sum = 0;
    let sq = 0;
    let min = Infinity;
    let max = -Infinity;
    for (const t of trees) {
      const v = this.vote(t, r);
      sum += v;
      sq += v * v;
      if (v < min) min = v;
      if (v > max) max = v;
    }
    const n = trees.length;
    const mean = n ? sum / n : NaN;
    const sd = n ? Math.sqrt(Math.max(0, sq / n - mean * mean)) : NaN;
    return { kind: 'regression', mean, sd, min, max, trees: n };
  }
}

/** A quarter of the target's standard deviation over the given rows (all rows when absent); 0 for classification. */
export function targetTolerance(task: Task, truth: Float64Array, rows?: Int32Array): number {
  if (task !== 'regression') return 0;
  let n = 0;
  let sum = 0;
  let sq = 0;
  const each = (v: number) => {
    if (Number.isNaN(v)) return;
    n++;
    sum += v;
    sq += v * v;
  };
  if (rows) for (const r of rows) each(truth[r]);
  else for (const v of truth) each(v);
  if (n < 2) return 0;
  const mean = sum / n;
  return 0.25 * Math.sqrt(Math.max(0, (sq - n * mean * mean) / (n - 1)));
}

/** Which table rows are training rows: trainRows[i] is the table row of training row i. */
export function membershipOf(trainRows: Int32Array, tableRows: number, inBag: Uint8Array): Membership {
  const trainPos = new Int32Array(tableRows).fill(-1);
  trainRows.forEach((r, i) => (trainPos[r] = i));
  return { trainPos, trainCount: trainRows.length, inBag };
}

function range(n: number): number[] {
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) out[i] = i;
  return out;
}
