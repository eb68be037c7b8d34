// The one module the extension host and the panel webview share. postMessage JSON-serialises, so
// everything here is plain data: number[] instead of typed arrays, null instead of NaN (JSON turns
// NaN into null anyway; saying so in the types keeps both ends honest). Each end runs the guard on
// what it receives, because a webview can be restored from stale state or talk to an older host.
//
// Conventions used throughout:
// - "row" is the 1-based data row of the CSV (row 1 = first record after the header), the number a
//   person sees in the panel; the host turns it into an editor line.
// - Class values are codes into FitSummary.classes; -1 means "no class" (e.g. a grid cell no tree voted on).
// - A region grid covers its axis ranges exactly; cell (i, j) is cells[j * nx + i], i runs along x,
//   j = 0 is the lowest y (drawn at the bottom). See cellCentre for where each cell is evaluated.

export const PROTOCOL_VERSION = 1;

/** Suggested caps so the panel holds a compact summary, never the dataset. */
export const LIMITS = {
  points: 2000,
  selectedRows: 20,
  suspects: 50,
  smallMaps: 10,
  gridCells: 200 * 200,
} as const;

export type TaskKind = 'classification' | 'regression';
export type FeatureKind = 'numeric' | 'categorical' | 'boolean';

// ---------------------------------------------------------------------------------------------
// Fit summary

export interface FeatureRef {
  name: string;
  kind: FeatureKind;
}

export interface DroppedFeature {
  name: string;
  reason: string;
}

export interface ClassScore {
  label: string;
  precision: number | null;
  recall: number | null;
  support: number;
}

export interface ClassificationScoreSummary {
  kind: 'classification';
  rows: number;
  accuracy: number;
  balancedAccuracy: number;
  logLoss: number | null;
  perClass: ClassScore[];
  /** confusion[truth][predicted], counts. */
  confusion: number[][];
}

/** Five-number summary of truth - prediction. */
export interface ResidualSummary {
  min: number;
  q1: number;
  median: number;
  q3: number;
  max: number;
}

export interface RegressionScoreSummary {
  kind: 'regression';
  rows: number;
  r2: number;
  mae: number;
  rmse: number;
  residuals: ResidualSummary | null;
}

export type ScoreSummary = ClassificationScoreSummary | RegressionScoreSummary;

export interface FeatureImportance {
  feature: string;
  /** Mean decrease in impurity, normalised to sum 1 over features. */
  impurity: number;
  /** Mean drop in OOB score when the feature is shuffled; null when not computed. */
  permutation: number | null;
  /** Standard deviation of that drop over repeats/trees; null when not computed. */
  permutationSpread: number | null;
}

export interface FitSummary {
  /** What was fitted; `uri` lets the host refit after the panel is restored. */
  dataset: { label: string; uri: string };
  target: string;
  task: TaskKind;
  /** Class labels in code order; [] for regression. */
  classes: string[];
  trees: number;
  rowsUsed: number;
  rowsRead: number;
  /** true when the rows used are a random sample of the file. */
  sampled: boolean;
  features: FeatureRef[];
  dropped: DroppedFeature[];
  oob: ScoreSummary | null;
  /** Scores on rows held out of training, or on a separate test file. */
  heldOut: { from: 'holdout' | 'test'; scores: ScoreSummary } | null;
  /** curve[t - 1] = OOB error with the first t trees (1 - accuracy, or MSE); null where undefined. */
  curve: (number | null)[];
  importance: FeatureImportance[];
  warnings: string[];
  fitSeconds: number | null;
  /** Which rows permutation importance was measured on: out-of-bag rows (a fit; the default) or the file shown. */
  permutationOn?: 'out-of-bag' | 'file';
  /** Set when out-of-bag figures cannot exist for this forest: why, as a sentence, shown in their place. */
  oobUnavailable?: string;
}

// ---------------------------------------------------------------------------------------------
// Decision-region maps

export interface NumericAxis {
  feature: string;
  kind: 'numeric';
  min: number;
  max: number;
}

export interface LevelAxis {
  feature: string;
  kind: 'categorical' | 'boolean';
  /** One grid cell per level, in code order. */
  levels: string[];
}

