// Per-feature contributions to one prediction: exact Shapley values of each tree's conditional expectation
// (path-dependent TreeSHAP, Lundberg, Erion, Chen et al. 2020; the per-tree algorithm is in shapley-path.ts),
// averaged over the forest's trees, or over a chosen set of them such as the trees that never drew a training
// row. Contributions plus the base value of the same trees add up to those trees' mean output for the row
// (local accuracy): for all trees the forest's prediction, for a row's out-of-bag trees its out-of-bag one.
import { outputCount } from '../base/schema';
import type { Forest } from '../forest/forest';
import { levelCounts } from '../forest/predict';
import { treeDepth } from '../tree/tree';
import { childShares, expectedOutput } from './routing';
import { ShapleyPath, type PreparedTree } from './shapley-path';

export interface Contributions {
  readonly rows: number;
  readonly features: number;
  /** Outputs per row: the number of classes, or 1 for regression. */
  readonly outputs: number;
  /** outputs: the forest's expected output with no feature known (mean over trees). */
  readonly base: Float64Array;
  /** rows * features * outputs: contributions[(i * features + j) * outputs + k]. */
  readonly contributions: Float64Array;
}

/**
 * Holds what every explanation of one forest reuses: cover shares per node, each tree's expected output and
 * the path scratch, sized once for the deepest tree. One explainer serves any number of rows, one at a time.
 */
export class ContributionExplainer {
  readonly features: number;
  readonly outputs: number;
  /** The trees' expected output with no feature known, averaged over all of them. */
  readonly base: Float64Array;
  readonly trees: number;
  private readonly prepared: PreparedTree[];
  /** trees * outputs: each tree's own expected output. */
  private readonly expected: Float64Array;
  private readonly path: ShapleyPath;

  constructor(forest: Forest) {
    this.features = forest.schema.features.length;
    this.outputs = outputCount(forest.schema.target);
    this.trees = forest.trees.length;
    const K = this.outputs;
    this.expected = new Float64Array(this.trees * K);
    let depth = 0;
    this.prepared = forest.trees.map((tree, t) => {
      const shares = childShares(tree);
      expectedOutput(tree, shares, K, this.expected.subarray(t * K, (t + 1) * K));
      depth = Math.max(depth, treeDepth(tree));
      return { tree, leftShare: shares.left, rightShare: shares.right };
    });
    this.path = new ShapleyPath(depth, K, levelCounts(forest.schema));
    this.base = this.baseOver();
  }

  /**
   * Mean expected output of the listed trees (indices into forest.trees; all when absent), written to out
   * (overwritten). A tree listed twice counts twice, as in explainRow.
   */
  baseOver(trees?: ArrayLike<number>, out: Float64Array = new Float64Array(this.outputs)): Float64Array {
    const K = this.outputs;
    const count = this.check(trees);
    out.fill(0);
    for (let i = 0; i < count; i++) {
      const t = trees ? trees[i] : i;
      for (let k = 0; k < K; k++) out[k] += this.expected[t * K + k];
    }
    for (let k = 0; k < K; k++) out[k] /= count;
    return out;
  }

  /**
   * Contributions for the encoded row at x[offset..offset+p), written to out[j * outputs + k] (overwritten):
   * the mean over the listed trees (all when absent) of each tree's own. Their sum over j plus
   * baseOver(trees)[k] is the listed trees' mean output k for the row.
   */
  explainRow(x: ArrayLike<number>, offset = 0, out: Float64Array = new Float64Array(this.features * this.outputs), trees?: ArrayLike<number>): Float64Array {
    const count = this.check(trees);
    out.fill(0);
    for (let i = 0; i < count; i++) this.path.add(this.prepared[trees ? trees[i] : i], x, offset, out);
    for (let i = 0; i < out.length; i++) out[i] /= count;
    return out;
  }

  /** Contributions for `rows` encoded rows, row-major in x (p floats a row), over all trees. */
  explainRows(x: ArrayLike<number>, rows: number): Contributions {
    const p = this.features;
    const K = this.outputs;
    const contributions = new Float64Array(rows * p * K);
    for (let i = 0; i < rows; i++) this.explainRow(x, i * p, contributions.subarray(i * p * K, (i + 1) * p * K));
    return { rows, features: p, outputs: K, base: this.base.slice(), contributions };
  }

  /** How many trees a list names; refuses an empty list (no mean) and indices that are not trees. */
  private check(trees: ArrayLike<number> | undefined): number {
    if (!trees) return this.trees;
    if (trees.length === 0) throw new RangeError('Contributions over a set of trees need at least one tree.');
    for (let i = 0; i < trees.length; i++) {
      const t = trees[i];
      if (!(Number.isInteger(t) && t >= 0 && t < this.trees)) throw new RangeError(`There is no tree ${t}; the forest has ${this.trees}.`);
    }
    return trees.length;
  }
}

/** Contributions of every feature for `rows` encoded rows (see ContributionExplainer). */
export function explainRows(forest: Forest, x: ArrayLike<number>, rows: number): Contributions {
  return new ContributionExplainer(forest).explainRows(x, rows);
}

export interface GlobalContributions {
  /** features * outputs: mean over rows of |contribution|. */
  readonly perOutput: Float64Array;
  /** features: perOutput summed over outputs (for regression, the same numbers). */
  readonly overall: Float64Array;
}

/** The global view: how much each feature moves predictions on average, whatever the direction. */
export function meanAbsoluteContributions(c: Contributions): GlobalContributions {
  const { rows, features: p, outputs: K, contributions } = c;
  const perOutput = new Float64Array(p * K);
  for (let i = 0; i < rows; i++) {
    const o = i * p * K;
    for (let j = 0; j < p * K; j++) perOutput[j] += Math.abs(contributions[o + j]);
  }
  if (rows > 0) for (let j = 0; j < p * K; j++) perOutput[j] /= rows;
  const overall = new Float64Array(p);
  for (let j = 0; j < p; j++) for (let k = 0; k < K; k++) overall[j] += perOutput[j * K + k];
  return { perOutput, overall };
}
