// What the explanation thread is asked and what it answers, and the code that answers it. Kept apart from
// the thread's entry so a test can run the same answers in-process. No `vscode` here.
//
// Exact contributions cost O(leaves x depth^2) per tree (Lundberg et al. 2020): a fully grown regression
// forest of 100 trees on a few thousand rows takes hundreds of milliseconds per row, far too long for the
// extension host's own thread, so every explanation runs here, one request at a time.

import type { FitReport, Forest, PartialDependence, QuantileIndex, Table } from '../engine';
import {
  ContributionExplainer,
  outOfBagTrees,
  partialDependence,
  partialDependence2D,
  predictInterval,
  quantileIndexFromFit,
  quantileIndexFromTrainingTable,
  TrainingMismatchError,
} from '../engine';

/** Where a regression forest's prediction intervals come from. */
export type QuantileSource =
  /** A fit still in memory: its own training rows and bootstrap counts. */
  | { readonly from: 'fit'; readonly report: FitReport; readonly table: Table }
  /** A saved forest shown against a table: the training rows and draws are recovered from the forest's seed. */
  | { readonly from: 'table'; readonly table: Table }
  /** No training rows can exist for this forest (an import): why, as the end of a sentence. */
  | { readonly from: 'none'; readonly reason: string };

export interface ExplainSetup {
  /** Omitted when quantiles.report carries the forest, so the thread holds one copy. */
  readonly forest?: Forest;
  /** The training rows, encoded row-major: what dependence is averaged over and its distribution counts. */
  readonly trainX: Float64Array;
  readonly trainCount: number;
  readonly quantiles: QuantileSource | null;
  /**
   * Tree-major bootstrap counts over the trainCount training rows, in trainX's order: inBag[t * trainCount + i],
   * 0 when tree t never drew training row i. What out-of-bag contributions are drawn from; sent once, here.
   * Absent: taken from quantiles.report when it kept them (FitOptions.keepInBag), else out-of-bag requests are
   * answered over all trees and say why. A Uint8Array over a SharedArrayBuffer reaches the thread uncopied.
   */
  readonly inBag?: Uint8Array;
}

export type ExplainRequest =
  | {
      readonly kind: 'contributions';
      readonly x: Float64Array;
      readonly rows: number;
      /**
       * Per row: the training position (index into trainX and inBag's rows) whose out-of-bag trees explain
       * row i, for a training row explained by the trees that never drew it; -1 for all trees. Absent: all.
       */
      readonly outOfBag?: Int32Array;
    }
  | {
      readonly kind: 'dependence';
      readonly feature: number;
      readonly gridSize: number;
      readonly spacing: 'even' | 'quantile';
      readonly sampleRows: number;
      readonly seed: number;
    }
  | {
      readonly kind: 'dependence2D';
      readonly xFeature: number;
      readonly yFeature: number;
      readonly xGrid: Float64Array;
      readonly yGrid: Float64Array;
      readonly sampleRows: number;
      readonly seed: number;
    }
  | { readonly kind: 'intervals'; readonly x: Float64Array; readonly rows: number; readonly level: number };

export interface ExplainResults {
  contributions: ContributionsResult;
  dependence: PartialDependence;
  /** values[(j * nx + i) * outputs + k] over `rows` training rows. */
  dependence2D: { values: Float64Array; rows: number; outputs: number };
  /** unavailable: why this forest or these rows have no intervals, as the end of a sentence. */
  intervals: { lower: Float64Array; upper: Float64Array } | { unavailable: string };
}

/**
 * Each row is explained over a set of trees: all of them, or the trees that never drew it. base[i * outputs + k]
 * plus the sum over j of values[(i * features + j) * outputs + k] is those trees' mean output k for row i: the
 * forest's probability of class k or its value with all trees, the out-of-bag one with the out-of-bag trees.
 */
export interface ContributionsResult {
  /** rows * outputs: the mean expected output, with no feature known, of the trees row i was explained over. */
  base: Float64Array;
  /** rows * features * outputs. */
  values: Float64Array;
  features: number;
  outputs: number;
  /** Per row: how many trees it was explained over. */
  trees: Int32Array;
  /** Per row: 1 when those were the trees that never drew it (its out-of-bag trees), 0 when all trees. */
  outOfBag: Uint8Array;
  /** Set when a row asked for out-of-bag got all trees instead: why, as the end of a sentence. */
  note?: string;
}

export type ExplainKind = keyof ExplainResults;
export type RequestOf<K extends ExplainKind> = Extract<ExplainRequest, { kind: K }>;

export type ExplainReply =
  | { readonly id: number; readonly ok: true; readonly result: ExplainResults[ExplainKind] }
  | { readonly id: number; readonly ok: false; readonly name: string; readonly message: string };

