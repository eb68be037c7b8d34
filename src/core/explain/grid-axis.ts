// The axes and cells of a decision-region map, and where each cell is evaluated. Core scores the grid with
// these; the panel draws it with the same functions (the protocol re-exports this file, which imports nothing),
// so a cell is drawn exactly where it was scored.

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

/** The value at the centre of cell i along an axis with n cells (a level code for level axes). */
export function cellCentre(axis: MapAxis, n: number, i: number): number {
  if (axis.kind !== 'numeric') return i;
  return axis.min + ((i + 0.5) * (axis.max - axis.min)) / n;
}

/** The drawn span of an axis: level axes put level k at k, cells one unit wide. */
export function axisSpan(axis: MapAxis): { min: number; max: number } {
  return axis.kind === 'numeric' ? { min: axis.min, max: axis.max } : { min: -0.5, max: axis.levels.length - 0.5 };
}
