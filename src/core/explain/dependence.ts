// How the forest's output moves with one or two features while the others keep each row's own values:
// partial dependence (Friedman 2001, "Greedy function approximation: a gradient boosting machine", Annals of
// Statistics 29(5), section 8.2) as the mean of individual conditional expectation curves (Goldstein,
// Kapelner, Bleich & Pitkin 2015, "Peeking inside the black box", J. Computational and Graphical
// Statistics 24(1)). The values are exactly those of scoring every row with the feature set to every grid
// value; instead of walking each (row, grid value) pair, a row walks each tree once and splits its set of
// grid points only at nodes that test the varying feature.
import type { ColumnKind } from '../data/table';
import type { Forest } from '../forest/forest';
import { levelCounts } from '../forest/predict';
import { stream } from '../forest/rng';
import { outputCount } from '../model/schema';
import type { FlatTree } from '../tree/tree';
import { goesLeft } from './routing';

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
  /** Explicit grid (encoded values); replaces gridSize and spacing. */
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

/**
 * Walks one row through a tree with up to two features replaced by a set of points: at a split on a
 * replaced feature the points divide between the children; elsewhere they all follow the row. Each leaf
 * adds its value to the accumulator slot of every point that reaches it.
 */
class PointWalker {
  private readonly order: Int32Array;
  private readonly levels: Int32Array;
  private readonly K: number;
  private tree!: FlatTree;
  private x: ArrayLike<number> = new Float64Array(0);
  private offset = 0;
  private acc: Float64Array = new Float64Array(0);
  private slot = 0;

  constructor(
    forest: Forest,
    private readonly featureA: number,
    private readonly valuesA: Float64Array,
    private readonly featureB: number,
    private readonly valuesB: Float64Array,
  ) {
    this.order = Int32Array.from({ length: valuesA.length }, (_, i) => i);
    this.levels = levelCounts(forest.schema);
    this.K = outputCount(forest.schema.target);
  }

  /** Adds tree's output at every point for the row at x[offset..] to acc[(slot + point) * K + k]. */
  walk(tree: FlatTree, x: ArrayLike<number>, offset: number, acc: Float64Array, slot: number): void {
    this.tree = tree;
    this.x = x;
    this.offset = offset;
    this.acc = acc;
    this.slot = slot;
    this.visit(0, 0, this.order.length);
  }

  private visit(node: number, lo: number, hi: number): void {
    const tree = this.tree;
    const order = this.order;
    for (;;) {
      const left = tree.left[node];
      if (left < 0) {
        const K = this.K;
        const acc = this.acc;
        const v0 = node * K;
        for (let m = lo; m < hi; m++) {
          const a = (this.slot + order[m]) * K;
          for (let k = 0; k < K; k++) acc[a + k] += tree.value[v0 + k];
        }
        return;
      }
      const f = tree.feature[node];
      const levels = this.levels[f];
      if (f !== this.featureA && f !== this.featureB) {
        node = goesLeft(tree, node, levels, this.x[this.offset + f]) ? left : tree.right[node];
        continue;
      }
      const values = f === this.featureA ? this.valuesA : this.valuesB;
      let i = lo;
      let j = hi - 1;
      while (i <= j) {
        if (goesLeft(tree, node, levels, values[order[i]])) i++;
        else {
          const t = order[i];
          order[i] = order[j];
          order[j] = t;
          j--;
        }
      }
      if (i > lo && i < hi) {
        this.visit(left, lo, i);
        node = tree.right[node];
        lo = i;
      } else node = i > lo ? left : tree.right[node];
    }
  }
}

/** Partial dependence on one feature, with the individual curves it averages and the feature's spread. */
export function partialDependence(forest: Forest, x: ArrayLike<number>, rows: number, feature: number, options: DependenceOptions = {}): PartialDependence {
  checkFeature(forest, feature);
  const info = forest.schema.features[feature];
  const grid: FeatureGrid = options.grid
    ? { feature, name: info.name, kind: info.kind, values: Float64Array.from(options.grid), labels: info.kind === 'numeric' ? undefined : info.levels }
    : featureGrid(forest, x, rows, feature, options);
  const G = grid.values.length;
  if (G === 0) throw new RangeError(`"${info.name}" has an empty grid.`);
  const K = outputCount(forest.schema.target);
  const p = forest.schema.features.length;
  const iceRows = sampleRowIndices(rows, options.sampleRows ?? DEFAULT_SAMPLE_ROWS, options.seed ?? forest.params.seed);
  const m = iceRows.length;
  const ice = new Float64Array(m * G * K);
  const walker = new PointWalker(forest, feature, grid.values, -1, grid.values);
  for (let s = 0; s < m; s++) for (const tree of forest.trees) walker.walk(tree, x, iceRows[s] * p, ice, s * G);
  const T = forest.trees.length;
  for (let i = 0; i < ice.length; i++) ice[i] /= T;
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
  const a = new Float64Array(cells);
  const b = new Float64Array(cells);
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    a[j * nx + i] = xGrid[i];
    b[j * nx + i] = yGrid[j];
  }
  const K = outputCount(forest.schema.target);
  const p = forest.schema.features.length;
  const used = sampleRowIndices(rows, options.sampleRows ?? DEFAULT_SAMPLE_ROWS, options.seed ?? forest.params.seed);
  const values = new Float64Array(cells * K);
  const walker = new PointWalker(forest, xFeature, a, yFeature, b);
  for (const r of used) for (const tree of forest.trees) walker.walk(tree, x, r * p, values, 0);
  const scale = forest.trees.length * used.length;
  if (scale > 0) for (let i = 0; i < values.length; i++) values[i] /= scale;
  return { xFeature, yFeature, xGrid, yGrid, outputs: K, values, rows: used };
}
