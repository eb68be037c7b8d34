// Path-dependent TreeSHAP for one tree, Algorithm 2 of Lundberg, Erion, Chen et al. (2020), "From local
// explanations to global understanding with explainable AI for trees", Nature Machine Intelligence 2, 56-67.
// (Journal volume and pages cited from memory.)
//
// The conditional expectation E[f(x) | x_S] follows the row's branch at splits on features in S and averages
// the two children by in-bag cover elsewhere. The algorithm keeps, along the current root-to-node path, one
// entry per distinct feature split on (with the fraction of cover kept when the feature is unknown and
// whether the row goes that way when it is known) and the permutation weights of every subset size, so each
// leaf adds its share to every feature on its path in O(depth^2) instead of 2^p subset evaluations.
// contributions.ts averages these per-tree values over a forest or over any chosen set of its trees.
import type { FlatTree } from '../tree/tree';
import { goesLeft } from './routing';

/** A tree with the cover shares of each split's children (routing.ts childShares), computed once per forest. */
export interface PreparedTree {
  readonly tree: FlatTree;
  readonly leftShare: Float64Array;
  readonly rightShare: Float64Array;
}

/** A call of RECURSE waiting its turn. */
interface Call {
  readonly node: number;
  readonly depth: number;
  readonly parentStart: number;
  readonly zero: number;
  readonly one: number;
  readonly feature: number;
}

/**
 * The path scratch of Algorithm 2, sized once for the deepest tree it will see; one tree and one row at a
 * time. Not reentrant: each explainer owns one.
 */
export class ShapleyPath {
  // The path entries of every depth, stacked: depth d's copy starts right after depth d-1's.
  private readonly pathFeature: Int32Array;
  private readonly pathZero: Float64Array;
  private readonly pathOne: Float64Array;
  private readonly pathWeight: Float64Array;
  /** inverse[i] = 1 / i: the weight updates divide by small whole numbers in long dependency chains. */
  private readonly inverse: Float64Array;
  // Set per tree and row, read by the recursion.
  private x: ArrayLike<number> = new Float64Array(0);
  private offset = 0;
  private phi: Float64Array = new Float64Array(0);
  private current!: PreparedTree;

  /**
   * @param depth the deepest tree's depth (tree.ts treeDepth)
   * @param outputs values per leaf: the number of classes, or 1 for regression
   * @param levels level count of each categorical feature, 0 for numeric ones (predict.ts levelCounts)
   */
  constructor(
    depth: number,
    private readonly outputs: number,
    private readonly levels: Int32Array,
  ) {
    // A node's copy holds one entry per distinct feature above it plus the root's, never more than depth + 1,
    // so a chain 50,000 deep on a few features needs a few entries per level, not the square of its depth.
    const widest = Math.min(depth, levels.length + 1) + 2;
    const size = Math.min(((depth + 2) * (depth + 3)) / 2, (depth + 2) * widest);
    this.pathFeature = new Int32Array(size);
    this.pathZero = new Float64Array(size);
    this.pathOne = new Float64Array(size);
    this.pathWeight = new Float64Array(size);
    this.inverse = Float64Array.from({ length: depth + 3 }, (_, i) => (i === 0 ? 0 : 1 / i));
  }

  /**
   * Adds one tree's contributions for the encoded row at x[offset..offset+p) to phi[j * outputs + k]. Their
   * sum over j is the tree's output k for the row less its expected output (routing.ts expectedOutput).
   */
  add(tree: PreparedTree, x: ArrayLike<number>, offset: number, phi: Float64Array): void {
    this.x = x;
    this.offset = offset;
    this.phi = phi;
    this.current = tree;
    // The recursion of Algorithm 2 run on an explicit stack, so a tree of any depth is walked without using the
    // call stack. A child only reads its parent's path copy, which no sibling writes, so the pending calls can
    // wait on the stack; the hot child is pushed last and so walked first, in the recursion's order.
    const stack = this.stack;
    stack.length = 0;
    stack.push({ node: 0, depth: 0, parentStart: -1, zero: 1, one: 1, feature: -1 });
    for (let call = stack.pop(); call !== undefined; call = stack.pop()) {
      this.visit(call.node, call.depth, call.parentStart, call.zero, call.one, call.feature);
    }
  }

  private readonly stack: Call[] = [];

  /**
   * One call of RECURSE of Algorithm 2, its calls on the children left on the stack. `depth` is the number of
   * path entries before this node's own is added (the paper's len(m)); the parent's entries sit at parentStart.
   * zero/one/feature describe the edge into node.
   */
  private visit(node: number, depth: number, parentStart: number, zero: number, one: number, feature: number): void {
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
    if (coldShare * incomingZero !== 0) this.stack.push({ node: cold, depth: d + 1, parentStart: s, zero: coldShare * incomingZero, one: 0, feature: f });
    if (hotShare * incomingZero !== 0 || incomingOne !== 0) this.stack.push({ node: hot, depth: d + 1, parentStart: s, zero: hotShare * incomingZero, one: incomingOne, feature: f });
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
