// How the forest's output moves with one or two features while the others keep each row's own values:
// partial dependence (Friedman 2001, "Greedy function approximation: a gradient boosting machine", Annals of
// Statistics 29(5); section 8.2 from memory) as the mean of individual conditional expectation curves (Goldstein,
// Kapelner, Bleich & Pitkin 2015, "Peeking inside the black box", J. Computational and Graphical
// Statistics 24(1)). The values are exactly those of scoring every row with the feature set to every grid
// value; instead of walking each (row, grid value) pair, a row walks each tree once and splits its set of
// grid points only at nodes that test the varying feature (grid-walk.ts). (Volumes and pages cited from memory.)
import { outputCount } from '../base/schema';
import type { ColumnKind } from '../data/table';
import { applyLink } from '../forest/boosting';
import type { Forest } from '../forest/forest';
import { stream } from '../forest/rng';
import { Axis, GridWalker } from './grid-walk';

export const DEFAULT_GRID_POINTS = 20;
export const DEFAULT_SAMPLE_ROWS = 200;

export interface GridOptions {
  /** Numeric features: how many points (default 20); repeated values collapse, so there may be fewer. */
  readonly gridSize?: number;
  /** 'quantile' (default): points at evenly spaced quantiles of the values; 'even': evenly spaced from min to max. */
  readonly spacing?: 'quantile' | 'even';
}

export interface FeatureGrid {
  readonly feature: number;
  readonly name: string;
  readonly kind: ColumnKind;
  /** Encoded values: numbers in increasing order, or level codes 0..L-1. */
  readonly values: Float64Array;
  /** Level names of a categorical grid, in code order. */
  readonly labels?: readonly string[];
}

export interface Distribution {
  /**
   * Rows whose value falls in each grid point's cell. Numeric: the cell of point g runs from the midpoint
   * with the previous point to the midpoint with the next (the outer cells are open), so every present value
   * counts once and count / width reads as density. Categorical: rows with that level.
   */
  readonly counts: Int32Array;
  /** Numeric: the G - 1 cell boundaries (midpoints between neighbouring grid points). */
  readonly boundaries: Float64Array;
  /** Rows with the feature missing (or, for a level column, a level the model never saw). */
  readonly missing: number;
}

export interface DependenceOptions extends GridOptions {
  /** Explicit grid (encoded values; numeric ones are sorted); replaces gridSize and spacing. */
  readonly grid?: ArrayLike<number>;
  /** Rows whose curves are computed and averaged (default 200); all rows when there are fewer. */
  readonly sampleRows?: number;
  /** Seed of the row sample (default: the forest's seed). */
  readonly seed?: number;
}

export interface PartialDependence {
  readonly grid: FeatureGrid;
  readonly outputs: number;
  /** grid * outputs: the partial dependence, average[g * outputs + k] = mean over iceRows of ice. */
  readonly average: Float64Array;
  /** iceRows * grid * outputs: ice[(s * G + g) * outputs + k], the forest's output k for row s at grid value g. */
  readonly ice: Float64Array;
  /** Which rows of x the curves belong to, increasing. */
  readonly iceRows: Int32Array;
  /** Over all rows of x, not only the sample. */
  readonly distribution: Distribution;
}

function checkFeature(forest: Forest, feature: number): void {
  const p = forest.schema.features.length;
  if (!Number.isInteger(feature) || feature < 0 || feature >= p) throw new RangeError(`feature index ${feature} is outside 0..${p - 1}`);
}

