// Decision-region maps: the grid of cells the host scored and the training points drawn over it.
// A region grid covers its axis ranges exactly; cell (i, j) is cells[j * nx + i], i runs along x, j = 0 is
// the lowest y (drawn at the bottom). See cellCentre for where each cell is evaluated.

import type { MapAxis, RegionCells } from '../core/explain/grid-axis';
import type { RegionText } from '../core/explain/region-text';

export type { RegionText } from '../core/explain/region-text';

export { axisSpan, cellCentre, type LevelAxis, type MapAxis, type NumericAxis, type RegionCells } from '../core/explain/grid-axis';

/** How the features not on the axes were set when scoring the grid. */
export type ReferenceChoice =
  | { mode: 'typical' } // medians for numeric features, most frequent level otherwise
  | { mode: 'row'; row: number }
  | { mode: 'averaged' }; // averaged over a sample of rows: 2-D partial dependence

export type ReferenceUsed =
  | { mode: 'typical' }
  | { mode: 'row'; row: number }
  | { mode: 'averaged'; sampleRows: number };

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
  /** The map in words and a coarse table, for screen readers (core's describeRegions); absent from older saved panels. */
  text?: RegionText;
}