export type MapAxis = NumericAxis | LevelAxis;

/** How the features not on the axes were set when scoring the grid. */
export type ReferenceChoice =
  | { mode: 'typical' } // medians for numeric features, most frequent level otherwise
  | { mode: 'row'; row: number }
  | { mode: 'averaged' }; // averaged over a sample of rows: 2-D partial dependence

export type ReferenceUsed =
  | { mode: 'typical' }
  | { mode: 'row'; row: number }
  | { mode: 'averaged'; sampleRows: number };

export type RegionCells =
  | {
      task: 'classification';
      /** Class code per cell (-1: none). */
      predicted: number[];
      /** Share of the vote (or averaged probability) held by that class, 0..1. */
      strength: number[];
    }
  | {
      task: 'regression';
      value: number[];
    };

/** Training rows drawn over a map: parallel arrays, a capped sample. */
export interface PointSample {
  /** Axis coordinates; level codes for categorical axes. */
  x: number[];
  y: number[];
  /** Class code, or the target value for regression. */
  target: number[];
  row: number[];
  /** How many training rows had both coordinates; x.length of them are shown. */
  total: number;
}

export interface RegionMap {
  x: MapAxis;
  y: MapAxis;
  nx: number;
  ny: number;
  cells: RegionCells;
  reference: ReferenceUsed;
  /** The values the other features were held at (for 'typical' and 'row'), as text to show. */
  heldAt: { feature: string; value: string }[];
  points: PointSample | null;
}

// ---------------------------------------------------------------------------------------------
// Per-row tree votes

export interface RowVotes {
  row: number;
  /** Classification: trees voting for each class, in class order. Regression: []. */
  counts: number[];
  /** Share of trees agreeing with the forest's answer, 0..1. */
  agreement: number;
  /** Entropy (bits) of the vote shares; null for regression. */
  entropy: number | null;
  /** Majority of the trees that did not see this row (class code or mean value); null without such trees. */
  oobVote: number | null;
  /** The row's own target (class code or value); null if missing. */
  label: number | null;
  /** votes[t] = tree t's class code or value. */
  votes: number[];
  /** Indices of the trees for which this row was out-of-bag (empty if not a training row). */
  outOfBag: number[];
  /** Regression: the central prediction interval at `level` (quantile regression forest); absent otherwise. */
  interval?: PredictionInterval;
}

export interface PredictionInterval {
  /** Share of the conditional distribution inside, e.g. 0.9. */
  level: number;
  lower: number;
  upper: number;
}

export interface SuspectRow {
  row: number;
  /** OOB margin: share voting for the label minus the largest other share; lower = more suspect. */
  margin: number;
  label: number;
  oobPredicted: number;
}

// ---------------------------------------------------------------------------------------------
// Explanations

/** One feature's share of one row's prediction. */
export interface FeatureContribution {
  feature: string;
  /** The row's value of the feature, as text to show ("(missing)" when missing). */
  value: string;
  /** Signed: what knowing this feature's value moved the prediction by. */
  contribution: number;
}

/** Exact per-feature contributions to one row's prediction: base + sum of contributions = prediction. */
export interface RowContributions {
  row: number;
  /** The class whose probability is explained (the predicted one), or null for a regression value. */
  output: number | null;
  /** The forest's expected output when no feature is known. */
  base: number;
  prediction: number;
  /** Every feature, in the forest's feature order. */
  features: FeatureContribution[];
}

/** The global view: mean absolute contribution per feature over a sample of rows, summed over classes. */
export interface GlobalContributions {
  /** Rows averaged over so far. */
  rows: number;
  /** Rows the sample will hold when finished. */
  planned: number;
  done: boolean;
  features: { feature: string; meanAbs: number }[];
}

