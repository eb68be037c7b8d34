import * as assert from 'node:assert/strict';
import { fitForest } from '../../src/core/forest/fit';
import { predictInWorkers } from '../../src/core/forest/parallel-predict';
import { inBagCounts } from '../../src/core/forest/bootstrap';
import { encodeTable, leafOf, levelCounts, predictEncoded, predictTable } from '../../src/core/forest/predict';
import { serializeModel } from '../../src/core/model/file';
import { threeClass } from './helpers/synthetic';
import { tableFrom } from './helpers/table';

describe('forest', () => {
  const table = threeClass(600);

  it('grows the same forest, bit for bit, on 1, 2 or 3 workers', async () => {
    const options = { target: 'label', params: { trees: 12, seed: 42 } };
    const [a, b, c] = await Promise.all([1, 2, 3].map((workers) => fitForest(table, { ...options, workers })));
    assert.equal(serializeModel(a.forest), serializeModel(b.forest));
    assert.equal(serializeModel(a.forest), serializeModel(c.forest));
    assert.deepEqual(a.rows.oobProba, c.rows.oobProba);
    assert.deepEqual(a.rows.margin, c.rows.margin);
    assert.deepEqual(a.importance.permutation, c.importance.permutation);
    assert.deepEqual(a.curve, c.curve);
  });

  it('hands each tree on in order, and without keeping them reports the same out-of-bag results', async () => {
    const options = { target: 'label', params: { trees: 8, seed: 9 }, workers: 2 };
    const kept = await fitForest(table, options);
    const handed: string[] = [];
    const lean = await fitForest(table, {
      ...options,
      keepTrees: false,
      onTree: (tree, index, head) => {
        assert.equal(index, handed.length);
        assert.deepEqual(head.schema, kept.forest.schema);
        handed.push(serializeModel({ ...head, params: { ...head.params, trees: 1 }, trees: [tree] }));
      },
    });
    assert.equal(lean.forest.trees.length, 0);
    assert.deepEqual(lean.rows, kept.rows);
    assert.deepEqual(lean.curve, kept.curve);
    kept.forest.trees.forEach((tree, t) => assert.equal(handed[t], serializeModel({ ...kept.forest, params: { ...kept.forest.params, trees: 1 }, trees: [tree] })));
    await assert.rejects(fitForest(table, { ...options, keepTrees: false, holdout: 0.2 }), /needs the trees kept/);
  });

  it('grows a different forest for another seed', async () => {
    const a = await fitForest(table, { target: 'label', params: { trees: 5, seed: 1 }, workers: 2 });
    const b = await fitForest(table, { target: 'label', params: { trees: 5, seed: 2 }, workers: 2 });
    assert.notEqual(serializeModel(a.forest), serializeModel(b.forest));
  });

  it('averages class probabilities over trees (soft vote) and reports tree agreement', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 9 }, workers: 2 });
    const pred = predictTable(rep.forest, table);
    const K = 3;
    for (let i = 0; i < 20; i++) {
      let sum = 0;
      for (let k = 0; k < K; k++) sum += pred.proba![i * K + k];
      assert.ok(Math.abs(sum - 1) < 1e-6);
      let agree = 0;
      for (let t = 0; t < 9; t++) if (pred.votes[t * table.rowCount + i] === pred.predicted[i]) agree++;
      assert.equal(pred.agreement![i], agree / 9);
    }
  });

  it('scores the same on scoring threads as in-process, votes included', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 40 }, workers: 2 });
    const big = threeClass(12000, 8, 'scoring rows');
    const x = encodeTable(rep.forest.schema, big);
    const a = predictEncoded(rep.forest, x, big.rowCount);
    const b = await predictInWorkers(rep.forest, x, big.rowCount, 3);
    assert.deepEqual(b.proba, a.proba);
    assert.deepEqual(b.votes, a.votes);
    assert.deepEqual(b.agreement, a.agreement);
    assert.deepEqual(b.predicted, a.predicted);
  });

  it('draws bootstrap membership again from the seed, and out-of-bag means only trees that did not see the row', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 15 }, workers: 2 });
    const { rows, forest } = rep;
    const n = rows.count;
    const inBag = inBagCounts(forest.params, 15, n);
    const x = encodeTable(forest.schema, table);
    const p = forest.schema.features.length;
    const K = 3;
    for (let i = 0; i < n; i++) {
      // The out-of-bag probability is the mean of exactly the trees whose redrawn sample left the row out.
      const expected = new Float64Array(K);
      let oob = 0;
      for (let t = 0; t < 15; t++) {
        if (inBag[t * n + i] !== 0) continue;
        oob++;
        const tree = forest.trees[t];
        const leaf = leafOf(tree, levelCounts(forest.schema), x, rep.trainRows[i] * p);
        for (let k = 0; k < K; k++) expected[k] += tree.value[leaf * K + k];
      }
      assert.equal(rows.oobTrees[i], oob);
      for (let k = 0; k < K; k++) assert.ok(Math.abs(rows.oobProba![i * K + k] - (oob ? expected[k] / oob : 0)) < 1e-12, `row ${i}`);
    }
    assert.equal(rows.inBag, undefined, 'not kept unless asked for');
    const kept = await fitForest(table, { target: 'label', params: { trees: 15 }, workers: 2, keepInBag: true });
    assert.deepEqual(kept.rows.inBag, inBag, 'the draws kept while fitting are the ones drawn again from the seed');
    // A bootstrap draw of n from n leaves about 1/e of the rows out (common practice: 0.368).
    let out = 0;
    for (const c of inBag) if (c === 0) out++;
    assert.ok(Math.abs(out / inBag.length - Math.exp(-1)) < 0.03);
  });

  it('draws an OOB error curve that settles as trees are added', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 60 }, workers: 2 });
    assert.equal(rep.curve.length, 60);
    const late = rep.curve[59];
    assert.ok(rep.oob.kind === 'classification' && Math.abs(late - (1 - rep.oob.accuracy)) < 1e-12);
    assert.ok(rep.curve[0] > late, `first ${rep.curve[0]} last ${late}`);
  });

  it('flags planted label errors by a negative out-of-bag margin (Breiman 2001)', async () => {
    // Two well-separated clusters; five rows carry the other cluster's label.
    const x = Array.from({ length: 200 }, (_, i) => (i < 100 ? i / 100 : 5 + i / 100));
    const y = x.map((v) => (v < 3 ? 'left' : 'right'));
    const planted = [3, 40, 77, 120, 190];
    for (const r of planted) y[r] = y[r] === 'left' ? 'right' : 'left';
    const rep = await fitForest(tableFrom({ x, y }), { target: 'y', params: { trees: 50 }, workers: 2 });
    const flagged = rep.suspects.map((s) => rep.trainRows[s.index]);
    // Full-depth trees also unsettle a planted row's neighbours a little; the planted rows are the most doubtful.
    assert.deepEqual(flagged.slice(0, planted.length).sort((a, b) => a - b), planted);
    assert.ok(rep.suspects.slice(0, planted.length).every((s) => s.score < -0.5));
  });

  it('scores a holdout and a separate test table the same way', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 30 }, workers: 2, holdout: 0.25 });
    assert.equal(rep.holdoutRows!.length + rep.trainRows.length, table.rowCount);
    assert.ok(rep.test!.kind === 'classification' && rep.test!.rows === 150 && rep.test!.accuracy > 0.6);
    const test = threeClass(200, 8, 'another draw');
    const rep2 = await fitForest(table, { target: 'label', params: { trees: 30 }, workers: 2, test });
    assert.ok(rep2.test!.kind === 'classification' && rep2.test!.rows === 200);
  });

  it('weights classes by n / (K n_k) when asked, which lifts recall of a rare class', async () => {
    const x = Array.from({ length: 400 }, (_, i) => ((i * 7919) % 400) / 400);
    const y = x.map((v, i) => (v > 0.9 && i % 2 === 0 ? 'rare' : v > 0.8 && i % 5 === 0 ? 'rare' : 'common'));
    const t = tableFrom({ x, noise: x.map((_, i) => (i * 31) % 17), y });
    const plain = await fitForest(t, { target: 'y', params: { trees: 40, minLeaf: 10 }, workers: 2 });
    const balanced = await fitForest(t, { target: 'y', params: { trees: 40, minLeaf: 10, classWeight: 'balanced' }, workers: 2 });
    const recall = (r: typeof plain) => (r.oob.kind === 'classification' ? r.oob.perClass.find((c) => c.label === 'rare')!.recall : NaN);
    assert.ok(recall(balanced) > recall(plain), `balanced ${recall(balanced)} plain ${recall(plain)}`);
  });

  it('stops when cancelled, within about one tree, and rejects with an AbortError', async () => {
    const big = threeClass(3000, 10);
    const controller = new AbortController();
    let seen = 0;
    const run = fitForest(big, {
      target: 'label',
      params: { trees: 400 },
      workers: 2,
      signal: controller.signal,
      onProgress: (done) => {
        seen = done;
        if (done === 3) controller.abort();
      },
    });
    await assert.rejects(run, (e: Error) => e.name === 'AbortError');
    assert.ok(seen < 10, `progress went on to ${seen} trees`);
  });

  it('refuses a target with a single value and an unknown target', async () => {
    await assert.rejects(fitForest(tableFrom({ x: [1, 2, 3], y: ['a', 'a', 'a'] }), { target: 'y' }), /single value/);
    await assert.rejects(fitForest(tableFrom({ x: [1, 2, 3], y: ['a', 'b', 'a'] }), { target: 'z' }), /no column "z"/);
  });
});
