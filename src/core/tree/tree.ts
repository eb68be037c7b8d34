// A fitted tree as flat, parallel arrays indexed by node: fast to walk and trivial to serialise.

export interface FlatTree {
  readonly nodeCount: number;
  /** Child node indices; -1 on leaves. */
  readonly left: Int32Array;
  readonly right: Int32Array;
  /** Feature index; -1 on leaves. */
  readonly feature: Int32Array;
  /** Numeric split: x <= threshold goes left. Categorical split: word offset into catBits. */
  readonly threshold: Float64Array;
  /** 1 when a missing value (or an unseen level) goes left. */
  readonly missingLeft: Uint8Array;
  /** nodeCount * outputs: class probabilities (classification) or the mean (regression). */
  readonly value: Float32Array;
  /** Weighted in-bag rows that reached the node. */
  readonly cover: Float32Array;
  /** Level sets of categorical splits, one bit per level (set: goes left). */
  readonly catBits: Uint32Array;
}

export function isLeaf(tree: FlatTree, node: number): boolean {
  return tree.left[node] < 0;
}

export function treeDepth(tree: FlatTree): number {
  const depth = new Int32Array(tree.nodeCount);
  let max = 0;
  for (let n = 0; n < tree.nodeCount; n++) {
    if (tree.left[n] >= 0) {
      depth[tree.left[n]] = depth[n] + 1;
      depth[tree.right[n]] = depth[n] + 1;
      if (depth[n] + 1 > max) max = depth[n] + 1;
    }
  }
  return max;
}
