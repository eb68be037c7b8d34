// Runtime guards. Hand-written so the protocol stays dependency-free; each answers "can the receiving end
// use this without crashing", not "is it sensible". Each end runs them on what it receives, because a webview
// can be restored from stale state or talk to an older host.

import type { Dependence, GlobalContributions, RowContributions, SweepSummary } from './explain';
import type { MapAxis, PointSample, ReferenceChoice, ReferenceUsed, RegionMap } from './map';
import type { HostToPanel, PanelState, PanelToHost } from './messages';
import { ROWS_PAGE_MAX, type PredictionInterval, type RowsTablePage, type RowsTableQuery, type RowsTableRequest, type RowsTableRow, type RowVotes, type SuspectRow } from './rows';
import type { FitSummary } from './summary';

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v);
const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isNumOrNull = (v: unknown): boolean => v === null || isNum(v);
const isInt = (v: unknown): v is number => Number.isInteger(v);
const isStr = (v: unknown): v is string => typeof v === 'string';
const isArr = (v: unknown, each: (x: unknown) => boolean): v is unknown[] => Array.isArray(v) && v.every(each);
const isNumArr = (v: unknown): v is number[] => isArr(v, isNum);
const isStrArr = (v: unknown): v is string[] => isArr(v, isStr);
const isRow = (v: unknown): v is number => isInt(v) && (v) >= 1;
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
      isArr(v.confusion, isNumArr) &&
      (v.evaluation === undefined || (isObj(v.evaluation) && Array.isArray(v.evaluation.curves)))
    );
  }
  if (v.kind === 'regression') {
    const r = v.residuals;
    return (
      isNum(v.r2) &&
      isNum(v.mae) &&
      isNum(v.rmse) &&
      (r === null || (isObj(r) && isNum(r.min) && isNum(r.q1) && isNum(r.median) && isNum(r.q3) && isNum(r.max))) &&
      (v.diagnostics === undefined || (isObj(v.diagnostics) && Array.isArray(v.diagnostics.pairs)))
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
    isStr(v.fit) &&
    (v.suspectCount === null || isInt(v.suspectCount)) &&
    (v.cv === undefined || (isObj(v.cv) && Array.isArray(v.cv.scores))) &&
    (v.permutationOn === undefined || v.permutationOn === 'out-of-bag' || v.permutationOn === 'file') &&
    (v.oobUnavailable === undefined || isStr(v.oobUnavailable)) &&
    (v.permutationNote === undefined || isStr(v.permutationNote))
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
    (v.points === null || isPoints(v.points)) &&
    (v.text === undefined || isRegionText(v.text))
  );
}

function isRegionText(v: unknown): boolean {
  if (!isObj(v) || !isStr(v.sentence) || !isObj(v.table)) return false;
  const t = v.table;
  return isStr(t.corner) && isArr(t.columns, isStr) && isArr(t.rows, (r) => isObj(r) && isStr(r.head) && isArr(r.cells, isStr));
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
    (v.lead === 'out-of-bag' || v.lead === 'all-trees') &&
    isNum(v.allPredicted) &&
    isNumOrNull(v.label) &&
    isNumArr(v.votes) &&
    isArr(v.outOfBag, isInt) &&
    (v.boosted === undefined || isBoostedTrees(v.boosted))
  );
}

function isBoostedTrees(v: unknown): boolean {
  return (
    isObj(v) &&
    isStr(v.scale) &&
    isArr(v.output, isInt) &&
    isNumArr(v.raw) &&
    isNumArr(v.cumulative) &&
    isNumArr(v.base) &&
    isNumArr(v.total) &&
    isNumOrNull(v.probability) &&
    isInt(v.shown)
  );
}

function isSuspect(v: unknown): v is SuspectRow {
  return isObj(v) && isRow(v.row) && isNum(v.score) && isNum(v.label) && isNum(v.oobPredicted);
}

const SORT_KEYS: readonly unknown[] = ['row', 'label', 'predicted', 'agreement', 'residual', 'margin'];

function isRowsQuery(v: unknown): v is RowsTableQuery {
  return (
    isObj(v) &&
    SORT_KEYS.includes(v.sort) &&
    typeof v.descending === 'boolean' &&
    typeof v.doubtfulOnly === 'boolean' &&
    (v.labelClass === null || (isInt(v.labelClass) && v.labelClass >= 0)) &&
    typeof v.mismatchOnly === 'boolean'
  );
}