/** One-feature partial dependence with the individual curves it averages and where the data lie. */
export interface Dependence {
  feature: string;
  kind: FeatureKind;
  /** Numeric: grid values, increasing. Level features: the level codes 0..L-1. */
  grid: number[];
  /** Level names (one per grid point), or null for a numeric feature. */
  labels: string[] | null;
  /** The class whose probability is shown, or null for a regression value. */
  output: number | null;
  /** Mean of the curves at each grid point. */
  average: number[];
  /** One curve per sampled row, each grid.length long. */
  ice: number[][];
  /** Data rows the curves belong to. */
  iceRows: number[];
  /** Training rows whose value falls in each grid point's cell (see boundaries). */
  counts: number[];
  /** Numeric: the grid.length - 1 cell edges between neighbouring points; [] for levels. */
  boundaries: number[];
  /** Training rows with the feature missing. */
  missing: number;
}

export interface SweepPointSummary {
  featuresPerSplit: number;
  /** Out-of-bag misclassification rate or mean squared error. */
  oobError: number;
  /** Out-of-bag accuracy or R², for reading beside the error. */
  oobScore: number;
  seconds: number;
}

export interface SweepSummary {
  task: TaskKind;
  features: number;
  /** The count the fit's setting resolves to. */
  defaultCount: number;
  points: SweepPointSummary[];
  best: number;
  /** The count the forest now shown was fitted with, when it was fitted on the same data and settings. */
  current: number | null;
}

// ---------------------------------------------------------------------------------------------
// Messages

export type HostToPanel =
  /** Starts a new fit: the panel drops maps, votes and suspects drawn for the previous forest, so send it first. */
  | { type: 'summary'; summary: FitSummary }
  | { type: 'regionMap'; map: RegionMap }
  /** Small maps for pairs among the most important features (points optional, usually omitted). */
  | { type: 'mapMatrix'; maps: RegionMap[] }
  | { type: 'disagreement'; rows: RowVotes[] }
  | { type: 'suspects'; rows: SuspectRow[] }
  | { type: 'highlight'; rows: number[] }
  | { type: 'status'; state: 'idle' | 'working' | 'error'; text: string; progress: number | null }
  /** The selected (or asked-for) row's contributions; `text` says why there are none yet. */
  | { type: 'contributions'; row: number | null; state: 'working' | 'ready' | 'unavailable'; contributions: RowContributions | null; text: string }
  | { type: 'globalContributions'; global: GlobalContributions | null; text: string }
  | { type: 'dependence'; dependence: Dependence }
  | { type: 'sweep'; state: 'running' | 'done' | 'cancelled' | 'error'; progress: number | null; text: string; result: SweepSummary | null };

export type PanelToHost =
  /** choice: the map the panel showed before a reload (from its saved state), for the host to draw again. */
  | { type: 'ready'; version: number; choice?: { x: string; y: string; reference: ReferenceChoice } | null }
  | { type: 'chooseMap'; x: string; y: string; reference: ReferenceChoice }
  | { type: 'openMap'; x: string; y: string }
  | { type: 'revealRow'; row: number }
  | { type: 'refit'; leaveOut: string[]; trees: number | null }
  | { type: 'explainRow'; row: number }
  /** output: the class to show for classification (null: let the host choose), null for regression. */
  | { type: 'chooseDependence'; feature: string; output: number | null }
  | { type: 'runSweep' }
  | { type: 'cancelSweep' }
  | { type: 'sweepRefit'; featuresPerSplit: number };

/** What the panel keeps in getState/setState; the host's serializer may read `dataset` from it. */
export interface PanelState {
  version: number;
  summary: FitSummary | null;
  map: RegionMap | null;
  matrix: RegionMap[];
  suspects: SuspectRow[];
  choice: { x: string; y: string; reference: ReferenceChoice } | null;
}

// ---------------------------------------------------------------------------------------------
// Shared geometry

/** The value at the centre of cell i along an axis with n cells (a level code for level axes). */
export function cellCentre(axis: MapAxis, n: number, i: number): number {
  if (axis.kind !== 'numeric') return i;
  return axis.min + ((i + 0.5) * (axis.max - axis.min)) / n;
}

/** The drawn span of an axis: level axes put level k at k, cells one unit wide. */
export function axisSpan(axis: MapAxis): { min: number; max: number } {
  return axis.kind === 'numeric' ? { min: axis.min, max: axis.max } : { min: -0.5, max: axis.levels.length - 0.5 };
}

