// The active forest and everything the editor and panel ask of it. No `vscode` here: the host's seams call
// these methods and turn the answers into hovers, decorations and panel messages.
//
// Scoring always goes through a ScorerLike (core's Scorer in the extension: a worker thread), so the
// extension host's own thread only encodes rows and reads arrays.

import type { Dependence, FitSummary, GlobalContributions, ReferenceChoice, RegionMap, RowContributions, RowVotes, SuspectRow, PointSample } from '../../protocol/messages';
import type { FitReport, Forest, Prediction, Table } from '../engine';
import { cellText, encodeTable, findColumn } from '../engine';
import { formatNumber, formatShare } from '../format';
import { contributionsMarkdown, formatLevel, hoverMarkdown, intervalMarkdown, type HoverContext } from '../editor/hoverText';
import type { ExplainerLike, Urgency } from '../workers/explainClient';
import type { ExplainSetup } from '../workers/explainJobs';
import {
  defaultDependenceOutput,
  dependenceMessage,
  Explanations,
  featureValueText,
  largestContributions,
  rowContributionsMessage,
  type IntervalAnswer,
  type RowContribution,
} from './explanations';
import { cellsFromAverages, GridAccumulator, gridBatches, planAxis, rankFeatures, topPairs, type GridPlan } from '../panel/grid';
import { LineIndex, type LineReader } from '../rows/lineMap';
import { RowNumbering } from '../rows/numbering';
import { majority, RowStore, voteEntropy, type OobPart } from './rowStore';
import type { PanelSettings } from '../settings';
import { sampleRows } from '../summary/warnings';
import { COVERS_FROM_FILE } from './importText';

/**
 * Cells per axis at most for partial-dependence maps, as copse.panel.gridResolution's description promises.
 * Core's grid walk would afford finer maps; the cap stays until that description changes with it.
 */
export const AVERAGED_RESOLUTION = 40;

export interface ScorerLike {
  predict(x: Float64Array, rows: number): Promise<Prediction>;
  dispose(): Promise<void>;
}

export interface SessionSource {
  /** File-system path of the CSV the forest is shown against. */
  readonly path: string;
  readonly label: string;
  readonly delimiter: string;
  readonly fingerprint: string;
  readonly rowsRead: number;
  /** Set when the table is a random sample of the file. */
  readonly sampleRows?: number;
  readonly sampleSeed?: number;
  readonly header: readonly string[];
}

export interface OobInput {
  readonly trainRows: Int32Array;
  readonly holdoutRows?: Int32Array;
  readonly inBag: Uint8Array;
  /** Per training row; recomputed from votes when absent (a restored session). */
  readonly margin?: Float64Array;
}

export interface SessionInit {
  readonly forest: Forest;
  readonly source: SessionSource;
  readonly table: Table;
  /** The table in the forest's feature space, when the caller has encoded it already. */
  readonly encoded?: Float64Array;
  /** The CSV's text, read only if rows must be renumbered (see RowNumbering). */
  readonly text: () => string;
  readonly oob?: OobInput;
  /** The panel's summary; a function when it depends on the table's scores (a forest opened from a file). */
  readonly summary: FitSummary | ((scored: { prediction: Prediction; truth: Float64Array }) => FitSummary);
  readonly scorer: ScorerLike;
  /** Seeds the samples drawn for points and averaged maps; the forest's own seed when absent. */
  readonly seed?: number;
  /**
   * Starts the explanation thread (contributions, dependence, intervals); without it the session explains
   * nothing, and averaged maps are refused.
   */
  readonly explainer?: (setup: ExplainSetup) => ExplainerLike;
  /** Where regression intervals come from: the fit in memory, or the table taken as the training data. */
  readonly quantiles?: { readonly from: 'fit'; readonly report: FitReport } | { readonly from: 'table' } | { readonly from: 'none'; readonly reason: string };
  /** Set for a forest imported without its training sample: the model file's name, for hovers. */
  readonly importedFrom?: string;
  /** Regression: the interval level to prepare for every row at once. */
  readonly intervalLevel?: number;
}

/** How many contributions a hover lists. */
export const HOVER_CONTRIBUTIONS = 3;

/** Another CSV scored with the active forest, for hovers. */
export interface ScoredFile {
  readonly store: RowStore;
  /** Its rows in the forest's feature space, for explanations. */
  readonly encoded: Float64Array;
  readonly lines: LineIndex;
  readonly numbering: RowNumbering;
  readonly label: string;
  /** A row of the fitted file itself that its table does not hold (sampled away), scored on its own. */
  readonly outsideSample?: { readonly line: number };
}

