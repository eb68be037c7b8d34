// One split's decision for one encoded value, and the share of a node's in-bag weight each child holds.
// Explanations need the decision node by node (not just the leaf), so this restates leafOf's rule for a single
// node; the explain tests check that walking with it lands on leafOf's leaf for every row.
import type { FlatTree } from '../tree/tree';

/** Whether value v goes left at split `node`; `levels` is the feature's level count (0 for numeric). */
export function goesLeft(tree: FlatTree, node: number, levels: number, v: number): boolean {
  if (Number.isNaN(v)) return tree.missingLeft[node] === 1;
  if (levels > 0) {
    if (v >= levels || v < 0) return tree.missingLeft[node] === 1;
    return (tree.catBits[tree.threshold[node] + (v >>> 5)] & (1 << (v & 31))) !== 0;
  }
  return v <= tree.threshold[node];
}

/**
 * Share of node's cover that went to each child: the weights of the conditional expectation over the tree
 * (Lundberg et al. 2020). A node without cover (possible only in a hand-made model file) splits its weight
 * evenly, so the shares still sum to 1 and every expectation stays finite.
 */
export function childShares(tree: FlatTree): { left: Float64Array; right: Float64Array } {
  const n = tree.nodeCount;
  const left = new Float64Array(n);
  const right = new Float64Array(n);
  for (let node = 0; node < n; node++) {
    const l = tree.left[node];
    if (l < 0) continue;
    const r = tree.right[node];
    const cl = tree.cover[l];
    const cr = tree.cover[r];
    const c = cl + cr;
    // The children's own sum, not the parent's float32 cover, so the two shares add to exactly 1.
    if (c > 0) {
      left[node] = cl / c;
      right[node] = cr / c;
    } else {
      left[node] = 0.5;
      right[node] = 0.5;
    }
  }
  return { left, right };
}

/** Expected output of the tree when no feature is known: leaf values weighted by the products of shares. */
export function expectedOutput(tree: FlatTree, shares: { left: Float64Array; right: Float64Array }, outputs: number, out: Float64Array): void {
  const reach = new Float64Array(tree.nodeCount);
  reach[0] = 1;
  out.fill(0);
  // Children always come after their parent, so one forward pass sees every parent first.
  for (let node = 0; node < tree.nodeCount; node++) {
    const l = tree.left[node];
    if (l >= 0) {
      reach[l] = reach[node] * shares.left[node];
      reach[tree.right[node]] = reach[node] * shares.right[node];
    } else {
      for (let k = 0; k < outputs; k++) out[k] += reach[node] * tree.value[node * outputs + k];
    }
  }
}
