// Grid construction for decision-region maps, checked on hand-sized inputs.
import * as assert from 'node:assert/strict';
import { GridAccumulator, gridBatches, planAxis, rankFeatures, topPairs } from '../../src/core/explain/region-grid';
import type { FeatureInfo } from '../../src/core/base/schema';

const num = (name: string): FeatureInfo => ({ name, kind: 'numeric', hadMissing: false, reference: 0, edges: [] });

describe('extension region grid', () => {
  // Two rows, three features: [x, y, z].
  const enc = Float64Array.from([0, 10, 5, 4, NaN, 6]);

  it('spans a numeric axis over the training range, values at cell centres', () => {
    const a = planAxis(0, num('x'), enc, 3, 2, 4);
    assert.deepEqual(a.axis, { feature: 'x', kind: 'numeric', min: 0, max: 4 });
    assert.deepEqual(Array.from(a.values), [0.5, 1.5, 2.5, 3.5]);
    const y = planAxis(1, num('y'), enc, 3, 2, 2);
    assert.deepEqual(y.axis, { feature: 'y', kind: 'numeric', min: 9.5, max: 10.5 }, 'one value gets a unit span; NaN ignored');
  });

  it('gives level axes one cell per level and refuses very many levels', () => {
    const lv: FeatureInfo = { name: 'c', kind: 'categorical', levels: ['a', 'b', 'c'], hadMissing: false, reference: 1 };
    const a = planAxis(2, lv, enc, 3, 2, 50);
    assert.equal(a.n, 3);
    assert.deepEqual(Array.from(a.values), [0, 1, 2]);
    const many: FeatureInfo = { ...lv, levels: Array.from({ length: 201 }, (_, i) => `l${i}`) };
    assert.throws(() => planAxis(2, many, enc, 3, 2, 50), /at most 200/);
  });

  it('lays batches out as whole grid copies, x fastest, one copy per reference row', () => {
    const x = planAxis(0, num('x'), enc, 3, 2, 2);
    const y = planAxis(2, num('z'), enc, 3, 2, 2); // z spans [5, 6]: centres 5.25 and 5.75
    const base = Float64Array.from([7, 8, 9, 17, 18, 19]);
    const batches = [...gridBatches({ x, y, p: 3, base, baseRows: 2 }, 4)];
    assert.equal(batches.length, 2, 'four cells per copy, at most four rows per batch');
    assert.deepEqual(Array.from(batches[1].x), [1, 18, 5.25, 3, 18, 5.25, 1, 18, 5.75, 3, 18, 5.75]);
    assert.deepEqual([batches[0].from, batches[0].to, batches[1].from, batches[1].to], [0, 1, 1, 2]);
  });

  it('averages probabilities over copies before taking the class (partial dependence, Friedman 2001)', () => {
    const acc = new GridAccumulator('classification', 2, 2);
    acc.add({ rows: 2 }, { proba: Float64Array.from([0.9, 0.1, 0.4, 0.6]) });
    acc.add({ rows: 2 }, { proba: Float64Array.from([0.3, 0.7, 0.2, 0.8]) });
    const cells = acc.finish();
    assert.equal(cells.task, 'classification');
    if (cells.task !== 'classification') return;
    assert.deepEqual(cells.predicted, [0, 1]);
    assert.ok(Math.abs(cells.strength[0] - 0.6) < 1e-12 && Math.abs(cells.strength[1] - 0.7) < 1e-12);
    const reg = new GridAccumulator('regression', 1, 2);
    reg.add({ rows: 4 }, { value: Float64Array.from([1, 2, 3, 6]) });
    assert.deepEqual(reg.finish(), { task: 'regression', value: [2, 4] });
    assert.throws(() => reg.add({ rows: 4 }, { value: Float64Array.from([1]) }), /do not match/);
  });

  it('ranks by permutation importance where measured, else impurity, and pairs the leaders', () => {
    assert.deepEqual(rankFeatures(Float64Array.from([0.1, 0.3, NaN]), Float64Array.from([0.5, 0.2, 0.3])), [1, 0, 2]);
    assert.deepEqual(rankFeatures(Float64Array.from([NaN, NaN, NaN]), Float64Array.from([0.5, 0.2, 0.3])), [0, 2, 1]);
    assert.deepEqual(topPairs([4, 2, 7, 1], 3), [[4, 2], [4, 7], [2, 7]]);
  });
});
