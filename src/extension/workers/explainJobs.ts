// What the explanation thread is asked and what it answers, and the code that answers it. Kept apart from
// the thread's entry so a test can run the same answers in-process. No `vscode` here.
//
// Exact contributions cost O(leaves x depth^2) per tree (Lundberg et al. 2020): a fully grown regression
// forest of 100 trees on a few thousand rows takes hundreds of milliseconds per row, far too long for the
// extension host's own thread, so every explanation runs here, one request at a time.

import type { FitReport, Forest, PartialDependence, QuantileIndex, Table } from '../engine';
import {
  ContributionExplainer,
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
}

export type ExplainRequest =
  | { readonly kind: 'contributions'; readonly x: Float64Array; readonly rows: number }
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
  /** values[(i * features + j) * outputs + k]; base[k] + sum over j = the forest's output k for row i. */
  contributions: { base: Float64Array; values: Float64Array; features: number; outputs: number };
  dependence: PartialDependence;
  /** values[(j * nx + i) * outputs + k] over `rows` training rows. */
  dependence2D: { values: Float64Array; rows: number; outputs: number };
  /** unavailable: why this forest or these rows have no intervals, as the end of a sentence. */
  intervals: { lower: Float64Array; upper: Float64Array } | { unavailable: string };
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
  }

  handle<K extends ExplainKind>(request: RequestOf<K>): ExplainResults[K];
  handle(request: ExplainRequest): ExplainResults[ExplainKind] {
    const { forest, trainX, trainCount } = this;
    switch (request.kind) {
      case 'contributions': {
        this.explainer ??= new ContributionExplainer(forest);
        const c = this.explainer.explainRows(request.x, request.rows);
        return { base: c.base, values: c.contributions, features: c.features, outputs: c.outputs };
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
