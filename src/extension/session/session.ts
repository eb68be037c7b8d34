// The active forest and everything the editor and panel ask of it. No `vscode` here: the host's seams call
// these methods and turn the answers into hovers, decorations and panel messages.
//
// Scoring always goes through a ScorerLike (core's Scorer in the extension: a worker thread), so the
// extension host's own thread only encodes rows and reads arrays.

import type { Dependence, FitSummary, GlobalContributions, ReferenceChoice, RegionMap, RowContributions, RowVotes as PanelRowVotes, SuspectRow } from '../../protocol/messages';
import type { CoreFitSummary, FitReport, Forest, Membership, Prediction, Table, TrainingRows } from '../engine';
import { encodeTable, membershipOf, RowVotes, targetCodes, targetTolerance } from '../engine';
import { hoverMarkdown, type HoverContext } from '../editor/hoverText';
import type { ExplainerLike, Urgency } from '../workers/explainClient';
import type { ExplainSetup } from '../workers/explainJobs';
import {
  defaultDependenceOutput,
  dependenceMessage,
  Explanations,
  rowContributionsMessage,
  type TreeChoice,
} from './explanations';
import { LineIndex, type LineReader } from '../rows/lineMap';
import { RowNumbering } from '../rows/numbering';
import { csvLabel, type LoadedCsv } from './csvSource';
import type { PanelSettings } from '../settings';
import { mapMatrix, mappableRanking, regionMap } from './maps';
import { contributionsText, intervalText, rowVotesOf, suspectReason } from './rowText';
import { explainedClass, withBoostedTrees, withScale } from './boostedRows';

export interface ScorerLike {
  /** With a membership, the prediction also holds each training row's out-of-bag answer (core's predictEncoded). */
  predict(x: Float64Array, rows: number, membership?: Membership): Promise<Prediction>;
  dispose(): Promise<void>;
}


/** Which table rows the forest trained on (and held out), and how each tree drew them. */
export type OobInput = TrainingRows;

/** What the session scored, for a summary that depends on it (a forest opened from a file). */
export interface Scored {
  readonly prediction: Prediction;
  readonly truth: Float64Array;
  /** The session's row answers, so a summary need not tally the votes again. */
  readonly votes: RowVotes;
}

export interface SessionInit {
  readonly forest: Forest;
  /** The CSV the forest is shown against, as read; its table is the session's. */
  readonly csv: LoadedCsv;
  /** The table in the forest's feature space, when the caller has encoded it already. */
  readonly encoded?: Float64Array;
  /** The CSV's text, read only if rows must be renumbered (see RowNumbering). */
  readonly text: () => string;
  readonly oob?: OobInput;
  /** The panel's summary, stamped with the session's id (see FitSummary.fit); it may use what was scored. */
  readonly summary: (fit: string, scored: Scored) => FitSummary;
  /** Core's summary the panel's is made from, kept for the shareable report (src/report). */
  readonly coreSummary?: (scored: Scored) => CoreFitSummary;
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
  /** The model file a forest was opened from, for the shareable report. */
  readonly model?: { readonly file: string; readonly kind: 'copse' | 'onnx' | 'xgboost' };
  /** Regression: the interval level to prepare for every row at once. */
  readonly intervalLevel?: number;
}

/** How many contributions a hover lists. */
export const HOVER_CONTRIBUTIONS = 3;

/** Another CSV scored with the active forest, for hovers. */
export interface ScoredFile {
  readonly store: RowVotes;
  /** Its rows in the forest's feature space, for explanations. */
  readonly encoded: Float64Array;
  readonly lines: LineIndex;
  readonly numbering: RowNumbering;
  readonly label: string;
  /** A row of the fitted file itself that its table does not hold (sampled away), scored on its own. */
  readonly outsideSample?: { readonly line: number };
}

let sessions = 0;

export class ForestSession {
  /** Names this forest-and-table pairing for the panel: every message about it carries this id. */
  readonly id: string;
  readonly forest: Forest;
  readonly source: LoadedCsv;
  readonly table: Table;
  readonly store: RowVotes;
  readonly lines: LineIndex;
  readonly numbering: RowNumbering;
  readonly summary: FitSummary;
  /** Core's summary, for the shareable report; absent when the caller gave none. */
  readonly coreSummary: CoreFitSummary | undefined;
  readonly scorer: ScorerLike;
  /** Feature-space rows of the table, [row * p + f]. */
  readonly encoded: Float64Array;
  readonly p: number;
  /** Table rows the forest was trained on (all rows for a forest opened from a file without its membership). */
  readonly trainRows: Int32Array;
  /** The table's target per row in the forest's codes; NaN where missing. */
  readonly truth: Float64Array;
  readonly seed: number;
  /** Whether out-of-bag answers exist for the training rows (the membership is known). */
  readonly knowsMembership: boolean;
  private readonly suspectList: SuspectRow[];
  private readonly suspectByRow = new Map<number, SuspectRow>();
  /** Absent when the session was made without an explanation thread. */
  readonly explanations: Explanations | undefined;
  private disposed = false;
  /** The model file's name when the forest was imported without its training sample. */
  readonly importedFrom: string | undefined;
  readonly model: SessionInit['model'];

