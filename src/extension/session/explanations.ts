// Explanations of the active forest as the editor and the panel ask for them: per-row contributions,
// prediction intervals, partial dependence and the global view. The numbers come from core, computed on the
// explanation thread (see workers/explainClient.ts); this keeps what was computed, decides what runs first,
// and shapes answers into protocol data. No `vscode` here.
//
// What is cheap is done for every row up front (intervals: one pass over a row's leaves); what is not
// (contributions: hundreds of milliseconds a row for a deep regression forest) is done for the rows someone
// looks at, and for a bounded random sample in the background for the global view.

import type { GlobalContributions, PredictionInterval } from '../../protocol/messages';
import type { Forest, PartialDependence } from '../engine';
import { meanAbsoluteContributions, outputCount, shuffle, stream } from '../engine';
import type { ExplainerLike, Urgency } from '../workers/explainClient';
import type { ExplainResults, RequestOf } from '../workers/explainJobs';
import type { RowExplanation } from './explanationText';
import { Recent } from './recent';

// The shaping helpers lived here first; callers still import them from this module.
export {
  defaultDependenceOutput,
  dependenceMessage,
  featureValueText,
  largestContributions,
  outputsOf,
  rowContributionsMessage,
  type RowExplanation,
} from './explanationText';

/** Rows in the background sample for the global view (a random sample, so its first k rows are one too). */
export const GLOBAL_SAMPLE_ROWS = 100;
/** Thread time the global view may take before it settles for the rows it has (our choice). */
export const GLOBAL_TIME_BUDGET_MS = 15_000;
/** Points along a numeric feature's axis in the dependence view. */
export const DEPENDENCE_GRID = 40;
/** Rows whose curves the dependence view draws and averages (core's default sample). */
export const DEPENDENCE_ROWS = 200;
/** Rows per background interval request: small, so a hover never waits long behind one. */
const INTERVAL_CHUNK = 500;
const ROW_CACHE = 256;

/** One row's answer (rows = 1): see ContributionsResult in workers/explainJobs.ts. */
export type RowContribution = ExplainResults['contributions'];

/**
 * Which trees explain a row of the fitted table. 'all': the forest's prediction. 'out-of-bag': only the trees
 * that never drew the row, the honest account of a training row, which most trees memorised; for a row the
 * forest was not trained on (held out, or without a target) that is every tree.
 */
export type TreeChoice = 'all' | 'out-of-bag';

export type IntervalAnswer = PredictionInterval | { readonly unavailable: string };

/**
 * A row's contributions, asked for by one or more callers. A caller may give a signal: when every caller
 * that did has gone (a hover dismissed, a selection moved on) and none asked without one, the request is
 * withdrawn if it has not reached the thread yet.
 */
interface Pending {
  readonly promise: Promise<RowContribution>;
  readonly withdraw: AbortController;
  interest: number;
}

interface IntervalTable {
  readonly level: number;
  readonly lower: Float64Array;
  readonly upper: Float64Array;
  unavailable?: string;
  readonly finished: Promise<void>;
}

export class Explanations {
  private readonly p: number;
  private readonly outputs: number;
  /** Per scope (the fitted table, or another scored file): contributions of its rows by row. */
  private readonly rows = new WeakMap<object, Recent<Pending>>();
  private readonly otherIntervals = new WeakMap<object, Recent<Promise<IntervalAnswer>>>();
  private intervals: IntervalTable | undefined;
  private readonly dependenceByFeature = new Map<number, Promise<PartialDependence>>();
  /** The fitted table's scopes in the row caches: over all trees, and over each row's out-of-bag trees. */
  private readonly table = {};
  private readonly tableOutOfBag = {};
  /** Per table row: its position among the training rows, -1 for a row the forest was not trained on. */
  private readonly trainPos: Int32Array;
  /** The one row waiting to be prefetched, and whether a prefetch is on the thread now. */
  private prefetchWanted: { readonly r: number; readonly trees: TreeChoice } | undefined;
  private prefetching = false;
  private readonly closed = new AbortController();