// ---------------------------------------------------------------------------------------------
// Runtime guards. Hand-written so the module stays dependency-free; each answers "can the
// receiving end use this without crashing", not "is it sensible".

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v);
const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isNumOrNull = (v: unknown): boolean => v === null || isNum(v);
const isInt = (v: unknown): v is number => Number.isInteger(v);
const isStr = (v: unknown): v is string => typeof v === 'string';
const isArr = (v: unknown, each: (x: unknown) => boolean): v is unknown[] => Array.isArray(v) && v.every(each);
const isNumArr = (v: unknown): v is number[] => isArr(v, isNum);
const isStrArr = (v: unknown): v is string[] => isArr(v, isStr);
const isRow = (v: unknown): v is number => isInt(v) && (v as number) >= 1;
const isFeatureKind = (v: unknown): boolean => v === 'numeric' || v === 'categorical' || v === 'boolean';
const isTask = (v: unknown): boolean => v === 'classification' || v === 'regression';

function isScores(v: unknown): boolean {
  if (!isObj(v) || !isInt(v.rows)) return false;
  if (v.kind === 'classification') {
    return (
      isNum(v.accuracy) &&
      isNum(v.balancedAccuracy) &&
      isNumOrNull(v.logLoss) &&
      isArr(v.perClass, (c) => isObj(c) && isStr(c.label) && isNumOrNull(c.precision) && isNumOrNull(c.recall) && isInt(c.support)) &&
      isArr(v.confusion, isNumArr)
    );
  }
  if (v.kind === 'regression') {
    const r = v.residuals;
    return (
      isNum(v.r2) &&
      isNum(v.mae) &&
      isNum(v.rmse) &&
      (r === null || (isObj(r) && isNum(r.min) && isNum(r.q1) && isNum(r.median) && isNum(r.q3) && isNum(r.max)))
    );
  }
  return false;
}

export function isFitSummary(v: unknown): v is FitSummary {
  if (!isObj(v)) return false;
  const d = v.dataset;
  const h = v.heldOut;
  return (
    isObj(d) &&
    isStr(d.label) &&
    isStr(d.uri) &&
    isStr(v.target) &&
    isTask(v.task) &&
    isStrArr(v.classes) &&
    isInt(v.trees) &&
    isInt(v.rowsUsed) &&
    isInt(v.rowsRead) &&
    typeof v.sampled === 'boolean' &&
    isArr(v.features, (f) => isObj(f) && isStr(f.name) && isFeatureKind(f.kind)) &&
    isArr(v.dropped, (f) => isObj(f) && isStr(f.name) && isStr(f.reason)) &&
    (v.oob === null || isScores(v.oob)) &&
    (h === null || (isObj(h) && (h.from === 'holdout' || h.from === 'test') && isScores(h.scores))) &&
    isArr(v.curve, isNumOrNull) &&
    isArr(
      v.importance,
      (m) => isObj(m) && isStr(m.feature) && isNum(m.impurity) && isNumOrNull(m.permutation) && isNumOrNull(m.permutationSpread),
    ) &&
    isStrArr(v.warnings) &&
    isNumOrNull(v.fitSeconds) &&
    (v.permutationOn === undefined || v.permutationOn === 'out-of-bag' || v.permutationOn === 'file') &&
    (v.oobUnavailable === undefined || isStr(v.oobUnavailable))
  );
}

function isAxis(v: unknown): v is MapAxis {
  if (!isObj(v) || !isStr(v.feature)) return false;
  if (v.kind === 'numeric') return isNum(v.min) && isNum(v.max) && v.max > v.min;
  return (v.kind === 'categorical' || v.kind === 'boolean') && isStrArr(v.levels) && v.levels.length > 0;
}

function isReferenceChoice(v: unknown): v is ReferenceChoice {
  if (!isObj(v)) return false;
  return v.mode === 'typical' || v.mode === 'averaged' || (v.mode === 'row' && isRow(v.row));
}

function isReferenceUsed(v: unknown): v is ReferenceUsed {
  if (!isObj(v)) return false;
  if (v.mode === 'averaged') return isInt(v.sampleRows);
  return isReferenceChoice(v);
}

