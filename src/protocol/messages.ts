// The one module the extension host and the panel webview share. postMessage JSON-serialises, so
// everything here is plain data: number[] instead of typed arrays, null instead of NaN (JSON turns
// NaN into null anyway; saying so in the types keeps both ends honest). Each end runs the guard on
// what it receives, because a webview can be restored from stale state or talk to an older host.
//
// Conventions used throughout:
// - "row" is the 1-based data row of the CSV (row 1 = first record after the header), the number a
//   person sees in the panel; the host turns it into an editor line.
// - Class values are codes into FitSummary.classes; -1 means "no class" (e.g. a grid cell no tree voted on).
// - Every message from the host names the fit it belongs to, so a slow answer about an earlier forest can
//   never be drawn into a newer one's panel.

export const PROTOCOL_VERSION = 2;

/** Suggested caps so the panel holds a compact summary, never the dataset. */
export const LIMITS = {
  points: 2000,
  selectedRows: 20,
  suspects: 50,
  smallMaps: 10,
  gridCells: 200 * 200,
} as const;

import type { Dependence, GlobalContributions, RowContributions, SweepSummary } from './explain';
import type { ReferenceChoice, RegionMap } from './map';
import type { RowsTablePage, RowsTableQuery, RowsTableRequest, RowVotes, SuspectRow } from './rows';
import type { FitSummary } from './summary';

export * from './summary';
export * from './map';
export * from './rows';
export * from './explain';
export * from './guards';

/** What the host tells the panel. `fit` names the fit each message is about (see FitSummary.fit). */
export type HostToPanel = HostMessage & { fit: string | null };

/** A host message before it is stamped with its fit. */
export type HostMessage =
  /** Starts a new fit: the panel drops maps, votes and suspects drawn for the previous forest, so send it first. */
  | { type: 'summary'; summary: FitSummary }
  | { type: 'regionMap'; map: RegionMap }
  /** Small maps for pairs among the most important features (points optional, usually omitted). */
  | { type: 'mapMatrix'; maps: RegionMap[] }
  /** selected: how many rows are selected in all; rows holds at most LIMITS.selectedRows of them. */
  | { type: 'disagreement'; rows: RowVotes[]; selected: number }
  | { type: 'suspects'; rows: SuspectRow[] }
  | { type: 'highlight'; rows: number[] }
  | { type: 'status'; state: 'idle' | 'working' | 'error'; text: string; progress: number | null }
  /** The selected (or asked-for) row's contributions; `text` says why there are none yet. */
  | { type: 'contributions'; row: number | null; state: 'working' | 'ready' | 'unavailable'; contributions: RowContributions | null; text: string }
  | { type: 'globalContributions'; global: GlobalContributions | null; text: string }
  | { type: 'dependence'; dependence: Dependence }
  | { type: 'sweep'; state: 'running' | 'done' | 'cancelled' | 'error'; progress: number | null; text: string; result: SweepSummary | null }
  /** One page of the rows table, for the query it answers (the panel drops pages of a query it has left). */
  | { type: 'rowsPage'; query: RowsTableQuery; page: RowsTablePage }
  /** The votes of the row the reader points at in the rows table; null when the row is unknown. */
  | { type: 'rowPeek'; row: number; votes: RowVotes | null };

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
  | { type: 'sweepRefit'; featuresPerSplit: number }
  /** The panel's button for "Save a Report of This Fit…". */
  | { type: 'saveReport' }
  | { type: 'rowsPage'; request: RowsTableRequest }
  /** The rows table's pointer or focus rests on a row: its votes, without changing the selection. */
  | { type: 'peekRow'; row: number }
  /** Rows selected in the rows table (at most LIMITS.selectedRows) and how many in all, for the disagreement view. */
  | { type: 'selectRows'; rows: number[]; selected: number };

/** What the panel keeps in getState/setState; the host's serializer may read `dataset` from it. */
export interface PanelState {
  version: number;
  /** The fit the saved summary and maps belong to. */
  fit: string | null;
  summary: FitSummary | null;
  map: RegionMap | null;
  matrix: RegionMap[];
  suspects: SuspectRow[];
  choice: { x: string; y: string; reference: ReferenceChoice } | null;
}