export class ForestSession {
  readonly forest: Forest;
  readonly source: SessionSource;
  readonly table: Table;
  readonly store: RowStore;
  readonly lines: LineIndex;
  readonly numbering: RowNumbering;
  readonly summary: FitSummary;
  readonly scorer: ScorerLike;
  /** Feature-space rows of the table, [row * p + f]. */
  readonly encoded: Float64Array;
  readonly p: number;
  /** Table rows the forest was trained on (all rows for a forest opened from a file). */
  readonly trainRows: Int32Array;
  /** The table's target per row in the forest's codes; NaN where missing. */
  readonly truth: Float64Array;
  private readonly suspectList: SuspectRow[];
  private readonly suspectByRow = new Map<number, SuspectRow>();
  private readonly seed: number;
  /** Absent when the session was made without an explanation thread. */
  readonly explanations: Explanations | undefined;
  private disposed = false;
  /** The model file's name when the forest was imported without its training sample. */
  readonly importedFrom: string | undefined;

  private constructor(init: SessionInit, summary: FitSummary, encoded: Float64Array, store: RowStore, numbering: RowNumbering, truth: Float64Array) {
    this.truth = truth;
    this.importedFrom = init.importedFrom;
    this.forest = init.forest;
    this.source = init.source;
    this.table = init.table;
    this.summary = summary;
    this.scorer = init.scorer;
    this.encoded = encoded;
    this.p = init.forest.schema.features.length;
    this.store = store;
    this.numbering = numbering;
    this.lines = new LineIndex(init.table.lineOfRow, init.source.delimiter);
    this.trainRows = init.oob?.trainRows ?? Int32Array.from({ length: init.table.rowCount }, (_, i) => i);
    this.seed = init.seed ?? init.forest.params.seed;
    this.suspectList = this.findSuspects();
    for (const s of this.suspectList) this.suspectByRow.set(s.row, s);
    this.explanations = init.explainer ? this.startExplanations(init) : undefined;
  }

  private startExplanations(init: SessionInit): Explanations {
    const { p } = this;
    const trainX = new Float64Array(this.trainRows.length * p);
    this.trainRows.forEach((r, i) => trainX.set(this.encoded.subarray(r * p, r * p + p), i * p));
    const q = init.quantiles;
    const regression = this.forest.schema.target.task === 'regression';
    const quantiles: ExplainSetup['quantiles'] =
      !regression || !q
        ? null
        : q.from === 'fit'
          ? { from: 'fit', report: q.report, table: this.table }
          : q.from === 'table'
            ? { from: 'table', table: this.table }
            : q;
    const explainer = init.explainer!({ forest: quantiles?.from === 'fit' ? undefined : this.forest, trainX, trainCount: this.trainRows.length, quantiles });
    const e = new Explanations(this.forest, explainer, this.encoded, this.table.rowCount, this.trainRows, this.seed);
    if (init.intervalLevel !== undefined) e.prepareIntervals(init.intervalLevel);
    return e;
  }

  /** Scores the whole table once (in the scorer's thread) and indexes it for hovers and the panel. */
  static async create(init: SessionInit): Promise<ForestSession> {
    const { forest, table } = init;
    const encoded = init.encoded ?? encodeTable(forest.schema, table, init.source.label);
    const prediction = await init.scorer.predict(encoded, table.rowCount);
    const truth = truthOf(forest, table);
    let oob: OobPart | undefined;
    if (init.oob) {
      const trainPos = new Int32Array(table.rowCount).fill(-1);
      init.oob.trainRows.forEach((r, i) => (trainPos[r] = i));
      oob = { trainPos, trainCount: init.oob.trainRows.length, inBag: init.oob.inBag, margin: init.oob.margin };
    }
    const holdout = new Set<number>(init.oob?.holdoutRows ?? []);
    const tolerance = forest.schema.target.task === 'regression' ? 0.25 * targetSd(truth, init.oob?.trainRows) : 0;
    const store = new RowStore(forest.schema.target.task, forest.schema.target.classes ?? [], prediction, truth, oob, holdout, tolerance);
    const numbering = RowNumbering.build(table.lineOfRow, init.source.delimiter, init.text, table.rowNumber);
    const summary = typeof init.summary === 'function' ? init.summary({ prediction, truth }) : init.summary;
    return new ForestSession(init, summary, encoded, store, numbering, truth);
  }

