// Folds tree results, in tree order, into what users read per training row: out-of-bag predictions, vote counts
// and margins, plus the error curve and importances. Memory is per row, not per row and tree: a tree's votes and
// bootstrap draw are used as it arrives and dropped, unless the caller asks to keep the draws (inBagCounts
// draws them again from the seed otherwise).
import { argmaxAt, classificationScores, regressionScores, type Scores } from '../metrics/scores';
import { doubtfulByMargin, doubtfulByResidual, type Doubt } from './doubtful';
import type { TreeResult } from './grow-task';
import { voteMargin } from './row-votes';
import type { Task } from './params';

export interface RowResults {
  readonly count: number;
  /** Tree-major: times row i was drawn for tree t (0: out-of-bag for t); only when the fit kept them. */
  readonly inBag?: Uint8Array;
  readonly truth: Float64Array;
  /** classification: count * K, averaged over the trees that had the row out-of-bag. */
  readonly oobProba?: Float64Array;
  readonly oobValue?: Float64Array;
  readonly oobTrees: Int32Array;
  /** classification: Breiman's margin over out-of-bag votes; NaN for a row no tree had out-of-bag. */
  readonly margin?: Float64Array;
}

export class OobFold {
  /** classification: count * K out-of-bag votes per class, for the margins. */
  private readonly voteCounts: Int32Array;
  private readonly inBag: Uint8Array | undefined;
  private readonly sums: Float64Array;
  private readonly oobTrees: Int32Array;
  private readonly impurity: Float64Array;
  private readonly permSum: Float64Array;
  private readonly permSq: Float64Array;
  private permTrees = 0;
  private t = 0;
  readonly curve: Float64Array;

  constructor(
    private readonly task: Task,
    private readonly n: number,
    private readonly K: number,
    private readonly T: number,
    private readonly truth: Float64Array,
    private readonly p: number,
    keepInBag = false,
  ) {
    this.inBag = keepInBag ? new Uint8Array(T * n) : undefined;
    this.voteCounts = new Int32Array(task === 'classification' ? n * K : 0);
    this.sums = new Float64Array(n * K);
    this.oobTrees = new Int32Array(n);
    this.impurity = new Float64Array(p);
    this.permSum = new Float64Array(p);
    this.permSq = new Float64Array(p);
    this.curve = new Float64Array(T).fill(NaN);
  }

  add(r: TreeResult): void {
    const { n, K, sums, oobTrees, voteCounts } = this;
    const value = r.tree.value;
    const classification = this.task === 'classification';
    this.inBag?.set(r.inBag, this.t * n);
    for (let i = 0; i < n; i++) {
      if (r.inBag[i] !== 0) continue;
      const leaf = r.rowLeaf[i];
      oobTrees[i]++;
      if (classification) {
        for (let k = 0; k < K; k++) sums[i * K + k] += value[leaf * K + k];
        voteCounts[i * K + argmaxAt(value, leaf * K, K)]++;
      } else {
        sums[i] += value[leaf];
      }
    }
    // Per-tree normalisation before averaging, so every tree has an equal say (as scikit-learn does).
    let total = 0;
    for (let f = 0; f < this.p; f++) total += r.impurity[f];
    if (total > 0) for (let f = 0; f < this.p; f++) this.impurity[f] += r.impurity[f] / total;
    if (r.permutation) {
      this.permTrees++;
      for (let f = 0; f < this.p; f++) {
        this.permSum[f] += r.permutation[f];
        this.permSq[f] += r.permutation[f] ** 2;
      }
    }
    this.curve[this.t] = this.currentError();
    this.t++;
  }

  /** OOB error with the trees so far, over the rows that at least one of them had out-of-bag. */
  private currentError(): number {
    const { n, K, sums, oobTrees, truth } = this;
    let rows = 0;
    let e = 0;
    for (let i = 0; i < n; i++) {
      if (oobTrees[i] === 0) continue;
      rows++;
      if (this.task === 'classification') {
        if (argmaxAt(sums, i * K, K) !== truth[i]) e++;
      } else {
        const d = sums[i] / oobTrees[i] - truth[i];
        e += d * d;
      }
    }
    return rows ? e / rows : NaN;
  }

  private cached?: RowResults;

  rows(): RowResults {
    if (!this.cached || this.cached.count !== this.n || this.t !== this.T) this.cached = this.compute();
    return this.cached;
  }

  private compute(): RowResults {
    const { n, K, sums, oobTrees } = this;
    const common = { count: n, inBag: this.inBag, truth: this.truth, oobTrees };
    if (this.task === 'regression') {
      return { ...common, oobValue: Float64Array.from({ length: n }, (_, i) => (oobTrees[i] ? sums[i] / oobTrees[i] : NaN)) };
    }
    const oobProba = new Float64Array(n * K);
    for (let i = 0; i < n; i++) if (oobTrees[i]) for (let k = 0; k < K; k++) oobProba[i * K + k] = sums[i * K + k] / oobTrees[i];
    return { ...common, oobProba, margin: this.margins() };
  }

  /** Breiman's margin over each row's out-of-bag votes (see voteMargin). */
  private margins(): Float64Array {
    const { n, K, voteCounts: counts } = this;
    const margin = new Float64Array(n);
    for (let i = 0; i < n; i++) margin[i] = voteMargin(counts.subarray(i * K, i * K + K), this.truth[i], this.oobTrees[i]);
    return margin;
  }

  scores(classes: readonly string[]): Scores {
    const rows = this.rows();
    const has = (i: number) => rows.oobTrees[i] > 0;
    if (this.task === 'classification') return classificationScores(this.truth, rows.oobProba!, classes, has);
    return regressionScores(this.truth, rows.oobValue!, has);
  }

  importance(): { impurity: Float64Array; permutation: Float64Array; permutationSpread: Float64Array } {
    let total = 0;
    for (const v of this.impurity) total += v;
    const impurity = this.impurity.map((v) => (total > 0 ? v / total : 0));
    const m = this.permTrees;
    const permutation = this.permSum.map((s) => (m ? s / m : NaN));
    const permutationSpread = this.permSq.map((s, f) => (m > 1 ? Math.sqrt(Math.max(0, (s - m * permutation[f] ** 2) / (m - 1))) : NaN));
    return { impurity, permutation, permutationSpread };
  }

  /** Training rows the forest doubts, most doubtful first (see doubtful.ts); index is the training row. */
  suspects(): Doubt[] {
    const rows = this.rows();
    return this.task === 'classification' ? doubtfulByMargin(rows.margin!) : doubtfulByResidual(this.truth, rows.oobValue!).rows;
  }
}
