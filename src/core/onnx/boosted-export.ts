// Leaf weights of a boosted ensemble for ONNX: each leaf's raw score (Copse stores T times it plus the base score,
// forest/boosting.ts) summed by the operator, with the base scores as base_values and the link as post_transform.
// A two-class ensemble is written in onnxruntime's one-score form: every weight for class id 0, which its LOGISTIC
// reads as the second class's log-odds (probabilities [1 - p, p]); checked in test/core/onnx/boosted.test.ts.
import type { Forest } from '../forest/forest';

export interface BoostedLeaves {
  readonly transform: 'NONE' | 'LOGISTIC' | 'SOFTMAX';
  readonly baseValues: number[];
  /** Whether all weights go to class id 0 (the one-score two-class form). */
  readonly single: boolean;
  add(lists: { weight(tree: number, id: number, target: number, w: number): void }, t: number, leaf: number, value: Float32Array): void;
}

export function boostedLeaves(forest: Forest): BoostedLeaves {
  const b = forest.boosting!;
  const T = forest.trees.length;
  const K = forest.schema.target.task === 'classification' ? forest.schema.target.classes!.length : 1;
  const single = b.link === 'logistic';
  return {
    transform: b.link === 'logistic' ? 'LOGISTIC' : b.link === 'softmax' ? 'SOFTMAX' : 'NONE',
    baseValues: single ? [b.base[1]] : [...b.base],
    single,
    add(lists, t, leaf, value) {
      if (single) return lists.weight(t, leaf, 0, (value[leaf * K + 1] - b.base[1]) / T);
      for (let k = 0; k < K; k++) {
        const w = (value[leaf * K + k] - b.base[k]) / T;
        if (w !== 0 || k === b.treeOutput[t]) lists.weight(t, leaf, k, w);
      }
    },
  };
}