/** The thread's state: the forest, and what is built on first use and reused after. */
export class ExplainState {
  readonly forest: Forest;
  private readonly trainX: Float64Array;
  private readonly trainCount: number;
  private readonly inBag: Uint8Array | undefined;
  private explainer: ContributionExplainer | undefined;
  private index: QuantileIndex | string | undefined;
  private quantiles: QuantileSource | null;

  constructor(setup: ExplainSetup) {
    const forest = setup.quantiles?.from === 'fit' ? setup.quantiles.report.forest : setup.forest;
    if (!forest) throw new RangeError('The explanation thread was started without a forest.');
    this.forest = forest;
    this.trainX = setup.trainX;
    this.trainCount = setup.trainCount;
    this.quantiles = setup.quantiles;
    this.inBag = setup.inBag ?? (setup.quantiles?.from === 'fit' ? setup.quantiles.report.rows.inBag : undefined);
    const expected = forest.trees.length * setup.trainCount;
    if (this.inBag && this.inBag.length !== expected) {
      throw new RangeError(`The in-bag counts have ${this.inBag.length} entries; ${forest.trees.length} trees and ${setup.trainCount} training rows need ${expected}.`);
    }
  }

  handle<K extends ExplainKind>(request: RequestOf<K>): ExplainResults[K];
  handle(request: ExplainRequest): ExplainResults[ExplainKind] {
    const { forest, trainX, trainCount } = this;
    switch (request.kind) {
      case 'contributions': {
        this.explainer ??= new ContributionExplainer(forest);
        return this.contributions(this.explainer, request);
      }
      case 'dependence':
        return partialDependence(forest, trainX, trainCount, request.feature, {
          gridSize: request.gridSize,
          spacing: request.spacing,
          sampleRows: request.sampleRows,
          seed: request.seed,
        });
      case 'dependence2D': {
        const d = partialDependence2D(forest, trainX, trainCount, request.xFeature, request.yFeature, {
          xGrid: request.xGrid,
          yGrid: request.yGrid,
          sampleRows: request.sampleRows,
          seed: request.seed,
        });
        return { values: d.values, rows: d.rows.length, outputs: d.outputs };
      }
      case 'intervals': {
        const index = this.quantileIndex();
        if (typeof index === 'string') return { unavailable: index };
        const { lower, upper } = predictInterval(index, request.x, request.rows, request.level);
        return { lower, upper };
      }
    }
  }

  private contributions(e: ContributionExplainer, request: RequestOf<'contributions'>): ContributionsResult {
    const { features: p, outputs: K, trees: T } = e;
    const { rows, x, outOfBag: positions } = request;
    const result: ContributionsResult = {
      base: new Float64Array(rows * K),
      values: new Float64Array(rows * p * K),
      features: p,
      outputs: K,
      trees: new Int32Array(rows),
      outOfBag: new Uint8Array(rows),
    };
    for (let i = 0; i < rows; i++) {
      const position = positions?.[i] ?? -1;
      let trees: Int32Array | undefined;
      if (position >= 0 && !this.inBag) result.note = 'which trees drew each training row is not known here, so all trees were used.';
      else if (position >= 0) {
        trees = outOfBagTrees(this.inBag!, T, this.trainCount, position);
        if (trees.length === 0) {
          result.note = `every one of the ${T} trees drew this row, so all trees were used.`;
          trees = undefined;
        }
      }
      e.explainRow(x, i * p, result.values.subarray(i * p * K, (i + 1) * p * K), trees);
      if (trees) e.baseOver(trees, result.base.subarray(i * K, (i + 1) * K));
      else result.base.set(e.base, i * K);
      result.trees[i] = trees ? trees.length : T;
      result.outOfBag[i] = trees ? 1 : 0;
    }
    return result;
  }

  /** Built on the first interval asked for; a reason instead when this forest cannot have intervals. */
  private quantileIndex(): QuantileIndex | string {
    if (this.index !== undefined) return this.index;
    const q = this.quantiles;
    // The fit's per-row results are only needed to build the index: let them go once it exists.
    this.quantiles = null;
    if (this.forest.schema.target.task !== 'regression') this.index = 'intervals are for regression forests.';
    else if (!q) this.index = 'the rows this forest was fitted on are not at hand.';
    else if (q.from === 'none') this.index = q.reason;
    else {
      try {
        this.index = q.from === 'fit' ? quantileIndexFromFit(q.report, q.table) : quantileIndexFromTrainingTable(this.forest, q.table);
      } catch (e) {
        if (!(e instanceof TrainingMismatchError)) throw e;
        // Core's message names the tree and leaf that disagree: more than a hover needs, so its first clause.
        this.index = `the rows here are not the ones this forest was fitted on (${e.message.split(/ \(|; /)[0].replace(/\.$/, '')}).`;
      }
    }
    return this.index;
  }
}