  get task(): 'classification' | 'regression' {
    return this.forest.schema.target.task;
  }

  get classes(): readonly string[] {
    return this.forest.schema.target.classes ?? [];
  }

  // ---------------------------------------------------------------------------------------------
  // Editor

  /** Table row under a 1-based editor line of the fitted CSV. */
  rowAtLine(line: number, read: LineReader): number | undefined {
    return this.lines.rowAt(line, read);
  }

  hover(tableRow: number, showVotesLink?: (dataRow: number) => string): string {
    const dataRow = this.numbering.dataRow(tableRow);
    const s = this.suspectByRow.get(dataRow);
    const ctx: HoverContext = {
      target: this.forest.schema.target.name,
      classes: this.classes,
      dataRow,
      suspectReason: s ? this.suspectReason(s) : undefined,
      showVotesLink: showVotesLink?.(dataRow),
      tolerance: this.task === 'regression' ? this.store.tolerance : undefined,
      importedFrom: this.importedFrom,
    };
    return hoverMarkdown(this.store.answer(tableRow), ctx);
  }

  /** The hover's contributions part for a table row, once computed; undefined without explanations. */
  async hoverContributions(tableRow: number, urgency: Urgency = 'now', signal?: AbortSignal): Promise<string | undefined> {
    const e = this.explanations;
    if (!e) return undefined;
    return this.contributionsText(this.store, tableRow, await e.rowContributions(tableRow, urgency, signal));
  }

  /** The hover's interval part for a table row (regression), or why there is none. */
  async hoverInterval(tableRow: number, level: number, urgency: Urgency = 'now'): Promise<string | undefined> {
    const e = this.explanations;
    if (!e || !e.regression) return undefined;
    return this.intervalText(await e.interval(tableRow, level, urgency), level);
  }

  async hoverOtherContributions(file: ScoredFile, tableRow: number, signal?: AbortSignal): Promise<string | undefined> {
    const e = this.explanations;
    if (!e) return undefined;
    return this.contributionsText(file.store, tableRow, await e.contributions(file, tableRow, file.encoded, 'now', signal));
  }

  async hoverOtherInterval(file: ScoredFile, tableRow: number, level: number): Promise<string | undefined> {
    const e = this.explanations;
    if (!e || !e.regression) return undefined;
    return this.intervalText(await e.otherInterval(file, tableRow, file.encoded, level, 'now'), level);
  }

  /** Starts working out a row's contributions before anyone asks (the cursor just landed on it). */
  prefetchContributions(tableRow: number): void {
    this.explanations?.prefetch(tableRow);
  }

  private contributionsText(store: RowStore, tableRow: number, c: RowContribution): string {
    const predicted = store.answer(tableRow).predicted;
    const e = this.explanations!.explanationOf(c, this.task === 'classification' ? predicted : null);
    const names = this.forest.schema.features.map((f) => f.name);
    const { top, rest, others } = largestContributions(names, e.values, HOVER_CONTRIBUTIONS);
    const text = contributionsMarkdown({
      className: e.output === null ? undefined : (this.classes[e.output] ?? `class ${e.output}`),
      target: this.forest.schema.target.name,
      base: e.base,
      prediction: e.prediction,
      top,
      rest,
      others,
    });
    // An import's covers are this file's counts, so the reader must know what the weights are.
    return this.importedFrom === undefined ? text : `${text} The ${COVERS_FROM_FILE}.`;
  }

  private intervalText(a: IntervalAnswer, level: number): string {
    if ('unavailable' in a) return `No ${formatLevel(level)} prediction interval: ${a.unavailable}`;
    return intervalMarkdown(a.level, a.lower, a.upper, this.forest.schema.target.name);
  }

  suspects(limit: number): SuspectRow[] {
    return this.suspectList.slice(0, limit);
  }

  /** Start lines (1-based) of the suspect rows, most doubtful first. */
  suspectLines(limit: number): Array<{ line: number; reason: string }> {
    return this.suspects(limit).map((s) => {
      const t = this.numbering.tableRow(s.row)!;
      return { line: this.table.lineOfRow[t], reason: this.suspectReason(s) };
    });
  }

  suspectReason(s: SuspectRow): string {
    const label = this.classes[s.label] ?? String(s.label);
    const voted = this.classes[s.oobPredicted] ?? String(s.oobPredicted);
    const t = this.numbering.tableRow(s.row);
    const oob = t === undefined ? undefined : this.store.answer(t).oob;
    const share = oob && oob.kind === 'classification' && oob.trees ? oob.counts[s.oobPredicted] / oob.trees : NaN;
    return (
      `the trees that never saw this row mostly vote "${voted}"${Number.isFinite(share) ? ` (${formatShare(share)})` : ''}, ` +
      `but it is labelled "${label}" (margin ${formatNumber(s.margin)}). The label may be wrong, or the row unusual.`
    );
  }

