// Boosted ONNX ensembles: summed tree scores through post_transform LOGISTIC or SOFTMAX, as the usual converters
// write them for XGBoost, LightGBM and scikit-learn's gradient boosting. The importer folds sums and base values
// into the leaves as for any summed ensemble (import.ts); this decides the link and the base scores, and refuses
// what onnxruntime does not read as probabilities. onnxruntime 1.30's two-class LOGISTIC (checked in
// test/core/onnx/boosted.test.ts): with every weight on class id 0 and at most one base value b it reports
// [1 - p, p], p the logistic of the summed score plus b; weights on class id 1, or two base values, give
// numbers that are not probabilities of either class, so Copse refuses those files.
import type { Boosting, Link } from '../forest/boosting';
import type { FlatTree } from '../tree/tree';
import type { Fail } from './attributes';
import type { Ensemble } from './ensemble';

export function boostedEnsemble(e: Ensemble, classification: boolean, identity: boolean, fail: Fail): { ensemble: Ensemble; link?: Link } {
  const oneBase = e.base.length === 2 && Number.isNaN(e.base[1]);
  if (oneBase && e.transform !== 'LOGISTIC') fail('it gives one base value for two classes, which only a LOGISTIC ensemble with one score reads');
  if (e.transform === 'NONE') return { ensemble: e, link: identity && !classification && e.aggregate === 'sum' ? 'identity' : undefined };
  if (!classification) fail(`it applies post_transform ${e.transform} to a regression; Copse reads LOGISTIC and SOFTMAX on classifiers`);
  if (e.aggregate !== 'sum') fail(`it averages trees and then applies ${e.transform}; Copse reads ${e.transform} on summed scores`);
  if (e.transform === 'SOFTMAX') return { ensemble: e, link: 'softmax' };
  if (e.outputs !== 2) fail(`it applies LOGISTIC to ${e.outputs} classes; Copse reads LOGISTIC on two classes and SOFTMAX on more`);
  for (let j = 0; j < e.weightTarget.length; j++) {
    if (e.weightTarget[j] !== 0) fail('its two-class LOGISTIC ensemble has weights for class id 1; Copse reads the one-score form (every weight for class id 0), which onnxruntime turns into probabilities');
  }
  if (!oneBase && e.base[1] !== 0) fail('its two-class LOGISTIC ensemble has two base values; Copse reads one, the base of the single score');
  // The single score is the second class's log-odds: Copse keeps it as output 1, with output 0 fixed at 0.
  return { ensemble: { ...e, weightTarget: new Int32Array(e.weightTarget.length).fill(1), base: Float64Array.of(0, e.base[0]) }, link: 'logistic' };
}

/** The boosting record of imported trees: the output each tree adds to is the first whose leaves leave the base. */
export function boostingOf(link: Link, base: Float64Array, trees: readonly FlatTree[], K: number): Boosting {
  const stored = Array.from(base, (b) => Math.fround(b));
  const treeOutput = trees.map((tree) => {
    if (link === 'logistic') return 1;
    for (let k = 0; k < K; k++) for (let n = 0; n < tree.nodeCount; n++) if (tree.left[n] < 0 && tree.value[n * K + k] !== stored[k]) return k;
    return 0;
  });
  return { link, base: Array.from(base), treeOutput, source: 'onnx' };
}