/** The grid a feature is shown on: its levels, or points spread over its values in x. */
export function featureGrid(forest: Forest, x: ArrayLike<number>, rows: number, feature: number, options: GridOptions = {}): FeatureGrid {
  checkFeature(forest, feature);
  const info = forest.schema.features[feature];
  if (info.kind !== 'numeric') {
    const labels = info.levels ?? [];
    return { feature, name: info.name, kind: info.kind, values: Float64Array.from(labels, (_, i) => i), labels };
  }
  const size = options.gridSize ?? DEFAULT_GRID_POINTS;
  if (!Number.isInteger(size) || size < 2) throw new RangeError(`a grid needs a whole number of at least 2 points; got ${size}`);
  const p = forest.schema.features.length;
  const present: number[] = [];
  for (let i = 0; i < rows; i++) {
    const v = x[i * p + feature];
    if (!Number.isNaN(v)) present.push(v);
  }
  if (present.length === 0) throw new RangeError(`"${info.name}" has no values in these rows to lay a grid over.`);
  const sorted = Float64Array.from(present).sort();
  const points: number[] = [];
  const n = sorted.length;
  for (let g = 0; g < size; g++) {
    // Quantiles are taken at observed values (nearest rank): the forest only changes at its thresholds,
    // which sit between observed values, so an interpolated point would add nothing.
    const v = options.spacing === 'even' ? sorted[0] + ((sorted[n - 1] - sorted[0]) * g) / (size - 1) : sorted[Math.round((g * (n - 1)) / (size - 1))];
    if (points.length === 0 || v > points[points.length - 1]) points.push(v);
  }
  return { feature, name: info.name, kind: info.kind, values: Float64Array.from(points) };
}

/** Where the rows' values of the grid's feature lie, cell by cell. */
export function gridDistribution(forest: Forest, x: ArrayLike<number>, rows: number, grid: FeatureGrid): Distribution {
  const p = forest.schema.features.length;
  const G = grid.values.length;
  const counts = new Int32Array(G);
  let missing = 0;
  if (grid.kind !== 'numeric') {
    for (let i = 0; i < rows; i++) {
      const v = x[i * p + grid.feature];
      if (Number.isInteger(v) && v >= 0 && v < G) counts[v]++;
      else missing++;
    }
    return { counts, boundaries: new Float64Array(0), missing };
  }
  const boundaries = new Float64Array(Math.max(0, G - 1));
  for (let g = 0; g + 1 < G; g++) boundaries[g] = grid.values[g] + (grid.values[g + 1] - grid.values[g]) / 2;
  for (let i = 0; i < rows; i++) {
    const v = x[i * p + grid.feature];
    if (Number.isNaN(v)) {
      missing++;
      continue;
    }
    // First boundary at or above v; a value on a boundary counts in the lower cell.
    let lo = 0;
    let hi = boundaries.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (v <= boundaries[mid]) hi = mid;
      else lo = mid + 1;
    }
    counts[lo]++;
  }
  return { counts, boundaries, missing };
}

/** Up to `wanted` of `rows` row indices, drawn without replacement from a named stream, in increasing order. */
export function sampleRowIndices(rows: number, wanted: number, seed: number): Int32Array {
  const all = Int32Array.from({ length: rows }, (_, i) => i);
  if (wanted >= rows) return all;
  const random = stream(seed, 'dependence');
  for (let i = 0; i < wanted; i++) {
    const j = i + Math.floor(random() * (rows - i));
    const t = all[i];
    all[i] = all[j];
    all[j] = t;
  }
  return all.slice(0, wanted).sort();
}

/** Partial dependence on one feature, with the individual curves it averages and the feature's spread. */
export function partialDependence(forest: Forest, x: ArrayLike<number>, rows: number, feature: number, options: DependenceOptions = {}): PartialDependence {
  checkFeature(forest, feature);
  const info = forest.schema.features[feature];
  const grid: FeatureGrid = options.grid
    ? // A numeric grid is put in increasing order, so its distribution cells are well defined.
      { feature, name: info.name, kind: info.kind, values: info.kind === 'numeric' ? Float64Array.from(options.grid).sort() : Float64Array.from(options.grid), labels: info.kind === 'numeric' ? undefined : info.levels }
    : featureGrid(forest, x, rows, feature, options);
  const G = grid.values.length;
  if (G === 0) throw new RangeError(`"${info.name}" has an empty grid.`);
  const K = outputCount(forest.schema.target);
  const p = forest.schema.features.length;
  const iceRows = sampleRowIndices(rows, options.sampleRows ?? DEFAULT_SAMPLE_ROWS, options.seed ?? forest.params.seed);
  const m = iceRows.length;
  const ice = new Float64Array(m * G * K);
  const walker = new GridWalker(forest, new Axis(feature, info.kind === 'numeric', grid.values), new Axis(-1, false, [0]));
  for (let s = 0; s < m; s++) {
    for (const tree of forest.trees) walker.walk(tree, x, iceRows[s] * p);
    walker.finishRow(ice, s * G);
  }
  const T = forest.trees.length;
  for (let i = 0; i < ice.length; i++) ice[i] /= T;
  // A boosted classifier's mean is a raw score: each curve point becomes probabilities before curves are averaged.
  const link = forest.boosting?.link;
  if (link) for (let i = 0; i < m * G; i++) applyLink(link, ice, i * K, K);
  const average = new Float64Array(G * K);
  for (let s = 0; s < m; s++) for (let i = 0; i < G * K; i++) average[i] += ice[s * G * K + i];
  if (m > 0) for (let i = 0; i < G * K; i++) average[i] /= m;
  return { grid, outputs: K, average, ice, iceRows, distribution: gridDistribution(forest, x, rows, grid) };
}