  // ---------------------------------------------------------------------------------------------
  // Panel

  /**
   * Per-tree votes for data rows (the protocol's 1-based numbers); unknown rows are skipped. Regression rows
   * carry their interval at `level` when it is already computed (see intervalsReady).
   */
  rowVotes(dataRows: readonly number[], level?: number): RowVotes[] {
    const out: RowVotes[] = [];
    for (const dataRow of dataRows) {
      const r = this.numbering.tableRow(dataRow);
      if (r === undefined) continue;
      const votes = rowVotesOf(this.store, r, dataRow);
      const a = level === undefined ? undefined : this.explanations?.cachedInterval(r, level);
      out.push(a && !('unavailable' in a) ? { ...votes, interval: a } : votes);
    }
    return out;
  }

  /** Whether rowVotes can already give every one of these rows its interval; computes the missing ones. */
  async intervalsReady(dataRows: readonly number[], level: number): Promise<boolean> {
    const e = this.explanations;
    if (!e || !e.regression) return false;
    let changed = false;
    for (const dataRow of dataRows) {
      const r = this.numbering.tableRow(dataRow);
      if (r === undefined || e.cachedInterval(r, level)) continue;
      const a = await e.interval(r, level, 'now');
      if ('unavailable' in a) return false;
      changed = true;
    }
    return changed;
  }

  /** The full contribution chart of one data row, for the predicted class (or the value). */
  async contributions(dataRow: number, urgency: Urgency = 'now', signal?: AbortSignal): Promise<RowContributions> {
    const e = this.requireExplanations();
    const r = this.numbering.tableRow(dataRow);
    if (r === undefined) throw new RangeError(`Row ${dataRow} is not among the rows the forest was shown against.`);
    const c = await e.rowContributions(r, urgency, signal);
    const ex = e.explanationOf(c, this.task === 'classification' ? this.store.answer(r).predicted : null);
    return rowContributionsMessage(this.forest, this.encoded, r * this.p, dataRow, ex);
  }

  /** Mean absolute contribution per feature over a background sample of training rows (see Explanations). */
  globalContributions(onUpdate: (g: GlobalContributions) => void, signal?: AbortSignal): Promise<GlobalContributions> {
    return this.requireExplanations().globalContributions(onUpdate, signal);
  }

  /** One feature's partial dependence and individual curves; output: the class to show (null: the liveliest). */
  async dependence(feature: string, output: number | null): Promise<Dependence> {
    const e = this.requireExplanations();
    const f = this.featureIndex(feature);
    const pd = await e.dependence(f);
    const classification = this.task === 'classification';
    const k = classification ? (output !== null && output < pd.outputs ? output : defaultDependenceOutput(pd)) : 0;
    return dependenceMessage(pd, k, classification, (i) => this.numbering.dataRow(this.trainRows[i]));
  }

  /** The feature the dependence view opens on: the most important one. */
  defaultDependenceFeature(): string | undefined {
    const f = this.ranked()[0];
    return f === undefined ? undefined : this.forest.schema.features[f].name;
  }

  private requireExplanations(): Explanations {
    if (!this.explanations) throw new RangeError('Explanations are not available for this forest.');
    return this.explanations;
  }

  /** The two most important features, for the first map. */
  defaultAxes(): { x: string; y: string } | undefined {
    const ranked = this.ranked().filter((f) => this.mappable(f));
    if (ranked.length < 2) return undefined;
    const names = this.forest.schema.features;
    return { x: names[ranked[0]].name, y: names[ranked[1]].name };
  }

  async regionMap(x: string, y: string, reference: ReferenceChoice, panel: PanelSettings): Promise<RegionMap> {
    const fx = this.featureIndex(x);
    const fy = this.featureIndex(y);
    if (fx === fy) throw new RangeError('Pick two different features for the map.');
    // Each averaged cell costs one prediction per sampled row, so those maps are drawn coarser.
    const resolution = reference.mode === 'averaged' ? Math.min(panel.gridResolution, AVERAGED_RESOLUTION) : panel.gridResolution;
    const map = await this.scoreMap(fx, fy, reference, resolution, panel.dependenceRows);
    return { ...map, points: this.points(fx, fy, panel.pointsDrawn) };
  }

