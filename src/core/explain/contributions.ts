// Per-feature contributions to one prediction: exact Shapley values of the tree's conditional expectation,
// computed by path-dependent TreeSHAP, Algorithm 2 of Lundberg, Erion, Chen et al. (2020), "From local
// explanations to global understanding with explainable AI for trees", Nature Machine Intelligence 2, 56-67.
//
// The conditional expectation E[f(x) | x_S] follows the row's branch at splits on features in S and averages
// the two children by in-bag cover elsewhere. The algorithm keeps, along the current root-to-node path, one
// entry per distinct feature split on (with the fraction of cover kept when the feature is unknown and
// whether the row goes that way when it is known) and the permutation weights of every subset size, so each
// leaf adds its share to every feature on its path in O(depth^2) instead of 2^p subset evaluations.
// Contributions plus the base value add up to the forest's prediction for the row (local accuracy).
// (Journal volumes and pages in these comments are cited from memory.)
import type { Forest } from '../forest/forest';
import { levelCounts } from '../forest/predict';
import { outputCount } from '../model/schema';
import { treeDepth, type FlatTree } from '../tree/tree';
import { childShares, expectedOutput, goesLeft } from './routing';

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

interface PreparedTree {
  readonly tree: FlatTree;
  readonly leftShare: Float64Array;
  readonly rightShare: Float64Array;
}

/**
 * Holds what every explanation of one forest reuses: cover shares per node, the base value and the path
 * scratch, sized once for the deepest tree. One explainer serves any number of rows, one at a time.
 */
export class ContributionExplainer {
  readonly features: number;
  readonly outputs: number;
  readonly base: Float64Array;
  private readonly prepared: PreparedTree[];
  private readonly levels: Int32Array;
  // The path entries of every depth, stacked: depth d's copy starts right after depth d-1's.
  private readonly pathFeature: Int32Array;
  private readonly pathZero: Float64Array;
  private readonly pathOne: Float64Array;
  private readonly pathWeight: Float64Array;
  /** inverse[i] = 1 / i: the weight updates divide by small whole numbers in long dependency chains. */
  private readonly inverse: Float64Array;
  // Set per row, read by the recursion.
  private x: ArrayLike<number> = new Float64Array(0);
  private offset = 0;
  private phi: Float64Array = new Float64Array(0);
  private current!: PreparedTree;

  constructor(forest: Forest) {
    this.features = forest.schema.features.length;
    this.outputs = outputCount(forest.schema.target);
    this.levels = levelCounts(forest.schema);
    const K = this.outputs;
    this.base = new Float64Array(K);
    const e = new Float64Array(K);
    let depth = 0;
    this.prepared = forest.trees.map((tree) => {
      const shares = childShares(tree);
      expectedOutput(tree, shares, K, e);
      for (let k = 0; k < K; k++) this.base[k] += e[k];
      depth = Math.max(depth, treeDepth(tree));
      return { tree, leftShare: shares.left, rightShare: shares.right };
    });
    const T = forest.trees.length;
    for (let k = 0; k < K; k++) this.base[k] /= T;
    const size = ((depth + 2) * (depth + 3)) / 2;
    this.pathFeature = new Int32Array(size);
    this.pathZero = new Float64Array(size);
    this.pathOne = new Float64Array(size);
    this.pathWeight = new Float64Array(size);
    this.inverse = Float64Array.from({ length: depth + 3 }, (_, i) => (i === 0 ? 0 : 1 / i));
  }

  /**
   * Contributions for the encoded row at x[offset..offset+p), written to out[j * outputs + k] (overwritten).
   * Their sum over j plus base[k] is the forest's output k for the row.
   */
  explainRow(x: ArrayLike<number>, offset = 0, out: Float64Array = new Float64Array(this.features * this.outputs)): Float64Array {
    out.fill(0);
    this.x = x;
    this.offset = offset;
    this.phi = out;
    for (const t of this.prepared) {
      this.current = t;
      this.recurse(0, 0, -1, 1, 1, -1);
    }
    const T = this.prepared.length;
    for (let i = 0; i < out.length; i++) out[i] /= T;

    return out;
  }

  /** Contributions for `rows` encoded rows, row-major in x (p floats a row). */
  explainRows(x: ArrayLike<number>, rows: number): Contributions {
    const p = this.features;
    const K = this.outputs;
    const contributions = new Float64Array(rows * p * K);
    for (let i = 0; i < rows; i++) this.explainRow(x, i * p, contributions.subarray(i * p * K, (i + 1) * p * K));
    return { rows, features: p, outputs: K, base: this.base.slice(), contributions };
  }