export interface PartialDependence2D {
  readonly xFeature: number;
  readonly yFeature: number;
  readonly xGrid: Float64Array;
  readonly yGrid: Float64Array;
  readonly outputs: number;
  /** ny * nx * outputs: cell (i, j), i along x, at values[(j * nx + i) * outputs + k]. */
  readonly values: Float64Array;
  /** Rows of x averaged over, increasing. */
  readonly rows: Int32Array;
}

export interface Dependence2DOptions {
  /** Encoded values along each axis (e.g. cell centres of a map, or level codes). */
  readonly xGrid: ArrayLike<number>;
  readonly yGrid: ArrayLike<number>;
  /** Rows averaged over (default 200); all rows when there are fewer. */
  readonly sampleRows?: number;
  readonly seed?: number;
}

/** Two-feature partial dependence on an nx * ny grid: the mean output over rows with both features set. */
export function partialDependence2D(forest: Forest, x: ArrayLike<number>, rows: number, xFeature: number, yFeature: number, options: Dependence2DOptions): PartialDependence2D {
  checkFeature(forest, xFeature);
  checkFeature(forest, yFeature);
  if (xFeature === yFeature) throw new RangeError('two-feature partial dependence needs two different features');
  const xGrid = Float64Array.from(options.xGrid);
  const yGrid = Float64Array.from(options.yGrid);
  const nx = xGrid.length;
  const ny = yGrid.length;
  if (nx === 0 || ny === 0) throw new RangeError('both axes need at least one grid value');
  const cells = nx * ny;
  const K = outputCount(forest.schema.target);
  const p = forest.schema.features.length;
  const used = sampleRowIndices(rows, options.sampleRows ?? DEFAULT_SAMPLE_ROWS, options.seed ?? forest.params.seed);
  const values = new Float64Array(cells * K);
  const kinds = forest.schema.features;
  const walker = new GridWalker(forest, new Axis(xFeature, kinds[xFeature].kind === 'numeric', xGrid), new Axis(yFeature, kinds[yFeature].kind === 'numeric', yGrid));
  const link = forest.boosting?.link;
  const T = forest.trees.length;
  const row = link && link !== 'identity' ? new Float64Array(cells * K) : undefined;
  for (const r of used) {
    for (const tree of forest.trees) walker.walk(tree, x, r * p);
    if (!row) {
      walker.finishRow(values, 0);
      continue;
    }
    // Probabilities are averaged over rows, so each row's raw scores go through the link first.
    row.fill(0);
    walker.finishRow(row, 0);
    for (let i = 0; i < row.length; i++) row[i] /= T;
    for (let c = 0; c < cells; c++) applyLink(link!, row, c * K, K);
    for (let i = 0; i < row.length; i++) values[i] += row[i];
  }
  const scale = (row ? 1 : T) * used.length;
  if (scale > 0) for (let i = 0; i < values.length; i++) values[i] /= scale;
  return { xFeature, yFeature, xGrid, yGrid, outputs: K, values, rows: used };
}