  private constructor(init: SessionInit, id: string, summary: FitSummary, encoded: Float64Array, store: RowVotes, numbering: RowNumbering, truth: Float64Array, core?: CoreFitSummary) {
    this.id = id;
    this.coreSummary = core;
    this.model = init.model;
    this.truth = truth;
    this.importedFrom = init.importedFrom;
    this.forest = init.forest;
    this.source = init.csv;
    this.table = init.csv.load.table;
    this.summary = summary;
    this.scorer = init.scorer;
    this.encoded = encoded;
    this.p = init.forest.schema.features.length;
    this.store = store;
    this.numbering = numbering;
    this.lines = new LineIndex(this.table.lineOfRow, init.csv.load.delimiter);
    this.knowsMembership = init.oob !== undefined;
    this.trainRows = init.oob?.trainRows ?? Int32Array.from({ length: this.table.rowCount }, (_, i) => i);
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
    const explainer = init.explainer!({ forest: quantiles?.from === 'fit' ? undefined : this.forest, trainX, trainCount: this.trainRows.length, quantiles, inBag: init.oob?.inBag });
    const e = new Explanations(this.forest, explainer, this.encoded, this.table.rowCount, this.trainRows, this.seed);
    if (init.intervalLevel !== undefined) e.prepareIntervals(init.intervalLevel);
    return e;
  }

