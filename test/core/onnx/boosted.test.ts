// Boosted ensembles in ONNX: an XGBoost model exported by Copse scores under onnxruntime (1.30) as XGBoost 1.7.4
// itself did (test/fixtures/xgboost/, scripts/xgboost_reference.py), and reads back as the same boosted ensemble;
// hand-built summed ensembles with LOGISTIC and SOFTMAX read as onnxruntime scores them.
import { strict as assert } from 'node:assert';
import { explainRows } from '../../../src/core/explain/contributions';
import { predictEncoded } from '../../../src/core/forest/predict';
import { ModelError } from '../../../src/core/model/validate';
import { exportOnnx } from '../../../src/core/onnx/export';
import { importOnnx } from '../../../src/core/onnx/import';
import { openCase } from '../xgboost/helpers';
import { bytesOf, ensembleModel, maxDiff, runOnnx, type AttrValue } from './helpers';

describe('boosted ensembles in ONNX', function () {
  this.timeout(120000);

  for (const name of ['binary', 'multiclass', 'gaps', 'forest']) {
    it(`${name}: the export scores under onnxruntime as XGBoost did, and reads back as the same boosted ensemble`, async () => {
      const { forest, x, rows, expected } = await openCase(name);
      const bytes = exportOnnx(forest);
      const out = await runOnnx(bytes, x, rows, forest.schema.features.length, { input: 'features' });
      const classification = forest.schema.target.task === 'classification';
      const runtime = Array.from((classification ? out.probabilities : out.value) as ArrayLike<number>);
      const theirs = name === 'binary' ? expected.predict.flatMap((r) => [1 - r[0], r[0]]) : expected.predict.flat();
      const gap = maxDiff(runtime, theirs);
      const scale = classification ? 1 : Math.max(...theirs.map(Math.abs));
      // eslint-disable-next-line no-console -- the measured agreement goes to the run's log; the assertion below holds the bound.
      console.log(`      ${name}: onnxruntime vs XGBoost, largest difference ${gap.toExponential(2)}${classification ? '' : ` (values up to ${scale.toFixed(0)})`}`);
      assert.ok(gap <= 1e-4 * scale, `${name}: ${gap}`);

      const back = importOnnx(bytes);
      assert.deepEqual({ ...back.boosting, source: 'xgboost' }, { ...forest.boosting, treeOutput: [...forest.boosting!.treeOutput] });
      const a = predictEncoded(forest, x, rows);
      const b = predictEncoded(back, x, rows);
      assert.ok(maxDiff((a.proba ?? a.value)!, (b.proba ?? b.value)!) <= 1e-6 * scale);
      // Covers travel as nodes_hitrates, so the contributions are the same TreeSHAP values.
      const ca = explainRows(forest, x, 40);
      const cb = explainRows(back, x, 40);
      assert.ok(maxDiff(ca.contributions, cb.contributions) <= 1e-5 * scale);
    });
  }

  const stump = (cls: number[], extra: Record<string, AttrValue>) =>
    bytesOf(
      ensembleModel(
        'TreeEnsembleClassifier',
        {
          nodes_treeids: { ints: [0, 0, 0, 1, 1, 1] },
          nodes_nodeids: { ints: [0, 1, 2, 0, 1, 2] },
          nodes_featureids: { ints: [0, 0, 0, 1, 0, 0] },
          nodes_values: { floats: [0.5, 0, 0, 0.25, 0, 0] },
          nodes_modes: { strings: ['BRANCH_LEQ', 'LEAF', 'LEAF', 'BRANCH_LEQ', 'LEAF', 'LEAF'] },
          nodes_truenodeids: { ints: [1, 0, 0, 1, 0, 0] },
          nodes_falsenodeids: { ints: [2, 0, 0, 2, 0, 0] },
          class_treeids: { ints: cls.map((_, j) => (j < cls.length / 2 ? 0 : 1)) },
          class_nodeids: { ints: cls.map((_, j) => (j % 2) + 1) },
          class_ids: { ints: cls },
          class_weights: { floats: cls.map((_, j) => [-1, 2, 0.5, -0.75, 0.3, 1.1][j % 6]) },
          ...extra,
        },
        { features: 2 },
      ),
    );
  const grid = [0, 0, 0, 1, 1, 0, 1, 1, NaN, 0.2];

  it('reads a two-class LOGISTIC ensemble in the one-score form (class id 0, one base value) as onnxruntime scores it', async () => {
    const bytes = stump([0, 0, 0, 0], { classlabels_strings: { strings: ['no', 'yes'] }, post_transform: 'LOGISTIC', base_values: { floats: [0.3] } });
    const forest = importOnnx(bytes);
    assert.equal(forest.boosting?.link, 'logistic');
    const runtime = await runOnnx(bytes, grid, 5, 2);
    const ours = predictEncoded(forest, grid, 5);
    assert.ok(maxDiff(ours.proba!, runtime.probabilities as ArrayLike<number>) <= 1e-6);
    assert.ok(Math.abs(ours.proba![1] - 1 / (1 + Math.exp(-(0.3 - 1 + 0.5)))) <= 1e-6, 'row (0, 0): both trees\' left leaves plus the base, through the logistic');
  });

  it('reads a SOFTMAX ensemble with base values as onnxruntime scores it', async () => {
    const bytes = stump([0, 2, 1, 0, 2, 1], { classlabels_strings: { strings: ['a', 'b', 'c'] }, post_transform: 'SOFTMAX', base_values: { floats: [0.1, -0.2, 0.4] } });
    const forest = importOnnx(bytes);
    assert.equal(forest.boosting?.link, 'softmax');
    const runtime = await runOnnx(bytes, grid, 5, 2);
    assert.ok(maxDiff(predictEncoded(forest, grid, 5).proba!, runtime.probabilities as ArrayLike<number>) <= 1e-6);
  });

  it('refuses LOGISTIC forms onnxruntime does not turn into probabilities, and SOFTMAX_ZERO, by name', () => {
    const refuses = (bytes: Uint8Array, pattern: RegExp) => assert.throws(() => importOnnx(bytes), (e: unknown) => e instanceof ModelError && pattern.test(e.message));
    refuses(stump([1, 1, 1, 1], { classlabels_strings: { strings: ['no', 'yes'] }, post_transform: 'LOGISTIC' }), /weights for class id 1/);
    refuses(stump([0, 0, 0, 0], { classlabels_strings: { strings: ['no', 'yes'] }, post_transform: 'LOGISTIC', base_values: { floats: [0.3, 0.3] } }), /two base values/);
    refuses(stump([0, 2, 1, 0, 2, 1], { classlabels_strings: { strings: ['a', 'b', 'c'] }, post_transform: 'LOGISTIC' }), /LOGISTIC to 3 classes/);
    refuses(stump([0, 2, 1, 0, 2, 1], { classlabels_strings: { strings: ['a', 'b', 'c'] }, post_transform: 'SOFTMAX_ZERO' }), /post_transform SOFTMAX_ZERO; Copse reads NONE/);
  });
});