  /** Small maps for pairs among the most important features, drawn without points. */
  async mapMatrix(panel: PanelSettings, limit: number): Promise<RegionMap[]> {
    const ranked = this.ranked().filter((f) => this.mappable(f));
    const pairs = topPairs(ranked, panel.pairFeatures).slice(0, limit);
    const res = Math.max(10, Math.min(32, Math.round(panel.gridResolution / 3)));
    const maps: RegionMap[] = [];
    for (const [a, b] of pairs) maps.push({ ...(await this.scoreMap(a, b, { mode: 'typical' }, res, panel.dependenceRows)), points: null });
    return maps;
  }

  // ---------------------------------------------------------------------------------------------
  // Other files

  /** Scores another table with this forest; throws core's SchemaMismatchError when its columns do not fit. */
  async scoreOther(table: Table, delimiter: string, label: string, text: () => string): Promise<ScoredFile> {
    const x = encodeTable(this.forest.schema, table, label);
    const prediction = await this.scorer.predict(x, table.rowCount);
    const store = new RowStore(this.task, this.classes, prediction, truthOf(this.forest, table), undefined, new Set(), this.store.tolerance);
    return { store, encoded: x, lines: new LineIndex(table.lineOfRow, delimiter), numbering: RowNumbering.build(table.lineOfRow, delimiter, text, table.rowNumber), label };
  }

  hoverOther(file: ScoredFile, tableRow: number): string {
    return hoverMarkdown(file.store.answer(tableRow), {
      target: this.forest.schema.target.name,
      classes: this.classes,
      dataRow: file.numbering.dataRow(tableRow),
      forestLabel: this.source.label,
      standing: file.outsideSample ? 'not in the sample the forest was fitted on, so no tree trained on it' : undefined,
      line: file.outsideSample?.line,
      tolerance: this.task === 'regression' ? this.store.tolerance : undefined,
      importedFrom: this.importedFrom,
    });
  }

  async dispose(): Promise<void> {
    if (this.disposed) return;
    this.disposed = true;
    await Promise.all([this.scorer.dispose(), this.explanations?.dispose()]);
  }

  // ---------------------------------------------------------------------------------------------

  private featureIndex(name: string): number {
    const f = this.forest.schema.features.findIndex((g) => g.name === name);
    if (f < 0) throw new RangeError(`The forest has no feature "${name}".`);
    return f;
  }

  private ranked(): number[] {
    const imp = this.summary.importance;
    const perm = Float64Array.from(imp, (m) => m.permutation ?? NaN);
    const impurity = Float64Array.from(imp, (m) => m.impurity);
    return rankFeatures(perm, impurity);
  }

  private mappable(f: number): boolean {
    const info = this.forest.schema.features[f];
    return info.kind === 'numeric' || ((info.levels?.length ?? 0) > 0 && (info.levels?.length ?? 0) <= 200);
  }

  private async scoreMap(fx: number, fy: number, reference: ReferenceChoice, resolution: number, averageRows: number): Promise<Omit<RegionMap, 'points'>> {
    const schema = this.forest.schema;
    const { p } = this;
    const rows = this.table.rowCount;
    const xa = planAxis(fx, schema.features[fx], this.encoded, p, rows, resolution);
    const ya = planAxis(fy, schema.features[fy], this.encoded, p, rows, resolution);
    let base: Float64Array;
    let used: RegionMap['reference'];
    let heldAt: RegionMap['heldAt'] = [];
    if (reference.mode === 'row') {
      const t = this.numbering.tableRow(reference.row);
      if (t === undefined) throw new RangeError(`Row ${reference.row} is not among the rows the forest was shown against.`);
      base = this.encoded.slice(t * p, t * p + p);
      used = { mode: 'row', row: reference.row };
      heldAt = this.heldAtText(base, fx, fy);
    } else if (reference.mode === 'averaged') {
      // Two-feature partial dependence (Friedman 2001, section 8.2 from memory): core walks each sampled row
      // through each tree once, splitting the grid only where a tree tests one of the two features.
      const e = this.requireExplanations();
      const d = await e.dependence2D(fx, fy, xa.values, ya.values, averageRows);
      const cells = cellsFromAverages(this.task, d.outputs, xa.n * ya.n, d.values);
      return { x: xa.axis, y: ya.axis, nx: xa.n, ny: ya.n, cells, reference: { mode: 'averaged', sampleRows: d.rows }, heldAt: [] };
    } else {
      base = Float64Array.from(schema.features, (f) => f.reference);
      used = { mode: 'typical' };
      heldAt = this.heldAtText(base, fx, fy);
    }
    const plan: GridPlan = { x: xa, y: ya, p, base, baseRows: 1 };
    const acc = new GridAccumulator(this.task, this.classes.length, xa.n * ya.n);
    for (const batch of gridBatches(plan)) {
      const scored = await this.scorer.predict(batch.x, batch.rows);
      acc.add(batch, scored);
    }
    return { x: xa.axis, y: ya.axis, nx: xa.n, ny: ya.n, cells: acc.finish(), reference: used, heldAt };
  }