  constructor(
    private readonly forest: Forest,
    private readonly explainer: ExplainerLike,
    /** The fitted table, encoded [row * p + f]. */
    private readonly encoded: Float64Array,
    private readonly rowCount: number,
    /** Table rows the forest was trained on, in training order (the explanation thread's trainX). */
    private readonly trainRows: Int32Array,
    private readonly seed: number,
  ) {
    this.p = forest.schema.features.length;
    this.outputs = outputCount(forest.schema.target);
    this.trainPos = new Int32Array(rowCount).fill(-1);
    trainRows.forEach((r, i) => (this.trainPos[r] = i));
  }

  get regression(): boolean {
    return this.forest.schema.target.task === 'regression';
  }

  // ---------------------------------------------------------------------------------------------
  // Contributions

  /**
   * All outputs' contributions for row r of the fitted table over the chosen trees; computed once per row and
   * choice (the two are cached apart). The answer's outOfBag[0] and trees[0] say which trees were used: an
   * out-of-bag request falls back to all trees, with a note, when the thread was not given the bootstrap
   * counts or every tree drew the row.
   */
  rowContributions(r: number, urgency: Urgency, signal?: AbortSignal, trees: TreeChoice = 'all'): Promise<RowContribution> {
    const { p } = this;
    const row = () => this.encoded.slice(r * p, r * p + p);
    if (trees === 'all') return this.cached(this.table, r, () => ({ kind: 'contributions', x: row(), rows: 1 }), urgency, signal);
    const position = this.trainPos[r];
    if (position >= 0) {
      return this.cached(this.tableOutOfBag, r, () => ({ kind: 'contributions', x: row(), rows: 1, outOfBag: Int32Array.of(position) }), urgency, signal);
    }
    // No tree drew a row outside the training rows, so all trees are its out-of-bag trees: one computation.
    return this.rowContributions(r, urgency, signal, 'all').then((c) => ({ ...c, outOfBag: Uint8Array.of(1) }));
  }

  /**
   * Works out a row's contributions before anyone asks (the cursor just settled on it). One prefetch at a
   * time, and only the latest row waits: moving through a file never stacks up stale work.
   */
  prefetch(r: number, trees: TreeChoice = 'all'): void {
    this.prefetchWanted = { r, trees };
    if (this.prefetching) return;
    this.prefetching = true;
    void (async () => {
      while (this.prefetchWanted !== undefined && !this.closed.signal.aborted) {
        const next = this.prefetchWanted;
        this.prefetchWanted = undefined;
        await this.rowContributions(next.r, 'soon', undefined, next.trees).catch(() => undefined);
      }
      this.prefetching = false;
    })();
  }

  /** All outputs' contributions (over all trees) for row r of `scope`, another scored file whose encoded rows are x. */
  contributions(scope: object, r: number, x: Float64Array, urgency: Urgency, signal?: AbortSignal): Promise<RowContribution> {
    const { p } = this;
    return this.cached(scope, r, () => ({ kind: 'contributions', x: x.slice(r * p, r * p + p), rows: 1 }), urgency, signal);
  }

  /** Row r's answer in `scope`'s cache, asking the thread (`request`) when there is none. */
  private cached(scope: object, r: number, request: () => RequestOf<'contributions'>, urgency: Urgency, signal?: AbortSignal): Promise<RowContribution> {
    let cache = this.rows.get(scope);
    if (!cache) this.rows.set(scope, (cache = new Recent(ROW_CACHE)));
    const rows = cache;
    let entry = rows.get(r);
    if (entry) this.explainer.raise?.(entry.promise, urgency);
    else {
      const withdraw = new AbortController();
      const promise = this.explainer.run(request(), urgency, withdraw.signal);
      const made: Pending = { promise, withdraw, interest: 0 };
      entry = made;
      rows.set(r, made);
      // A failure (or a withdrawal) is not kept: the next hover may ask again.
      promise.catch(() => {
        if (rows.get(r) === made) rows.delete(r);
      });
    }
    const e = entry;
    if (!signal) e.interest = Infinity;
    else if (e.interest !== Infinity && !signal.aborted) {
      e.interest++;
      signal.addEventListener('abort', () => --e.interest === 0 && e.withdraw.abort(), { once: true });
    }
    return e.promise;
  }