function isRowsRequest(v: unknown): v is RowsTableRequest {
  return isObj(v) && isRowsQuery(v.query) && isInt(v.offset) && v.offset >= 0 && isInt(v.limit) && v.limit >= 0 && v.limit <= ROWS_PAGE_MAX;
}

function isRowsRow(v: unknown): v is RowsTableRow {
  return (
    isObj(v) &&
    isRow(v.row) &&
    (v.line === null || isRow(v.line)) &&
    isNumOrNull(v.label) &&
    isNumOrNull(v.predicted) &&
    isNumOrNull(v.agreement) &&
    isNumOrNull(v.residual) &&
    isNumOrNull(v.margin) &&
    typeof v.doubtful === 'boolean'
  );
}

function isRowsPage(v: unknown): v is RowsTablePage {
  if (!isObj(v) || !isInt(v.total) || !isInt(v.offset) || v.offset < 0 || !isArr(v.rows, isRowsRow)) return false;
  // A page never runs past the view it is cut from, nor past the cap, so the panel can place it blindly.
  return v.rows.length <= ROWS_PAGE_MAX && v.offset + v.rows.length <= v.total;
}

function isRowContributions(v: unknown): v is RowContributions {
  return (
    isObj(v) &&
    isRow(v.row) &&
    (v.output === null || (isInt(v.output) && (v.output) >= 0)) &&
    isNum(v.base) &&
    isNum(v.prediction) &&
    isInt(v.trees) &&
    typeof v.outOfBag === 'boolean' &&
    isArr(v.features, (f) => isObj(f) && isStr(f.feature) && isStr(f.value) && isNum(f.contribution)) &&
    (v.scale === undefined || isStr(v.scale)) &&
    (v.probability === undefined || isNum(v.probability))
  );
}

function isGlobalContributions(v: unknown): v is GlobalContributions {
  return (
    isObj(v) &&
    isInt(v.rows) &&
    isInt(v.planned) &&
    typeof v.done === 'boolean' &&
    isArr(v.features, (f) => isObj(f) && isStr(f.feature) && isNum(f.meanAbs) && (f.meanAbs) >= 0)
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
    (v.output === null || (isInt(v.output) && (v.output) >= 0)) &&
    isArr(v.ice, (c) => isNumArr(c) && c.length === G) &&
    isArr(v.iceRows, isRow) &&
    (v.iceRows as number[]).length === (v.ice).length &&
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
    isArr(v.points, (q) => isObj(q) && isInt(q.featuresPerSplit) && (q.featuresPerSplit) >= 1 && isNum(q.oobError) && isNum(q.oobScore) && isNum(q.seconds)) &&
    (v.points).length > 0 &&
    isInt(v.best) &&
    (v.current === null || isInt(v.current))
  );
}

export function isHostToPanel(v: unknown): v is HostToPanel {
  if (!isObj(v)) return false;
  // Every message names the fit it belongs to; only a status line may belong to none.
  if (!(isStr(v.fit) || (v.type === 'status' && v.fit === null))) return false;
  switch (v.type) {
    case 'summary':
      return isFitSummary(v.summary) && v.summary.fit === v.fit;
    case 'regionMap':
      return isRegionMap(v.map);
    case 'mapMatrix':
      return isArr(v.maps, isRegionMap);
    case 'disagreement':
      return isArr(v.rows, isRowVotes) && isInt(v.selected) && (v.selected) >= (v.rows).length;
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
    case 'rowsPage':
      return isRowsQuery(v.query) && isRowsPage(v.page);
    case 'rowPeek':
      return isRow(v.row) && (v.votes === null || (isRowVotes(v.votes) && v.votes.row === v.row));
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
      return isStr(v.feature) && (v.output === null || (isInt(v.output) && (v.output) >= 0));
    case 'runSweep':
    case 'cancelSweep':
    case 'saveReport':
      return true;
    case 'sweepRefit':
      return isInt(v.featuresPerSplit) && (v.featuresPerSplit) >= 1;
    case 'rowsPage':
      return isRowsRequest(v.request);
    case 'peekRow':
      return isRow(v.row);
    case 'selectRows':
      // The host keeps only the first LIMITS.selectedRows; `selected` says how many there were.
      return isArr(v.rows, isRow) && isInt(v.selected) && v.selected >= v.rows.length;
    default:
      return false;
  }
}

export function isPanelState(v: unknown): v is PanelState {
  if (!isObj(v) || !isInt(v.version)) return false;
  const ch = v.choice;
  return (
    (v.fit === null || isStr(v.fit)) &&
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