  private heldAtText(base: Float64Array, fx: number, fy: number): RegionMap['heldAt'] {
    return this.forest.schema.features
      .map((f, i) => ({ f, i }))
      .filter(({ i }) => i !== fx && i !== fy)
      .map(({ f, i }) => ({ feature: f.name, value: featureValueText(f, base[i]) }));
  }

  /** A seeded sample of training rows with both coordinates, for drawing over a map. */
  private points(fx: number, fy: number, limit: number): PointSample | null {
    if (limit <= 0) return null;
    const { p } = this;
    const usable: number[] = [];
    for (const r of this.trainRows) {
      if (!Number.isNaN(this.encoded[r * p + fx]) && !Number.isNaN(this.encoded[r * p + fy]) && !Number.isNaN(this.truth[r])) usable.push(r);
    }
    const pick = sampleRows(usable.length, limit, this.seed + 1);
    const rows = Array.from(pick, (i) => usable[i]).sort((a, b) => a - b);
    const out: PointSample = { x: [], y: [], target: [], row: [], total: usable.length };
    for (const r of rows) {
      out.target.push(this.truth[r]);
      out.x.push(this.encoded[r * p + fx]);
      out.y.push(this.encoded[r * p + fy]);
      out.row.push(this.numbering.dataRow(r));
    }
    return out;
  }

  private findSuspects(): SuspectRow[] {
    if (this.task !== 'classification') return [];
    const out: SuspectRow[] = [];
    for (let i = 0; i < this.trainRows.length; i++) {
      const r = this.trainRows[i];
      // Margins first (an array read when core supplied them); the vote tally only for the few doubtful rows.
      const m = this.store.margin(r);
      if (!(m < 0) || Number.isNaN(this.truth[r])) continue;
      const oob = this.store.tally(r, this.store.outOfBagTrees(r) ?? []);
      if (oob.kind !== 'classification') continue;
      out.push({ row: this.numbering.dataRow(r), margin: m, label: this.truth[r], oobPredicted: majority(oob.counts) });
    }
    return out.sort((a, b) => a.margin - b.margin || a.row - b.row);
  }
}

function rowVotesOf(store: RowStore, r: number, dataRow: number): RowVotes {
  const a = store.answer(r);
  const votes = new Array<number>(store.trees);
  for (let t = 0; t < store.trees; t++) votes[t] = store.vote(t, r);
  const oob = a.oob ? (a.oob.kind === 'classification' ? majority(a.oob.counts) : a.oob.mean) : NaN;
  return {
    row: dataRow,
    counts: a.all.kind === 'classification' ? a.all.counts : [],
    agreement: a.agreement,
    entropy: a.all.kind === 'classification' ? voteEntropy(a.all.counts) : null,
    oobVote: Number.isFinite(oob) && !(a.task === 'classification' && oob < 0) ? oob : null,
    label: a.truth ?? null,
    votes,
    outOfBag: store.outOfBagTrees(r) ?? [],
  };
}

/** The table's own target per row, in the forest's codes (NaN: missing, absent, or a class it never saw). */
export function truthOf(forest: Forest, table: Table): Float64Array {
  const target = forest.schema.target;
  const col = findColumn(table, target.name);
  const out = new Float64Array(table.rowCount).fill(NaN);
  if (!col) return out;
  if (target.task === 'regression') {
    if (col.kind === 'numeric') out.set(col.values);
    return out;
  }
  const code = new Map((target.classes ?? []).map((c, k) => [c, k]));
  for (let i = 0; i < table.rowCount; i++) {
    const k = code.get(cellText(col, i));
    if (k !== undefined) out[i] = k;
  }
  return out;
}

function targetSd(truth: Float64Array, rows?: Int32Array): number {
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
  return Math.sqrt(Math.max(0, (sq - n * mean * mean) / (n - 1)));
}