  /**
   * The contributions to the output shown for a row: the given class (the forest's prediction; for an
   * out-of-bag answer, the caller may rather pass the class its trees predict, argmax of outputsOf), or the value.
   */
  explanationOf(c: RowContribution, predictedClass: number | null): RowExplanation {
    const K = c.outputs;
    const k = this.regression || predictedClass === null ? 0 : predictedClass;
    const values = new Float64Array(c.features);
    let sum = c.base[k];
    for (let j = 0; j < c.features; j++) {
      values[j] = c.values[j * K + k];
      sum += values[j];
    }
    const note = c.note === undefined ? {} : { note: c.note };
    return { output: this.regression ? null : k, base: c.base[k], prediction: sum, values, trees: c.trees[0], outOfBag: c.outOfBag[0] === 1, ...note };
  }

  /**
   * Mean absolute contribution per feature over a random sample of training rows, summed over outputs,
   * computed a row at a time in the background and reported as it grows.
   */
  async globalContributions(onUpdate: (g: GlobalContributions) => void, signal?: AbortSignal): Promise<GlobalContributions> {
    const n = this.trainRows.length;
    const order = Int32Array.from({ length: n }, (_, i) => i);
    shuffle(order, stream(this.seed, 'global contributions'));
    const planned = Math.min(GLOBAL_SAMPLE_ROWS, n);
    const { p } = this;
    const K = this.outputs;
    const values = new Float64Array(planned * p * K);
    let base: Float64Array = new Float64Array(K);
    let done = 0;
    let spent = 0;
    let reported = performance.now();
    const features = this.forest.schema.features;
    const summary = (finished: boolean): GlobalContributions => {
      const mean = meanAbsoluteContributions({ rows: done, features: p, outputs: K, base, contributions: values.subarray(0, done * p * K) });
      return { rows: done, planned, done: finished, features: features.map((f, j) => ({ feature: f.name, meanAbs: mean.overall[j] })) };
    };
    const both = anySignal(signal, this.closed.signal);
    while (done < planned && spent < GLOBAL_TIME_BUDGET_MS) {
      const r = this.trainRows[order[done]];
      const started = performance.now();
      const c = await this.rowContributions(r, 'idle');
      spent += performance.now() - started;
      if (both.aborted) throw Object.assign(new Error('The global view was stopped.'), { name: 'AbortError' });
      values.set(c.values, done * p * K);
      base = c.base;
      done++;
      if (performance.now() - reported > 1500 && done < planned) {
        reported = performance.now();
        onUpdate(summary(false));
      }
    }
    const result = summary(true);
    onUpdate(result);
    return result;
  }

  // ---------------------------------------------------------------------------------------------
  // Prediction intervals (regression)

  /** Starts (or keeps) intervals for every row of the fitted table at `level`; cheap enough to do up front. */
  prepareIntervals(level: number): void {
    if (!this.regression || this.intervals?.level === level) return;
    const n = this.rowCount;
    const lower = new Float64Array(n).fill(NaN);
    const upper = new Float64Array(n).fill(NaN);
    const table: IntervalTable = { level, lower, upper, finished: Promise.resolve() };
    this.intervals = table;
    (table as { finished: Promise<void> }).finished = (async () => {
      const { p } = this;
      for (let from = 0; from < n && this.intervals === table; from += INTERVAL_CHUNK) {
        const to = Math.min(n, from + INTERVAL_CHUNK);
        const a = await this.explainer.run({ kind: 'intervals', x: this.encoded.slice(from * p, to * p), rows: to - from, level }, 'idle');
        if ('unavailable' in a) {
          table.unavailable = a.unavailable;
          return;
        }
        lower.set(a.lower, from);
        upper.set(a.upper, from);
      }
    })().catch((e: unknown) => {
      if (!isAbort(e)) table.unavailable = `they could not be computed (${e instanceof Error ? e.message : String(e)}).`;
    });
  }

