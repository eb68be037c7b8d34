// The walk behind partial dependence (dependence.ts): one row goes through a tree once with one or two
// features replaced by a grid of points, and the points split only at nodes that test those features, which
// gives exactly the outputs of scoring the row at every grid point, without a walk per point.
import { outputCount } from '../base/schema';
import type { Forest } from '../forest/forest';
import { levelCounts } from '../forest/predict';
import type { FlatTree } from '../tree/tree';
import { goesLeft } from './routing';

/**
 * One axis of a grid walk. A numeric axis keeps its points sorted, so the points on one side of a threshold
 * are always a run of neighbours; a level axis keeps a list that each level-set split partitions in place.
 */
export class Axis {
  readonly n: number;
  /** Numeric: the points in increasing order. Levels: the points as given. */
  readonly values: Float64Array;
  /** Numeric: sorted position -> the point's index in the caller's grid. Levels: a working permutation. */
  readonly order: Int32Array;
  readonly numeric: boolean;

  constructor(readonly feature: number, numeric: boolean, grid: ArrayLike<number>) {
    this.n = grid.length;
    this.numeric = numeric;
    const index = Int32Array.from({ length: this.n }, (_, i) => i);
    if (numeric) {
      for (let i = 0; i < this.n; i++) if (!Number.isFinite(grid[i])) throw new RangeError(`a numeric grid needs finite values; got ${grid[i]}`);
      index.sort((a, b) => grid[a] - grid[b] || a - b);
      this.values = Float64Array.from(index, (i) => grid[i]);
    } else {
      this.values = Float64Array.from(grid);
    }
    this.order = index;
  }
}

/**
 * Walks one row through a tree with one or two features replaced by a grid of points; the other features keep
 * the row's values. At a split on a replaced feature the points divide between the children, elsewhere they
 * all follow the row, so the points reaching any node are (x points) x (y points). Each leaf adds its value
 * to every cell of that product through a difference table (two entries per run of neighbours instead of one
 * per point); finishRow integrates the table once per row.
 */
export class GridWalker {
  private readonly levels: Int32Array;
  private readonly K: number;
  /** Difference table: along x when x is numeric, else along y when y is numeric, else the cells themselves. */
  private readonly table: Float64Array;
  private readonly stride: number;
  private tree!: FlatTree;
  private x: ArrayLike<number> = new Float64Array(0);
  private offset = 0;

  constructor(forest: Forest, private readonly ax: Axis, private readonly ay: Axis) {
    this.levels = levelCounts(forest.schema);
    this.K = outputCount(forest.schema.target);
    // Rows of the table run along the difference axis: (n + 1) entries each so a run can end past the last point.
    this.stride = ax.numeric ? ax.n + 1 : ay.numeric ? ay.n + 1 : ax.n;
    const lines = ax.numeric ? ay.n : ay.numeric ? ax.n : ay.n;
    this.table = new Float64Array(lines * this.stride * this.K);
  }

  /** Adds the tree's output at every grid point for the row at x[offset..] to the difference table. */
  walk(tree: FlatTree, x: ArrayLike<number>, offset: number): void {
    this.tree = tree;
    this.x = x;
    this.offset = offset;
    this.visit(0, 0, this.ax.n, 0, this.ay.n);
  }

  /** Adds the row's summed outputs to out[(slot + j * nx + i) * K + k] for every cell, and clears the table. */
  finishRow(out: Float64Array, slot: number): void {
    const { ax, ay, K, table, stride } = this;
    const nx = ax.n;
    // Table coordinates are sorted positions on a numeric axis and the caller's indices on a level axis.
    const xOf = (c: number) => (ax.numeric ? ax.order[c] : c);
    const yOf = (c: number) => (ay.numeric ? ay.order[c] : c);
    if (ax.numeric) {
      for (let yc = 0; yc < ay.n; yc++) {
        const base = slot + yOf(yc) * nx;
        for (let k = 0; k < K; k++) {
          let run = 0;
          for (let xc = 0; xc < nx; xc++) {
            run += table[(yc * stride + xc) * K + k];
            out[(base + xOf(xc)) * K + k] += run;
          }
        }
      }
    } else if (ay.numeric) {
      for (let xc = 0; xc < nx; xc++) {
        for (let k = 0; k < K; k++) {
          let run = 0;
          for (let yc = 0; yc < ay.n; yc++) {
            run += table[(xc * stride + yc) * K + k];
            out[(slot + yOf(yc) * nx + xc) * K + k] += run;
          }
        }
      }
    } else {
      for (let yc = 0; yc < ay.n; yc++) for (let xc = 0; xc < nx; xc++) for (let k = 0; k < K; k++) out[(slot + yc * nx + xc) * K + k] += table[(yc * stride + xc) * K + k];
    }
    table.fill(0);
  }

