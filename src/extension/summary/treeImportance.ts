// Mean decrease in impurity read back from a saved forest's trees, for forests opened from a file (whose
// fit report is gone). Each split's decrease is cover-weighted impurity of the node minus its children's:
// Breiman et al. (1984) "Classification and Regression Trees", as popularised for forests by Breiman (2001).
// For squared error it reduces to n_l n_r / n (mean_l − mean_r)², which needs only node means and covers.
// Each tree's decreases are scaled to sum to 1 before averaging, so every tree counts equally (as core does).

import type { Forest } from '../engine';

export function impurityFromTrees(forest: Forest): Float64Array {
  const p = forest.schema.features.length;
  const task = forest.schema.target.task;
  const K = task === 'classification' ? (forest.schema.target.classes?.length ?? 0) : 1;
  const entropy = forest.params.criterion === 'entropy';
  const total = new Float64Array(p);
  const own = new Float64Array(p);
  for (const tree of forest.trees) {
    own.fill(0);
    for (let n = 0; n < tree.nodeCount; n++) {
      const l = tree.left[n];
      if (l < 0) continue;
      const r = tree.right[n];
      const f = tree.feature[n];
      const cn = tree.cover[n];
      const cl = tree.cover[l];
      const cr = tree.cover[r];
      let d: number;
      if (task === 'regression') {
        d = cn > 0 ? ((cl * cr) / cn) * (tree.value[l] - tree.value[r]) ** 2 : 0;
      } else {
        const imp = (node: number): number => {
          let s = 0;
          for (let k = 0; k < K; k++) {
            const q = tree.value[node * K + k];
            s += entropy ? (q > 0 ? -q * Math.log2(q) : 0) : q * q;
          }
          return entropy ? s : 1 - s;
        };
        d = cn * imp(n) - cl * imp(l) - cr * imp(r);
      }
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