function isPoints(v: unknown): v is PointSample {
  if (!isObj(v) || !isNumArr(v.x) || !isNumArr(v.y) || !isNumArr(v.target) || !isArr(v.row, isRow) || !isInt(v.total)) return false;
  const n = v.x.length;
  return v.y.length === n && v.target.length === n && v.row.length === n;
}

export function isRegionMap(v: unknown): v is RegionMap {
  if (!isObj(v) || !isAxis(v.x) || !isAxis(v.y) || !isInt(v.nx) || !isInt(v.ny) || v.nx < 1 || v.ny < 1) return false;
  // Level axes get one cell per level, otherwise cells and labels would disagree.
  if (v.x.kind !== 'numeric' && v.x.levels.length !== v.nx) return false;
  if (v.y.kind !== 'numeric' && v.y.levels.length !== v.ny) return false;
  const size = v.nx * v.ny;
  const c = v.cells;
  if (!isObj(c)) return false;
  const cellsOk =
    c.task === 'classification'
      ? isArr(c.predicted, isInt) && isNumArr(c.strength) && c.predicted.length === size && c.strength.length === size
      : c.task === 'regression' && isNumArr(c.value) && c.value.length === size;
  return (
    cellsOk &&
    isReferenceUsed(v.reference) &&
    isArr(v.heldAt, (h) => isObj(h) && isStr(h.feature) && isStr(h.value)) &&
    (v.points === null || isPoints(v.points))
  );
}

function isInterval(v: unknown): v is PredictionInterval {
  return isObj(v) && isNum(v.level) && v.level > 0 && v.level < 1 && isNum(v.lower) && isNum(v.upper) && v.lower <= v.upper;
}

function isRowVotes(v: unknown): v is RowVotes {
  return (
    isObj(v) &&
    (v.interval === undefined || isInterval(v.interval)) &&
    isRow(v.row) &&
    isNumArr(v.counts) &&
    isNum(v.agreement) &&
    isNumOrNull(v.entropy) &&
    isNumOrNull(v.oobVote) &&
    isNumOrNull(v.label) &&
    isNumArr(v.votes) &&
    isArr(v.outOfBag, isInt)
  );
}

function isSuspect(v: unknown): v is SuspectRow {
  return isObj(v) && isRow(v.row) && isNum(v.margin) && isNum(v.label) && isNum(v.oobPredicted);
}

function isRowContributions(v: unknown): v is RowContributions {
  return (
    isObj(v) &&
    isRow(v.row) &&
    (v.output === null || (isInt(v.output) && (v.output as number) >= 0)) &&
    isNum(v.base) &&
    isNum(v.prediction) &&
    isArr(v.features, (f) => isObj(f) && isStr(f.feature) && isStr(f.value) && isNum(f.contribution))
  );
}

function isGlobalContributions(v: unknown): v is GlobalContributions {
  return (
    isObj(v) &&
    isInt(v.rows) &&
    isInt(v.planned) &&
    typeof v.done === 'boolean' &&
    isArr(v.features, (f) => isObj(f) && isStr(f.feature) && isNum(f.meanAbs) && (f.meanAbs as number) >= 0)
  );
}

export function isDependence(v: unknown): v is Dependence {
  if (!isObj(v) || !isStr(v.feature) || !isFeatureKind(v.kind) || !isNumArr(v.grid) || !isNumArr(v.average) || !isInt(v.missing)) return false;
  const G = v.grid.length;
  if (G === 0 || v.average.length !== G) return false;
  if (v.kind === 'numeric' ? v.labels !== null : !(isStrArr(v.labels) && v.labels.length === G)) return false;
  // A numeric axis must rise, or the curve and the cells under it would not line up.
  if (v.kind === 'numeric') for (let g = 1; g < G; g++) if (!(v.grid[g] > v.grid[g - 1])) return false;
  return (
    (v.output === null || (isInt(v.output) && (v.output as number) >= 0)) &&
    isArr(v.ice, (c) => isNumArr(c) && c.length === G) &&
    isArr(v.iceRows, isRow) &&
    (v.iceRows as number[]).length === (v.ice as unknown[]).length &&
    isArr(v.counts, isInt) &&
    (v.counts as number[]).length === G &&
    isNumArr(v.boundaries) &&
    v.boundaries.length === (v.kind === 'numeric' ? G - 1 : 0)
  );
}

