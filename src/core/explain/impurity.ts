// Mean decrease in impurity read back from a forest's trees, for a forest opened from a file (whose fit report
// is gone): each split's decrease is what the fit's splitter maximised, so it comes from the same criterion
// (tree/criterion.ts) applied to node covers and values. Breiman et al. (1984) "Classification and Regression
// Trees", as popularised for forests by Breiman (2001). Each tree's decreases are scaled to sum to 1 before
// averaging, so every tree counts equally, as the out-of-bag fold does.

import type { Forest } from '../forest/forest';
import { sideScore } from '../tree/criterion';

export function impurityFromTrees(forest: Forest): Float64Array {
  const p = forest.schema.features.length;
  const task = forest.schema.target.task;
  const K = task === 'classification' ? (forest.schema.target.classes?.length ?? 0) : 1;
  // A node's channels, as the splitter sums them: class weights, or weight and weighted target.
  const C = task === 'classification' ? K : 2;
  const score = sideScore(task === 'classification' ? (forest.params.criterion === 'entropy' ? 'entropy' : 'gini') : 'squared-error');
  const ch = new Float64Array(3 * C);
  const total = new Float64Array(p);
  const own = new Float64Array(p);
  for (const tree of forest.trees) {
    own.fill(0);
    const fill = (node: number, slot: number): void => {
      const w = tree.cover[node];
      if (task === 'classification') for (let k = 0; k < K; k++) ch[slot * C + k] = w * tree.value[node * K + k];
      else {
        ch[slot * C] = w;
        ch[slot * C + 1] = w * tree.value[node];
      }
    };
    for (let n = 0; n < tree.nodeCount; n++) {
      const l = tree.left[n];
      if (l < 0) continue;
      fill(n, 0);
      fill(l, 1);
      fill(tree.right[n], 2);
      const d = score(ch, C, C) + score(ch, 2 * C, C) - score(ch, 0, C);
      const f = tree.feature[n];
      if (f >= 0 && f < p && d > 0) own[f] += d;
    }
    let treeTotal = 0;
    for (const v of own) treeTotal += v;
    if (treeTotal > 0) for (let f = 0; f < p; f++) total[f] += own[f] / treeTotal;
  }
  let sum = 0;
  for (const v of total) sum += v;
  if (sum > 0) for (let f = 0; f < p; f++) total[f] /= sum;
  return total;
}
