// Per-feature contributions (path-dependent TreeSHAP, Lundberg, Erion, Chen et al. 2020, Nature Machine
// Intelligence 2, 56-67) against Shapley values computed by brute force over every feature subset
// (Shapley 1953), and local accuracy on open datasets (iris: Fisher 1936; diabetes: Efron et al. 2004).
import * as assert from 'node:assert/strict';
import { ContributionExplainer, explainRows, meanAbsoluteContributions } from '../../../src/core/explain/contributions';
import { fitForest } from '../../../src/core/forest/fit';
import type { Forest } from '../../../src/core/forest/forest';
import { encodeTable, leafOf, levelCounts, predictEncoded } from '../../../src/core/forest/predict';
import { childShares, goesLeft } from '../../../src/core/explain/routing';
import { tableFrom } from '../helpers/table';
import { bruteShapley } from './helpers/brute-force';
import { mixed, openDataset } from './helpers/data';

function forestOutputs(forest: Forest, x: Float64Array, rows: number): Float64Array {
  const pred = predictEncoded(forest, x, rows);
  return pred.proba ?? pred.value!;
}

/** Rows of the training table plus hand-made ones: all missing, an unseen level, a level code past the end. */
function probeRows(forest: Forest, x: Float64Array, rows: number): { x: Float64Array; rows: number } {
  const p = forest.schema.features.length;
  const extra = [new Array(p).fill(NaN)];
  const colour = forest.schema.features.findIndex((f) => f.name === 'colour');
  if (colour >= 0) {
    const unseen = Array.from(x.subarray(0, p));
    unseen[colour] = NaN;
    const past = Array.from(x.subarray(p, 2 * p));
    past[colour] = forest.schema.features[colour].levels!.length + 3;
    extra.push(unseen, past);
  }
  const out = new Float64Array((rows + extra.length) * p);
  out.set(x.subarray(0, rows * p));
  extra.forEach((r, i) => out.set(r, (rows + i) * p));
  return { x: out, rows: rows + extra.length };
}