  /**
   * Walks the tree for the cells [xa, xb) x [ya, yb). Where a split on an axis divides the cells, the left part
   * is walked first and the right part waits on an explicit stack (five numbers a part), so depth never reaches
   * the call stack and the order is the recursion's.
   */
  private visit(root: number, xa0: number, xb0: number, ya0: number, yb0: number): void {
    const tree = this.tree;
    const waiting = this.waiting;
    waiting.length = 0;
    waiting.push(root, xa0, xb0, ya0, yb0);
    while (waiting.length > 0) {
      const yb = waiting.pop()!;
      const ya = waiting.pop()!;
      const xb = waiting.pop()!;
      const xa = waiting.pop()!;
      let node = waiting.pop()!;
      let yTop = yb;
      let xTop = xb;
      for (;;) {
        const left = tree.left[node];
        if (left < 0) {
          this.leaf(node, xa, xTop, ya, yTop);
          break;
        }
        const f = tree.feature[node];
        const right = tree.right[node];
        if (f === this.ax.feature || f === this.ay.feature) {
          const onX = f === this.ax.feature;
          const axis = onX ? this.ax : this.ay;
          const a = onX ? xa : ya;
          const b = onX ? xTop : yTop;
          const mid = this.split(axis, node, a, b);
          if (mid > a && mid < b) {
            if (onX) {
              waiting.push(right, mid, xTop, ya, yTop);
              xTop = mid;
            } else {
              waiting.push(right, xa, xTop, mid, yTop);
              yTop = mid;
            }
            node = left;
          } else node = mid > a ? left : right;
          continue;
        }
        node = goesLeft(tree, node, this.levels[f], this.x[this.offset + f]) ? left : right;
      }
    }
  }

  private readonly waiting: number[] = [];

  /** Puts the axis' points in [a, b) that go left first; returns where the right side starts. */
  private split(axis: Axis, node: number, a: number, b: number): number {
    const tree = this.tree;
    const values = axis.values;
    if (axis.numeric) {
      // Sorted finite points: the left side is those at or below the threshold, a leading run.
      const t = tree.threshold[node];
      let lo = a;
      let hi = b;
      while (lo < hi) {
        const m = (lo + hi) >>> 1;
        if (values[m] <= t) lo = m + 1;
        else hi = m;
      }
      return lo;
    }
    const order = axis.order;
    const levels = this.levels[axis.feature];
    let i = a;
    let j = b - 1;
    while (i <= j) {
      if (goesLeft(tree, node, levels, values[order[i]])) i++;
      else {
        const t = order[i];
        order[i] = order[j];
        order[j] = t;
        j--;
      }
    }
    return i;
  }

  private leaf(node: number, xa: number, xb: number, ya: number, yb: number): void {
    const { K, table, stride, ax, ay } = this;
    const value = this.tree.value;
    const v0 = node * K;
    if (ax.numeric) {
      for (let m = ya; m < yb; m++) {
        const row = (ay.numeric ? m : ay.order[m]) * stride;
        for (let k = 0; k < K; k++) {
          table[(row + xa) * K + k] += value[v0 + k];
          table[(row + xb) * K + k] -= value[v0 + k];
        }
      }
    } else if (ay.numeric) {
      for (let m = xa; m < xb; m++) {
        const row = ax.order[m] * stride;
        for (let k = 0; k < K; k++) {
          table[(row + ya) * K + k] += value[v0 + k];
          table[(row + yb) * K + k] -= value[v0 + k];
        }
      }
    } else {
      for (let m = ya; m < yb; m++) {
        const row = ay.order[m] * stride;
        for (let q = xa; q < xb; q++) {
          const at = (row + ax.order[q]) * K;
          for (let k = 0; k < K; k++) table[at + k] += value[v0 + k];
        }
      }
    }
  }
}