function isSweepSummary(v: unknown): v is SweepSummary {
  return (
    isObj(v) &&
    isTask(v.task) &&
    isInt(v.features) &&
    isInt(v.defaultCount) &&
    isArr(v.points, (q) => isObj(q) && isInt(q.featuresPerSplit) && (q.featuresPerSplit as number) >= 1 && isNum(q.oobError) && isNum(q.oobScore) && isNum(q.seconds)) &&
    (v.points as unknown[]).length > 0 &&
    isInt(v.best) &&
    (v.current === null || isInt(v.current))
  );
}

export function isHostToPanel(v: unknown): v is HostToPanel {
  if (!isObj(v)) return false;
  switch (v.type) {
    case 'summary':
      return isFitSummary(v.summary);
    case 'regionMap':
      return isRegionMap(v.map);
    case 'mapMatrix':
      return isArr(v.maps, isRegionMap);
    case 'disagreement':
      return isArr(v.rows, isRowVotes);
    case 'suspects':
      return isArr(v.rows, isSuspect);
    case 'highlight':
      return isArr(v.rows, isRow);
    case 'status':
      return (v.state === 'idle' || v.state === 'working' || v.state === 'error') && isStr(v.text) && isNumOrNull(v.progress);
    case 'contributions':
      if (!isStr(v.text) || !(v.row === null || isRow(v.row))) return false;
      if (v.state === 'ready') return isRowContributions(v.contributions) && v.contributions.row === v.row;
      return (v.state === 'working' || v.state === 'unavailable') && v.contributions === null;
    case 'globalContributions':
      return isStr(v.text) && (v.global === null || isGlobalContributions(v.global));
    case 'dependence':
      return isDependence(v.dependence);
    case 'sweep':
      return (
        (v.state === 'running' || v.state === 'done' || v.state === 'cancelled' || v.state === 'error') &&
        isStr(v.text) &&
        isNumOrNull(v.progress) &&
        (v.state === 'done' ? isSweepSummary(v.result) : v.result === null || isSweepSummary(v.result))
      );
    default:
      return false;
  }
}

export function isPanelToHost(v: unknown): v is PanelToHost {
  if (!isObj(v)) return false;
  switch (v.type) {
    case 'ready':
      return isInt(v.version) && (v.choice === undefined || v.choice === null || isMapChoice(v.choice));
    case 'chooseMap':
      return isStr(v.x) && isStr(v.y) && isReferenceChoice(v.reference);
    case 'openMap':
      return isStr(v.x) && isStr(v.y);
    case 'revealRow':
      return isRow(v.row);
    case 'refit':
      return isStrArr(v.leaveOut) && (v.trees === null || (isInt(v.trees) && v.trees >= 1));
    case 'explainRow':
      return isRow(v.row);
    case 'chooseDependence':
      return isStr(v.feature) && (v.output === null || (isInt(v.output) && (v.output as number) >= 0));
    case 'runSweep':
    case 'cancelSweep':
      return true;
    case 'sweepRefit':
      return isInt(v.featuresPerSplit) && (v.featuresPerSplit as number) >= 1;
    default:
      return false;
  }
}

export function isPanelState(v: unknown): v is PanelState {
  if (!isObj(v) || !isInt(v.version)) return false;
  const ch = v.choice;
  return (
    (v.summary === null || isFitSummary(v.summary)) &&
    (v.map === null || isRegionMap(v.map)) &&
    isArr(v.matrix, isRegionMap) &&
    isArr(v.suspects, isSuspect) &&
    (ch === null || isMapChoice(ch))
  );
}

function isMapChoice(ch: unknown): ch is { x: string; y: string; reference: ReferenceChoice } {
  return isObj(ch) && isStr(ch.x) && isStr(ch.y) && isReferenceChoice(ch.reference);
}
