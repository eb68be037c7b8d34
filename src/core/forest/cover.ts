// Node covers from data: how many of the given rows reach each node. An imported forest carries no training
// covers, and path-dependent explanations weigh a split's two sides by them; counting the rows the user is
// looking at gives those weights a stated meaning (this data's share down each side) instead of a guess.
import type { Forest } from './forest';
import { leafOf, levelCounts } from './predict';

/** The forest with every node's cover replaced by the number of the n encoded rows (row-major in x) reaching it. */
export function withCoverFrom(forest: Forest, x: ArrayLike<number>, n: number): Forest {
  const p = forest.schema.features.length;
  if (x.length < n * p) throw new RangeError(`Counting covers needs ${n * p} values for ${n} rows; got ${x.length}.`);
  const counts = levelCounts(forest.schema);
  const trees = forest.trees.map((tree) => {
    const cover = new Float32Array(tree.nodeCount);
    for (let i = 0; i < n; i++) cover[leafOf(tree, counts, x, i * p)]++;
    // Children come after their parents (the model validator checks it), so one backward pass sums every node.
    for (let node = tree.nodeCount - 1; node >= 0; node--) {
      if (tree.left[node] >= 0) cover[node] = cover[tree.left[node]] + cover[tree.right[node]];
    }
    return { ...tree, cover };
  });
  return { ...forest, trees };
}
