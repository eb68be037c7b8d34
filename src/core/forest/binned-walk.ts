// Walking a tree over binned rows: the fast path for training rows (out-of-bag votes, permutation importance).
import type { BinnedMatrix } from '../data/binning';
import type { FlatTree } from '../tree/tree';

/** Returns leafOf(r, swapFeature, swapCode): the leaf row r reaches, with feature swapFeature (>= 0) reading swapCode. */
export function binnedWalker(tree: FlatTree, splitBin: Int32Array, data: BinnedMatrix): (r: number, swapFeature: number, swapCode: number) => number {
  const { bins, features: p, valueBins } = data;
  const { left, right, feature, threshold, missingLeft, catBits } = tree;
  return (r, swapFeature, swapCode) => {
    let node = 0;
    const row = r * p;
    while (left[node] >= 0) {
      const f = feature[node];
      const b = f === swapFeature ? swapCode : bins[row + f];
      const sb = splitBin[node];
      let goLeft: boolean;
      if (b >= valueBins[f]) goLeft = missingLeft[node] === 1;
      else if (sb >= 0) goLeft = b <= sb;
      else goLeft = (catBits[threshold[node] + (b >>> 5)] & (1 << (b & 31))) !== 0;
      node = goLeft ? left[node] : right[node];
    }
    return node;
  };
}

/** For each node, a bit per feature split on along the path from the root (features >= 31 share the top bit). */
export function pathMasks(tree: FlatTree): Int32Array {
  const masks = new Int32Array(tree.nodeCount);
  for (let node = 0; node < tree.nodeCount; node++) {
    const f = tree.feature[node];
    if (f < 0) continue;
    const m = masks[node] | (1 << Math.min(f, 31));
    masks[tree.left[node]] = m;
    masks[tree.right[node]] = m;
  }
  return masks;
}
