// Per-row answers for one scored table, kept as the flat arrays core produced so a hover or a selection
// costs O(trees) and nothing is scored on the extension host's thread.
//
// "All trees" numbers come from scoring the whole table once (in the Scorer's worker). The out-of-bag part
// exists only for rows the forest was trained on: those trees never saw the row, so their vote is an honest
// estimate (Breiman 2001, "Random Forests", Machine Learning 45:5-32, section 3.1).

import type { Prediction, Task } from '../engine';

export interface OobPart {
  /** Per table row: its index among the training rows, or -1 (holdout, or not used). */
  readonly trainPos: Int32Array;
  readonly trainCount: number;
  /** Tree-major: inBag[t * trainCount + i]; 0 means tree t never drew training row i. */
  readonly inBag: Uint8Array;
  /** Breiman's OOB margin per training row (classification); NaN without OOB trees. */
  readonly margin?: Float64Array;
}

export interface ClassVotes {
  readonly kind: 'classification';
  /** Trees voting for each class, in class order. */
  readonly counts: number[];
  readonly trees: number;
}

export interface ValueVotes {
  readonly kind: 'regression';
  readonly mean: number;
  readonly sd: number;
  readonly min: number;
  readonly max: number;
  readonly trees: number;
}

export type VoteTally = ClassVotes | ValueVotes;

/** Everything a hover or the disagreement view says about one row. */
export interface RowAnswer {
  readonly tableRow: number;
  readonly task: Task;
  /** Class code or value the forest predicts (all trees). */
  readonly predicted: number;
  /** Soft-vote probabilities per class (classification). */
  readonly proba?: number[];
  readonly agreement: number;
  readonly all: VoteTally;
  /** Absent for rows outside training (holdout, other files) and for rows no tree left out. */
  readonly oob?: VoteTally;
  /** 'training': OOB part available in principle; 'holdout': held out of training; 'scored': another file. */
  readonly role: 'training' | 'holdout' | 'scored';
  /** Class code or value; undefined when the table has no (or a missing) target. */
  readonly truth?: number;
  readonly margin?: number;
}

export class RowStore {
  readonly rows: number;
  readonly trees: number;

  constructor(
    readonly task: Task,
    readonly classes: readonly string[],
    private readonly prediction: Prediction,
    /** Per table row: class code / value, NaN where missing or absent. */
    private readonly truth: Float64Array | undefined,
    private readonly oob: OobPart | undefined,
    /** Rows held out of training (table row indices). */
    private readonly holdout: ReadonlySet<number> = new Set(),
    /**
     * Regression: a tree "agrees" when its value is within this distance of the forest's. We use a quarter of
     * the training target's standard deviation (our choice): small next to the target's spread, yet not so
     * small that every tree disagrees.
     */
    readonly tolerance = 0,
  ) {
    this.rows = prediction.rows;
    this.trees = prediction.rows === 0 ? 0 : prediction.votes.length / prediction.rows;
  }

  /** Tree t's vote (class code or value) for table row r. */
  vote(t: number, r: number): number {
    return this.prediction.votes[t * this.rows + r];
  }

  /** Trees that never drew this row, or undefined for rows outside training. */
  outOfBagTrees(r: number): number[] | undefined {
    const pos = this.oob?.trainPos[r] ?? -1;
    if (!this.oob || pos < 0) return undefined;
    const out: number[] = [];
    const n = this.oob.trainCount;
    for (let t = 0; t < this.trees; t++) if (this.oob.inBag[t * n + pos] === 0) out.push(t);
    return out;
  }

  answer(r: number): RowAnswer {
    const K = this.classes.length;
    const p = this.prediction;
    const allTrees = range(this.trees);
    const oobTrees = this.outOfBagTrees(r);
    const all = this.tally(r, allTrees);
    const oob = oobTrees && oobTrees.length > 0 ? this.tally(r, oobTrees) : undefined;
    const truthValue = this.truth ? this.truth[r] : NaN;
    const pos = this.oob?.trainPos[r] ?? -1;
    const margin = pos < 0 ? NaN : this.oob?.margin ? this.oob.margin[pos] : breimanMargin(oob, truthValue);
    return {
      tableRow: r,
      task: this.task,
      predicted: p.predicted[r],
      proba: this.task === 'classification' && p.proba ? Array.from(p.proba.subarray(r * K, r * K + K)) : undefined,
      agreement: this.agreement(r),
      all,
      oob,
      role: pos >= 0 ? 'training' : this.holdout.has(r) ? 'holdout' : 'scored',
      truth: Number.isNaN(truthValue) ? undefined : truthValue,
      margin: Number.isNaN(margin) ? undefined : margin,
    };
  }

  /** Breiman's OOB margin of table row r (NaN outside training or without OOB trees); core's own when given. */
  margin(r: number): number {
    const pos = this.oob?.trainPos[r] ?? -1;
    if (pos < 0 || !this.oob) return NaN;
    if (this.oob.margin) return this.oob.margin[pos];
    const truth = this.truth ? this.truth[r] : NaN;
    const trees = this.outOfBagTrees(r) ?? [];
    return breimanMargin(trees.length ? this.tally(r, trees) : undefined, truth);
  }

  /** Share of trees whose own answer matches the forest's (classification) or lies within `tolerance` of it. */
  agreement(r: number): number {
    const p = this.prediction;
    if (this.task === 'classification' && p.agreement) return p.agreement[r];
    if (this.trees === 0) return NaN;
    const centre = p.predicted[r];
    let near = 0;
    for (let t = 0; t < this.trees; t++) {
      const v = this.vote(t, r);
      if (this.task === 'classification' ? v === centre : Math.abs(v - centre) <= this.tolerance) near++;
    }
    return near / this.trees;
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

/**
 * Breiman's (2001) margin from out-of-bag votes: share for the true class minus the largest share for any other.
 * Used when core's own margins are not at hand (a session restored from disk); core computes the same thing.
 */
export function breimanMargin(oob: VoteTally | undefined, truth: number): number {
  if (!oob || oob.kind !== 'classification' || oob.trees === 0 || !(truth >= 0 && truth < oob.counts.length)) return NaN;
  let other = 0;
  oob.counts.forEach((c, k) => {
    if (k !== truth && c > other) other = c;
  });
  return (oob.counts[truth] - other) / oob.trees;
}

function range(n: number): number[] {
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) out[i] = i;
  return out;
}

/** Entropy in bits of a vote split; 0 when every tree agrees. */
export function voteEntropy(counts: readonly number[]): number {
  const total = counts.reduce((a, b) => a + b, 0);
  if (total === 0) return 0;
  let h = 0;
  for (const c of counts) if (c > 0) h -= (c / total) * Math.log2(c / total);
  return h;
}

/** Class with the most votes (lowest code on ties), or -1 when no tree voted. */
export function majority(counts: readonly number[]): number {
  let best = -1;
  let bestCount = 0;
  for (let k = 0; k < counts.length; k++) {
    if (counts[k] > bestCount) {
      best = k;
      bestCount = counts[k];
    }
  }
  return best;
}