describe('contributions (TreeSHAP)', function () {
  this.timeout(120000);

  for (const task of ['classification', 'regression'] as const) {
    it(`equal brute-force Shapley values over all 2^p subsets, ${task}, with missing cells and level sets`, async () => {
      const table = mixed(300);
      const target = task === 'classification' ? 'label' : 'value';
      const other = task === 'classification' ? 'value' : 'label';
      const rep = await fitForest(table, { target, exclude: [other], params: { trees: 6, seed: 3, featuresPerSplit: 'all' }, workers: 1, permutationImportance: false });
      const forest = rep.forest;
      // The forest must actually split on level sets and send missing cells somewhere, or the check is weak.
      const cat = forest.schema.features.findIndex((f) => f.name === 'colour');
      assert.ok(forest.trees.some((t) => Array.from(t.feature).includes(cat)), 'no split on colour');
      const all = encodeTable(forest.schema, table);
      const probe = probeRows(forest, all, 40);
      const p = forest.schema.features.length;
      const K = task === 'classification' ? 3 : 1;
      const explainer = new ContributionExplainer(forest);
      let worst = 0;
      for (let i = 0; i < probe.rows; i++) {
        const fast = explainer.explainRow(probe.x, i * p);
        const slow = bruteShapley(forest, probe.x, i * p);
        for (let k = 0; k < K; k++) assert.ok(Math.abs(explainer.base[k] - slow.base[k]) < 1e-12, `base ${explainer.base[k]} vs ${slow.base[k]}`);
        for (let j = 0; j < p * K; j++) worst = Math.max(worst, Math.abs(fast[j] - slow.phi[j]));
      }
      assert.ok(worst < 1e-10, `largest difference ${worst}`);
    });
  }

  it('match brute force when a feature is split on again below itself (the unwinding step)', async () => {
    // One informative feature and full-depth trees: paths split on it many times over.
    const x = Array.from({ length: 200 }, (_, i) => ((i * 37) % 200) / 200);
    const z = Array.from({ length: 200 }, (_, i) => ((i * 91) % 200) / 200);
    const y = x.map((v, i) => Math.sin(6 * v) + 0.3 * z[i]);
    const rep = await fitForest(tableFrom({ x, z, y }), { target: 'y', params: { trees: 4, featuresPerSplit: 'all' }, workers: 1, permutationImportance: false });
    const tree = rep.forest.trees[0];
    let repeats = 0;
    const parentFeature = new Int32Array(tree.nodeCount).fill(-1);
    for (let n = 0; n < tree.nodeCount; n++) {
      if (tree.left[n] < 0) continue;
      if (parentFeature[n] === tree.feature[n]) repeats++;
      parentFeature[tree.left[n]] = tree.feature[n];
      parentFeature[tree.right[n]] = tree.feature[n];
    }
    assert.ok(repeats > 10, `only ${repeats} repeated splits`);
    const enc = encodeTable(rep.forest.schema, tableFrom({ x, z, y }));
    const explainer = new ContributionExplainer(rep.forest);
    for (let i = 0; i < 200; i += 7) {
      const fast = explainer.explainRow(enc, i * 2);
      const slow = bruteShapley(rep.forest, enc, i * 2);
      for (let j = 0; j < 2; j++) assert.ok(Math.abs(fast[j] - slow.phi[j]) < 1e-10, `row ${i} feature ${j}: ${fast[j]} vs ${slow.phi[j]}`);
    }
  });

  it('walk each row to the leaf the scorer reaches (same routing as leafOf)', async () => {
    const table = mixed(300, 'routing');
    const rep = await fitForest(table, { target: 'label', exclude: ['value'], params: { trees: 10 }, workers: 1, permutationImportance: false });
    const forest = rep.forest;
    const counts = levelCounts(forest.schema);
    const probe = probeRows(forest, encodeTable(forest.schema, table), 300);
    const p = forest.schema.features.length;
    for (const tree of forest.trees) {
      for (let i = 0; i < probe.rows; i++) {
        let node = 0;
        while (tree.left[node] >= 0) {
          const f = tree.feature[node];
          node = goesLeft(tree, node, counts[f], probe.x[i * p + f]) ? tree.left[node] : tree.right[node];
        }
        assert.equal(node, leafOf(tree, counts, probe.x, i * p));
      }
    }
  });

  for (const [file, target] of [['iris.csv', 'species'], ['diabetes.csv', 'progression']] as const) {
    it(`add up to the forest's prediction on every row of ${file} (local accuracy, to 1e-9)`, async () => {
      const table = await openDataset(file, target);
      const rep = await fitForest(table, { target, params: { trees: 40, seed: 11 }, workers: 2, permutationImportance: false });
      const forest = rep.forest;
      const x = encodeTable(forest.schema, table);
      const n = table.rowCount;
      const c = explainRows(forest, x, n);
      const pred = forestOutputs(forest, x, n);
      const { features: p, outputs: K } = c;
      let worst = 0;
      for (let i = 0; i < n; i++) {
        for (let k = 0; k < K; k++) {
          let sum = c.base[k];
          for (let j = 0; j < p; j++) sum += c.contributions[(i * p + j) * K + k];
          worst = Math.max(worst, Math.abs(sum - pred[i * K + k]));
        }
      }
      assert.ok(worst < 1e-9, `largest gap ${worst}`);
      // The base value is the forest's mean over the in-bag training distribution, not a free constant.
      for (let k = 0; k < K; k++) {
        let e = 0;
        for (const tree of forest.trees) {
          let s = 0;
          for (let node = 0; node < tree.nodeCount; node++) if (tree.left[node] < 0) s += tree.cover[node] * tree.value[node * K + k];
          e += s / tree.cover[0];
        }
        assert.ok(Math.abs(c.base[k] - e / forest.trees.length) < 1e-9);
      }
      if (K > 1) {
        // Probabilities sum to 1, so each feature's contributions over the classes sum to 0.
        for (let i = 0; i < n; i++) for (let j = 0; j < p; j++) {
          let s = 0;
          for (let k = 0; k < K; k++) s += c.contributions[(i * p + j) * K + k];
          assert.ok(Math.abs(s) < 1e-9);
        }
      }
    });
  }

  it('rank the features that drive iris above the sepal measurements in the global view', async () => {
    // Fisher's iris: petal length and width separate the species; every published analysis agrees (common practice).
    const table = await openDataset('iris.csv', 'species');
    const rep = await fitForest(table, { target: 'species', params: { trees: 100, seed: 5 }, workers: 2, permutationImportance: false });
    const x = encodeTable(rep.forest.schema, table);
    const g = meanAbsoluteContributions(explainRows(rep.forest, x, table.rowCount));
    const names = rep.forest.schema.features.map((f) => f.name);
    const order = names.map((n, j) => [n, g.overall[j]] as const).sort((a, b) => b[1] - a[1]).map(([n]) => n);
    assert.deepEqual(order.slice(0, 2).sort(), ['petal_length', 'petal_width']);
    for (let j = 0; j < names.length; j++) {
      let s = 0;
      for (let k = 0; k < 3; k++) s += g.perOutput[j * 3 + k];
      assert.ok(Math.abs(s - g.overall[j]) < 1e-12);
    }
  });

  it('give a feature no tree splits on exactly zero, and split a node without cover evenly', async () => {
    const table = mixed(200, 'zero');
    const rep = await fitForest(table, { target: 'value', exclude: ['label'], params: { trees: 5, maxDepth: 1, featuresPerSplit: 'all' }, workers: 1, permutationImportance: false });
    const forest = rep.forest;
    const used = new Set(forest.trees.flatMap((t) => Array.from(t.feature).filter((f) => f >= 0)));
    const x = encodeTable(forest.schema, table);
    const c = explainRows(forest, x, 50);
    const p = forest.schema.features.length;
    for (let j = 0; j < p; j++) if (!used.has(j)) for (let i = 0; i < 50; i++) assert.equal(c.contributions[i * p + j], 0);
    assert.ok(used.size < p);
    const t = forest.trees[0];
    const shares = childShares({ ...t, cover: new Float32Array(t.nodeCount) });
    assert.equal(shares.left[0], 0.5);
    assert.equal(shares.right[0], 0.5);
  });
});
