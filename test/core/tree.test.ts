import * as assert from 'node:assert/strict';
import { fitForest } from '../../src/core/forest/fit';
import { predictTable } from '../../src/core/forest/predict';
import { treeDepth } from '../../src/core/tree/tree';
import { tableFrom } from './helpers/table';

const one = { trees: 1, featuresPerSplit: 'all' as const, sampleFraction: 1, replace: false };

describe('single trees', () => {
  it('fit XOR exactly at full depth, which no single split can (common practice)', async () => {
    const a: number[] = [];
    const b: number[] = [];
    const y: string[] = [];
    for (let i = 0; i < 200; i++) {
      const x1 = (i * 37) % 100;
      const x2 = (i * 61) % 100;
      a.push(x1);
      b.push(x2);
      y.push((x1 < 50) !== (x2 < 50) ? 'odd' : 'even');
    }
    const t = tableFrom({ a, b, y });
    const rep = await fitForest(t, { target: 'y', params: one, workers: 1 });
    const pred = predictTable(rep.forest, t);
    assert.equal(pred.predicted.filter((p, i) => rep.forest.schema.target.classes![p] !== y[i]).length, 0);
    assert.ok(treeDepth(rep.forest.trees[0]) >= 2);
  });

  it('splits a categorical feature into two level sets, whatever the codes (Breiman et al. 1984)', async () => {
    // Class depends on level membership {b, d} vs {a, c, e}: interleaved codes defeat an ordinal split.
    const levels = ['a', 'b', 'c', 'd', 'e'];
    const c = Array.from({ length: 100 }, (_, i) => levels[i % 5]);
    const y = c.map((l) => (l === 'b' || l === 'd' ? 'yes' : 'no'));
    const t = tableFrom({ c, y });
    const rep = await fitForest(t, { target: 'y', params: one, workers: 1 });
    const tree = rep.forest.trees[0];
    assert.equal(tree.nodeCount, 3, 'one split separates the classes');
    const pred = predictTable(rep.forest, t);
    assert.equal(pred.predicted.filter((p, i) => rep.forest.schema.target.classes![p] !== y[i]).length, 0);
  });

  it('learns which side missing values take (Chen & Guestrin 2016)', async () => {
    // Missing x goes with the high class; the tree must send missing cells right, with x > 5.
    const x: Array<number | null> = [];
    const y: string[] = [];
    for (let i = 0; i < 90; i++) {
      const v = i % 3 === 0 ? null : i % 10;
      x.push(v);
      y.push(v === null || v > 5 ? 'high' : 'low');
    }
    const t = tableFrom({ x, y });
    const rep = await fitForest(t, { target: 'y', params: one, workers: 1 });
    const test = tableFrom({ x: [null, 1, 9], y: ['high', 'low', 'high'] });
    const pred = predictTable(rep.forest, test);
    const classes = rep.forest.schema.target.classes!;
    assert.deepEqual(Array.from(pred.predicted, (p) => classes[p]), ['high', 'low', 'high']);
    assert.equal(rep.forest.trees[0].nodeCount, 3);
  });

  it('sends missing values down the heavier side when training had none', async () => {
    const x = Array.from({ length: 40 }, (_, i) => i);
    const y = x.map((v) => (v < 30 ? 'many' : 'few'));
    const rep = await fitForest(tableFrom({ x, y }), { target: 'y', params: one, workers: 1 });
    const pred = predictTable(rep.forest, tableFrom({ x: [null], y: ['many'] }));
    assert.equal(rep.forest.schema.target.classes![pred.predicted[0]], 'many');
  });

  it('respects max depth and min leaf', async () => {
    const x = Array.from({ length: 300 }, (_, i) => (i * 7919) % 300);
    const y = x.map((v) => String(v % 7));
    const t = tableFrom({ x, y });
    const shallow = await fitForest(t, { target: 'y', params: { ...one, maxDepth: 3 }, workers: 1 });
    assert.ok(treeDepth(shallow.forest.trees[0]) <= 3);
    const leafy = await fitForest(t, { target: 'y', params: { ...one, minLeaf: 20 }, workers: 1 });
    const tree = leafy.forest.trees[0];
    for (let n = 0; n < tree.nodeCount; n++) if (tree.left[n] < 0) assert.ok(tree.cover[n] >= 20, `leaf ${n} holds ${tree.cover[n]}`);
  });

  it('predicts the leaf mean in regression', async () => {
    const x = [1, 2, 3, 10, 11, 12];
    const y = [1, 1, 1, 5, 7, 9];
    const t = tableFrom({ x, y });
    const rep = await fitForest(t, { target: 'y', task: 'regression', params: { ...one, minLeaf: 3 }, workers: 1 });
    const pred = predictTable(rep.forest, tableFrom({ x: [0, 100], y: [0, 0] }));
    assert.deepEqual(Array.from(pred.predicted), [1, 7]);
  });
});
