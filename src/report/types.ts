// The plain data one report is drawn from. gather.ts fills it by calling core (the summary, the region grids,
// partial dependence, contributions); html.ts only lays it out. Nothing here is computed by the report itself.
import type { MapAxis, RegionCells } from '../core/explain/grid-axis';
import type { FitSummary } from '../core/summary/types';

export interface ReportMap {
  readonly x: MapAxis;
  readonly y: MapAxis;
  readonly nx: number;
  readonly ny: number;
  readonly cells: RegionCells;
  /** The other features' values while these two vary (the typical row: medians and most frequent levels). */
  readonly heldAt: ReadonlyArray<{ readonly feature: string; readonly value: string }>;
  /** A seeded sample of training rows drawn over the map; null on the small maps. */
  readonly points: { readonly x: number[]; readonly y: number[]; readonly target: number[]; readonly total: number } | null;
}

export interface ReportDependence {
  readonly feature: string;
  readonly kind: 'numeric' | 'categorical' | 'boolean';
  /** Grid values (numbers) or level names. */
  readonly at: ReadonlyArray<number | string>;
  /** One line per output: the mean probability of each class, or the mean prediction. */
  readonly lines: ReadonlyArray<{ readonly name: string; readonly colour: number; readonly values: number[] }>;
  /** Rows averaged over. */
  readonly rows: number;
}

export interface ReportContributions {
  /** Mean |contribution| per feature, in summary.features order. */
  readonly byFeature: Record<string, number>;
  readonly rows: number;
}

export interface ReportData {
  readonly summary: FitSummary;
  /** The data file as the user named it, and its size in bytes when known. */
  readonly file: { readonly name: string; readonly bytes: number | null };
  /** A saved or imported model the report is about, when it was opened rather than fitted. */
  readonly model?: { readonly file: string; readonly kind: 'copse' | 'onnx' | 'xgboost' };
  readonly version: string;
  /** The one line allowed to differ between two reports of the same fit. */
  readonly date: string;
  /** The chosen map first, then the leading pairs. */
  readonly chosen: ReportMap | null;
  readonly pairs: readonly ReportMap[];
  readonly mapNote?: string;
  readonly dependence: readonly ReportDependence[];
  readonly contributions: ReportContributions | null;
  readonly contributionsMissing?: string;
}
