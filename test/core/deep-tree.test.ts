// A valid tree 50,000 levels deep (a chain: each split sends one side to a leaf) goes through every walk over a
// tree: validation, the model file, prediction, contributions, partial dependence and ONNX export and import.
// Each walk is iterative, so depth is bounded by memory, not by the call stack; before they were, explanation
// overflowed the stack on a chain 12,000 to 50,000 deep while prediction answered.
import * as assert from 'node:assert/strict';
import { explainRows } from '../../src/core/explain/contributions';
import { partialDependence } from '../../src/core/explain/dependence';
import { defaultParams } from '../../src/core/forest/params';
import type { Forest } from '../../src/core/forest/forest';
import { predictEncoded } from '../../src/core/forest/predict';
import { checkForest, parseModel, serializeModel } from '../../src/core/model/file';
import { exportOnnx } from '../../src/core/onnx/export';
import { readOnnx } from '../../src/core/onnx/import';
import type { FlatTree } from '../../src/core/tree/tree';

const DEPTH = 50_000;

/**
 * Interior node 2k splits x at k: x <= k goes left to leaf 2k + 1 (value k), the rest right to node 2k + 2. The
 * last node is a leaf with value DEPTH. A row at x = v ends in leaf ceil(v), DEPTH levels down for v > DEPTH - 1.
 */
function chainForest(depth: number): Forest {
  const n = 2 * depth + 1;
  const left = new Int32Array(n).fill(-1);
  const right = new Int32Array(n).fill(-1);
  const feature = new Int32Array(n).fill(-1);
  const threshold = new Float64Array(n);
  const value = new Float32Array(n);
  const cover = new Float32Array(n);
  for (let k = 0; k < depth; k++) {
    left[2 * k] = 2 * k + 1;
    right[2 * k] = 2 * k + 2;
    feature[2 * k] = 0;
    threshold[2 * k] = k;
    value[2 * k + 1] = k;
    cover[2 * k + 1] = 1;
  }
  value[n - 1] = depth;
  cover[n - 1] = 1;
  // Interior covers and values, from the bottom up: each is the sum of its leaves' covers and their mean.
  for (let k = depth - 1; k >= 0; k--) {
    const a = 2 * k + 1;
    const b = 2 * k + 2;
    cover[2 * k] = cover[a] + cover[b];
    value[2 * k] = (value[a] * cover[a] + value[b] * cover[b]) / cover[2 * k];
  }
  const tree: FlatTree = { nodeCount: n, left, right, feature, threshold, missingLeft: new Uint8Array(n), value, cover, catBits: new Uint32Array(0) };
  return {
    schema: {
      features: [
        { name: 'x', kind: 'numeric', edges: [], hadMissing: false, reference: 0 },
        { name: 'z', kind: 'numeric', edges: [], hadMissing: false, reference: 0 },
      ],
      target: { name: 'y', task: 'regression' },
    },
    params: defaultParams('regression', { trees: 1 }),
    training: { rows: 0, fingerprint: '', dropped: [] },
    trees: [tree],
  };
}

describe(`a valid tree ${DEPTH.toLocaleString('en-US')} levels deep`, function () {
  this.timeout(120000);
  const forest = chainForest(DEPTH);
  // Row 0 goes to the bottom; row 1 stops at the first leaf.
  const x = Float64Array.from([DEPTH - 0.5, 7, -3, 7]);

  it('passes validation and comes back from its model file unchanged', () => {
    const checked = checkForest(forest);
    assert.equal(checked.trees[0].nodeCount, 2 * DEPTH + 1);
    const again = parseModel(serializeModel(forest));
    assert.deepEqual(Array.from(again.trees[0].right.subarray(0, 10)), Array.from(forest.trees[0].right.subarray(0, 10)));
    assert.equal(again.trees[0].value[2 * DEPTH], DEPTH);
  });

  it('predicts the leaf at the bottom', () => {
    const p = predictEncoded(forest, x, 2);
    assert.equal(p.predicted[0], DEPTH);
    assert.equal(p.predicted[1], 0);
  });

  it('explains rows: contributions add up to the prediction less the average, and the unused feature gets none', () => {
    const c = explainRows(forest, x, 2);
    const predictions = predictEncoded(forest, x, 2).predicted;
    for (let i = 0; i < 2; i++) {
      const total = c.base[0] + c.contributions[i * 2] + c.contributions[i * 2 + 1];
      assert.ok(Math.abs(total - predictions[i]) < 1e-6 * DEPTH, `row ${i}: ${total} vs ${predictions[i]}`);
      assert.equal(c.contributions[i * 2 + 1], 0);
    }
    // One feature decides everything: its contribution is the whole difference (common practice for TreeSHAP).
    assert.ok(c.contributions[0] > 0);
    assert.ok(c.contributions[2] < 0);
  });

  it('walks the grid for partial dependence', () => {
    const pd = partialDependence(forest, x, 2, 0, { gridSize: 5, spacing: 'even' });
    assert.equal(pd.average.length, pd.grid.values.length);
    for (let g = 0; g < pd.grid.values.length; g++) {
      const v = pd.grid.values[g];
      const expected = v > DEPTH - 1 ? DEPTH : Math.max(0, Math.ceil(v));
      assert.equal(pd.average[g], expected, `grid value ${v}`);
    }
  });

  it('exports to ONNX and imports back with every node', () => {
    const back = readOnnx(exportOnnx(forest)).forest;
    assert.equal(back.trees[0].nodeCount, 2 * DEPTH + 1);
    assert.equal(predictEncoded(back, x, 2).predicted[0], DEPTH);
  });
});