  /**
   * RECURSE of Algorithm 2. `depth` is the number of path entries before this node's own is added (the
   * paper's len(m)); the parent's entries sit at parentStart. zero/one/feature describe the edge into node.
   */
  private recurse(node: number, depth: number, parentStart: number, zero: number, one: number, feature: number): void {
    const { tree, leftShare, rightShare } = this.current;
    const pf = this.pathFeature;
    const pz = this.pathZero;
    const po = this.pathOne;
    const pw = this.pathWeight;
    const s = parentStart + depth + 1;
    for (let i = 0; i < depth; i++) {
      pf[s + i] = pf[parentStart + i];
      pz[s + i] = pz[parentStart + i];
      po[s + i] = po[parentStart + i];
      pw[s + i] = pw[parentStart + i];
    }
    this.extend(s, depth, zero, one, feature);

    const left = tree.left[node];
    if (left < 0) {
      const K = this.outputs;
      const phi = this.phi;
      const value = tree.value;
      const v0 = node * K;
      // One fractions are 0 or 1 here (the row follows an edge or it does not). UNWOUND-SUM of an entry with
      // 0 is (d + 1) / z * sum_j w_j / (d - j), and its scale multiplies that by (0 - z): z cancels, so every
      // such entry of the leaf shares one scale, computed once.
      let coldScale = 0;
      let coldDone = false;
      for (let i = 1; i <= depth; i++) {
        let scale: number;
        if (po[s + i] !== 0) scale = this.unwoundSum(s, depth, pz[s + i]) * (1 - pz[s + i]);
        else {
          if (!coldDone) {
            let sum = 0;
            for (let j = depth - 1; j >= 0; j--) sum += pw[s + j] * this.inverse[depth - j];
            coldScale = -sum * (depth + 1);
            coldDone = true;
          }
          scale = coldScale;
        }
        const at = pf[s + i] * K;
        for (let k = 0; k < K; k++) phi[at + k] += scale * value[v0 + k];
      }
      return;
    }

    const f = tree.feature[node];
    const right = tree.right[node];
    const hotLeft = goesLeft(tree, node, this.levels[f], this.x[this.offset + f]);
    const hot = hotLeft ? left : right;
    const cold = hotLeft ? right : left;
    const hotShare = hotLeft ? leftShare[node] : rightShare[node];
    const coldShare = hotLeft ? rightShare[node] : leftShare[node];
    let incomingZero = 1;
    let incomingOne = 1;
    let d = depth;
    // A feature already on the path is taken off and put back with this split folded in, so each feature
    // keeps one entry however often it is split on.
    let k = 1;
    while (k <= d && pf[s + k] !== f) k++;
    if (k <= d) {
      incomingZero = pz[s + k];
      incomingOne = po[s + k];
      this.unwind(s, d, k);
      d--;
    }
    // A branch with neither cover nor the row contributes nothing to any subset's expectation; skipping it
    // also keeps the unwinding free of 0/0.
    if (hotShare * incomingZero !== 0 || incomingOne !== 0) this.recurse(hot, d + 1, s, hotShare * incomingZero, incomingOne, f);
    if (coldShare * incomingZero !== 0) this.recurse(cold, d + 1, s, coldShare * incomingZero, 0, f);
  }

  /** EXTEND: adds an entry and updates the weights of every subset size. */
  private extend(s: number, depth: number, zero: number, one: number, feature: number): void {
    const pw = this.pathWeight;
    this.pathFeature[s + depth] = feature;
    this.pathZero[s + depth] = zero;
    this.pathOne[s + depth] = one;
    pw[s + depth] = depth === 0 ? 1 : 0;
    const oneShare = one * this.inverse[depth + 1];
    const zeroShare = zero * this.inverse[depth + 1];
    for (let i = depth - 1; i >= 0; i--) {
      const w = pw[s + i];
      pw[s + i + 1] += oneShare * w * (i + 1);
      pw[s + i] = zeroShare * w * (depth - i);
    }
  }

  /** Total weight of the path with an entry of one fraction 1 and zero fraction `zero` unwound, unchanged. */
  private unwoundSum(s: number, depth: number, zero: number): number {
    const pw = this.pathWeight;
    const inverse = this.inverse;
    let total = 0;
    let next = pw[s + depth];
    for (let i = depth - 1; i >= 0; i--) {
      const tmp = next * inverse[i + 1];
      total += tmp;
      next = pw[s + i] - tmp * zero * (depth - i);
    }
    return total * (depth + 1);
  }

  /** UNWIND: removes entry `at`, undoing its EXTEND. */
  private unwind(s: number, depth: number, at: number): void {
    const pf = this.pathFeature;
    const pz = this.pathZero;
    const po = this.pathOne;
    const pw = this.pathWeight;
    const one = po[s + at];
    const zero = pz[s + at];
    const l1 = depth + 1;
    let next = pw[s + depth];
    for (let i = depth - 1; i >= 0; i--) {
      if (one !== 0) {
        const tmp = pw[s + i];
        pw[s + i] = (next * l1) / ((i + 1) * one);
        next = tmp - (pw[s + i] * zero * (depth - i)) / l1;
      } else {
        pw[s + i] = (pw[s + i] * l1) / (zero * (depth - i));
      }
    }
    for (let i = at; i < depth; i++) {
      pf[s + i] = pf[s + i + 1];
      pz[s + i] = pz[s + i + 1];
      po[s + i] = po[s + i + 1];
    }
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