  /** Scores the whole table once (in the scorer's thread), out-of-bag too where it can, and indexes it. */
  static async create(init: SessionInit): Promise<ForestSession> {
    const { forest } = init;
    const table = init.csv.load.table;
    const encoded = init.encoded ?? encodeTable(forest.schema, table, csvLabel(init.csv));
    const membership = init.oob ? membershipOf(init.oob.trainRows, table.rowCount, init.oob.inBag) : undefined;
    const prediction = await init.scorer.predict(encoded, table.rowCount, membership);
    const truth = targetCodes(forest, table);
    const task = forest.schema.target.task;
    const holdout = new Set<number>(init.oob?.holdoutRows ?? []);
    const store = new RowVotes(task, forest.schema.target.classes ?? [], prediction, truth, membership, holdout, targetTolerance(task, truth, init.oob?.trainRows));
    const numbering = RowNumbering.build(table.lineOfRow, init.csv.load.delimiter, init.text, table.rowNumber);
    const id = `${Date.now().toString(36)}-${++sessions}`;
    const scored = { prediction, truth, votes: store };
    return new ForestSession(init, id, init.summary(id, scored), encoded, store, numbering, truth, init.coreSummary?.(scored));
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
      suspectReason: s ? suspectReason(this, s) : undefined,
      showVotesLink: showVotesLink?.(dataRow),
      tolerance: this.task === 'regression' ? this.store.tolerance : undefined,
      importedFrom: this.importedFrom,
      membershipUnknown: !this.knowsMembership && this.importedFrom === undefined,
      boosted: this.forest.boosting !== undefined,
    };
    return hoverMarkdown(this.store.answer(tableRow), ctx);
  }

  /** The hover's contributions part for a table row, once computed; undefined without explanations. */
  async hoverContributions(tableRow: number, urgency: Urgency = 'now', signal?: AbortSignal): Promise<string | undefined> {
    const e = this.explanations;
    if (!e) return undefined;
    return contributionsText(this, this.store, tableRow, await e.rowContributions(tableRow, urgency, signal, this.treesFor(tableRow)));
  }

  /** The hover's interval part for a table row (regression), or why there is none. */
  async hoverInterval(tableRow: number, level: number, urgency: Urgency = 'now'): Promise<string | undefined> {
    const e = this.explanations;
    if (!e || !e.regression) return undefined;
    return intervalText(this, await e.interval(tableRow, level, urgency), level);
  }

  async hoverOtherContributions(file: ScoredFile, tableRow: number, signal?: AbortSignal): Promise<string | undefined> {
    const e = this.explanations;
    if (!e) return undefined;
    return contributionsText(this, file.store, tableRow, await e.contributions(file, tableRow, file.encoded, 'now', signal));
  }

  async hoverOtherInterval(file: ScoredFile, tableRow: number, level: number): Promise<string | undefined> {
    const e = this.explanations;
    if (!e || !e.regression) return undefined;
    return intervalText(this, await e.otherInterval(file, tableRow, file.encoded, level, 'now'), level);
  }

  /** Starts working out a row's contributions before anyone asks (the cursor just landed on it). */
  prefetchContributions(tableRow: number): void {
    this.explanations?.prefetch(tableRow, this.treesFor(tableRow));
  }

  /**
   * Which trees explain a row: for a training row, the ones that never saw it, so the explanation is of the
   * answer the hover leads with (and of why those trees may disagree with the label); all trees otherwise.
   */
  treesFor(tableRow: number): TreeChoice {
    return this.store.answer(tableRow).lead === 'out-of-bag' ? 'out-of-bag' : 'all';
  }

  /** The most doubtful training rows first (core's doubtful.ts), at most `limit`. */
  /** Whether the out-of-bag trees doubt the label of this table row (as rowAtLine gives it). */
  isDoubtful(tableRow: number): boolean {
    return this.suspectByRow.has(this.numbering.dataRow(tableRow));
  }

  suspects(limit: number): SuspectRow[] {
    return this.suspectList.slice(0, limit);
  }

  /** How many training rows the forest doubts; null when it cannot tell (no out-of-bag votes). */
  get suspectCount(): number | null {
    return this.knowsMembership ? this.suspectList.length : null;
  }

  /** Start lines (1-based) of the suspect rows, most doubtful first. */
  suspectLines(limit: number): Array<{ line: number; reason: string }> {
    return this.suspects(limit).map((s) => {
      const t = this.numbering.tableRow(s.row)!;
      return { line: this.table.lineOfRow[t], reason: suspectReason(this, s) };
    });
  }

  // ---------------------------------------------------------------------------------------------
  // Panel

  /**
   * Per-tree votes for data rows (the protocol's 1-based numbers); unknown rows are skipped. Regression rows
   * carry their interval at `level` when it is already computed (see intervalsReady).
   */
  rowVotes(dataRows: readonly number[], level?: number): PanelRowVotes[] {
    const out: PanelRowVotes[] = [];
    for (const dataRow of dataRows) {
      const r = this.numbering.tableRow(dataRow);
      if (r === undefined) continue;
      const votes = withBoostedTrees(this.forest, this.encoded, r * this.p, rowVotesOf(this.store, r, dataRow), this.store.answer(r).all.proba);
      const a = level === undefined ? undefined : this.explanations?.cachedInterval(r, level);
      out.push(a && !('unavailable' in a) ? { ...votes, interval: a } : votes);
    }
    return out;
  }

  /** The full contribution chart of one data row, for the predicted class (or the value). */
  async contributions(dataRow: number, urgency: Urgency = 'now', signal?: AbortSignal): Promise<RowContributions> {
    const e = this.requireExplanations();
    const r = this.numbering.tableRow(dataRow);
    if (r === undefined) throw new RangeError(`Row ${dataRow} is not among the rows the forest was shown against.`);
    const c = await e.rowContributions(r, urgency, signal, this.treesFor(r));
    const answer = this.store.answer(r);
    const ex = e.explanationOf(c, this.task === 'classification' ? explainedClass(this.forest, answer.headline.predicted) : null);
    return withScale(this.forest, rowContributionsMessage(this.forest, this.encoded, r * this.p, dataRow, ex), answer.all.proba);
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
    const f = mappableRanking(this)[0];
    return f === undefined ? undefined : this.forest.schema.features[f].name;
  }

  requireExplanations(): Explanations {
    if (!this.explanations) throw new RangeError('Explanations are not available for this forest.');
    return this.explanations;
  }

  /** The two most important features the panel shows, for the first map. */
  defaultAxes(): { x: string; y: string } | undefined {
    const ranked = mappableRanking(this);
    if (ranked.length < 2) return undefined;
    const names = this.forest.schema.features;
    return { x: names[ranked[0]].name, y: names[ranked[1]].name };
  }

  regionMap(x: string, y: string, reference: ReferenceChoice, panel: PanelSettings): Promise<RegionMap> {
    return regionMap(this, x, y, reference, panel);
  }

  /** Small maps for pairs among the most important features, drawn without points. */
  mapMatrix(panel: PanelSettings, limit: number): Promise<RegionMap[]> {
    return mapMatrix(this, panel, limit);
  }

  // ---------------------------------------------------------------------------------------------
  // Other files

  /** Scores another table with this forest; throws core's SchemaMismatchError when its columns do not fit. */
  async scoreOther(table: Table, delimiter: string, label: string, text: () => string): Promise<ScoredFile> {
    const x = encodeTable(this.forest.schema, table, label);
    const prediction = await this.scorer.predict(x, table.rowCount);
    const store = new RowVotes(this.task, this.classes, prediction, targetCodes(this.forest, table), undefined, new Set(), this.store.tolerance);
    return { store, encoded: x, lines: new LineIndex(table.lineOfRow, delimiter), numbering: RowNumbering.build(table.lineOfRow, delimiter, text, table.rowNumber), label };
  }

  hoverOther(file: ScoredFile, tableRow: number): string {
    return hoverMarkdown(file.store.answer(tableRow), {
      target: this.forest.schema.target.name,
      classes: this.classes,
      dataRow: file.numbering.dataRow(tableRow),
      forestLabel: csvLabel(this.source),
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

  featureIndex(name: string): number {
    const f = this.forest.schema.features.findIndex((g) => g.name === name);
    if (f < 0) throw new RangeError(`The forest has no feature "${name}".`);
    return f;
  }

  private findSuspects(): SuspectRow[] {
    return this.store.doubtful(this.trainRows).map((d) => {
      const r = this.trainRows[d.index];
      return { row: this.numbering.dataRow(r), score: d.score, label: this.truth[r], oobPredicted: this.store.answer(r).oob!.predicted };
    });
  }
}