  /** Row r's interval at `level` if already computed, or why there is none; undefined while pending. */
  cachedInterval(r: number, level: number): IntervalAnswer | undefined {
    const t = this.intervals;
    if (!this.regression || !t || t.level !== level) return undefined;
    if (t.unavailable) return { unavailable: t.unavailable };
    return Number.isNaN(t.lower[r]) ? undefined : { level, lower: t.lower[r], upper: t.upper[r] };
  }

  /** Row r's interval, asking the thread for it alone when the background pass has not reached it. */
  async interval(r: number, level: number, urgency: Urgency): Promise<IntervalAnswer> {
    this.prepareIntervals(level);
    const known = this.cachedInterval(r, level);
    if (known) return known;
    const t = this.intervals!;
    const { p } = this;
    const a = await this.explainer.run({ kind: 'intervals', x: this.encoded.slice(r * p, r * p + p), rows: 1, level }, urgency);
    if ('unavailable' in a) return { unavailable: a.unavailable };
    if (this.intervals === t) {
      t.lower[r] = a.lower[0];
      t.upper[r] = a.upper[0];
    }
    return { level, lower: a.lower[0], upper: a.upper[0] };
  }

  /** Intervals for a row of another scored file (x holds its encoded rows). */
  otherInterval(scope: object, r: number, x: Float64Array, level: number, urgency: Urgency): Promise<IntervalAnswer> {
    let cache = this.otherIntervals.get(scope);
    if (!cache) this.otherIntervals.set(scope, (cache = new Recent(ROW_CACHE)));
    const key = r * 1000 + Math.round(level * 999);
    const known = cache.get(key);
    if (known) return known;
    const { p } = this;
    const promise = this.explainer
      .run({ kind: 'intervals', x: x.slice(r * p, r * p + p), rows: 1, level }, urgency)
      .then((a): IntervalAnswer => ('unavailable' in a ? { unavailable: a.unavailable } : { level, lower: a.lower[0], upper: a.upper[0] }));
    cache.set(key, promise);
    promise.catch(() => cache.delete(key));
    return promise;
  }

  // ---------------------------------------------------------------------------------------------
  // Partial dependence

  /** One feature's partial dependence with its individual curves, over the training rows; kept per feature. */
  dependence(feature: number): Promise<PartialDependence> {
    let d = this.dependenceByFeature.get(feature);
    if (!d) {
      d = this.explainer.run(
        { kind: 'dependence', feature, gridSize: DEPENDENCE_GRID, spacing: 'even', sampleRows: DEPENDENCE_ROWS, seed: this.seed },
        'now',
      );
      this.dependenceByFeature.set(feature, d);
      d.catch(() => this.dependenceByFeature.delete(feature));
    }
    return d;
  }

  /** Two-feature partial dependence on a map's grid, over a sample of training rows. */
  dependence2D(xFeature: number, yFeature: number, xGrid: Float64Array, yGrid: Float64Array, sampleRows: number): Promise<ExplainResults['dependence2D']> {
    return this.explainer.run({ kind: 'dependence2D', xFeature, yFeature, xGrid, yGrid, sampleRows, seed: this.seed }, 'now');
  }

  async dispose(): Promise<void> {
    this.closed.abort();
    await this.explainer.dispose();
  }
}

function isAbort(e: unknown): boolean {
  return e instanceof Error && e.name === 'AbortError';
}

/** A signal that fires when either does (AbortSignal.any needs Node 20.3). */
function anySignal(a: AbortSignal | undefined, b: AbortSignal): AbortSignal {
  if (!a) return b;
  const c = new AbortController();
  const fire = () => c.abort();
  if (a.aborted || b.aborted) c.abort();
  a.addEventListener('abort', fire, { once: true });
  b.addEventListener('abort', fire, { once: true });
  return c.signal;
}
