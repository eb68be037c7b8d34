// Contributions over a chosen set of trees, above all a training row's out-of-bag trees: the honest account of
// a training row, since most trees memorised it. Checked against each tree walked on its own with core's scoring
// walk (leafOf), against the fit's own out-of-bag fold (which walks binned rows while training, a separate
// path), and against brute-force Shapley values for one tree (Shapley 1953; path-dependent TreeSHAP: Lundberg,
// Erion, Chen et al. 2020). The data are our own seeded tables (helpers/data.ts).
import * as assert from 'node:assert/strict';
import { ContributionExplainer } from '../../../src/core/explain/contributions';
import { inBagCounts, outOfBagTrees } from '../../../src/core/forest/bootstrap';
import { fitForest, type FitReport } from '../../../src/core/forest/fit';
import type { Forest } from '../../../src/core/forest/forest';
import { encodeTable, leafOf, levelCounts } from '../../../src/core/forest/predict';
import { outputCount } from '../../../src/core/base/schema';
import { bruteShapley } from './helpers/brute-force';
import { mixed } from './helpers/data';

/** The listed trees' mean output for the row at x[offset], each tree walked to its leaf by the scorer's walk. */
function meanOverTrees(forest: Forest, trees: ArrayLike<number>, x: Float64Array, offset: number): Float64Array {
  const K = outputCount(forest.schema.target);
  const counts = levelCounts(forest.schema);
  const out = new Float64Array(K);
  for (let i = 0; i < trees.length; i++) {
    const tree = forest.trees[trees[i]];
    const leaf = leafOf(tree, counts, x, offset);
    for (let k = 0; k < K; k++) out[k] += tree.value[leaf * K + k];
  }
  for (let k = 0; k < K; k++) out[k] /= trees.length;
  return out;
}

/** The training rows, encoded row-major in training order. */
function trainingX(report: FitReport, table: ReturnType<typeof mixed>): Float64Array {
  const p = report.forest.schema.features.length;
  const all = encodeTable(report.forest.schema, table);
  const x = new Float64Array(report.trainRows.length * p);
  report.trainRows.forEach((r, i) => x.set(all.subarray(r * p, r * p + p), i * p));
  return x;
}

describe('contributions over a set of trees', function () {
  this.timeout(120000);

  for (const task of ['classification', 'regression'] as const) {
    it(`over a training row's out-of-bag trees add up to its out-of-bag prediction, ${task} (to 1e-9)`, async () => {
      const table = mixed(240, `subsets-${task}`);
      const target = task === 'classification' ? 'label' : 'value';
      const other = task === 'classification' ? 'value' : 'label';
      // A holdout, so training positions differ from table rows and a mix-up between the two would show.
      const report = await fitForest(table, { target, exclude: [other], holdout: 0.2, params: { trees: 25, seed: 7 }, workers: 2, permutationImportance: false, keepInBag: true });
      const { forest } = report;
      const n = report.trainRows.length;
      const T = forest.trees.length;
      const p = forest.schema.features.length;
      const K = outputCount(forest.schema.target);
      const inBag = report.rows.inBag!;
      // The draws the fit kept are the ones the seed gives again (what saved models and the CLI rely on).
      assert.deepEqual(inBagCounts(forest.params, T, n), inBag);
      const x = trainingX(report, table);
      const explainer = new ContributionExplainer(forest);
      const phi = new Float64Array(p * K);
      const oobFit = report.rows.oobProba ?? report.rows.oobValue!;
      let worst = 0;
      let worstFold = 0;
      let explained = 0;
      for (let i = 0; i < n; i++) {
        const trees = outOfBagTrees(inBag, T, n, i);
        assert.equal(trees.length, report.rows.oobTrees[i], `row ${i}: out-of-bag tree count`);
        if (trees.length === 0) continue;
        explained++;
        explainer.explainRow(x, i * p, phi, trees);
        const base = explainer.baseOver(trees);
        const mean = meanOverTrees(forest, trees, x, i * p);
        for (let k = 0; k < K; k++) {
          let sum = base[k];
          for (let j = 0; j < p; j++) sum += phi[j * K + k];
          worst = Math.max(worst, Math.abs(sum - mean[k]));
          worstFold = Math.max(worstFold, Math.abs(sum - oobFit[i * K + k]));
        }
      }
      assert.ok(explained > 0.9 * n, `only ${explained} of ${n} rows had an out-of-bag tree`);
      assert.ok(worst < 1e-9, `largest gap to the mean of the out-of-bag trees ${worst}`);
      assert.ok(worstFold < 1e-9, `largest gap to the fit's out-of-bag prediction ${worstFold}`);
    });
  }

  it('over every tree are exactly the whole-forest contributions and base', async () => {
    const table = mixed(200, 'subsets-all');
    const report = await fitForest(table, { target: 'label', exclude: ['value'], params: { trees: 12, seed: 4 }, workers: 1, permutationImportance: false });
    const forest = report.forest;
    const x = encodeTable(forest.schema, table);
    const p = forest.schema.features.length;
    const explainer = new ContributionExplainer(forest);
    const all = Int32Array.from({ length: forest.trees.length }, (_, t) => t);
    assert.deepEqual(explainer.baseOver(all), explainer.base);
    for (let i = 0; i < 60; i++) assert.deepEqual(explainer.explainRow(x, i * p, undefined, all), explainer.explainRow(x, i * p));
  });

  it('over one tree are that tree’s own TreeSHAP values, which brute force confirms', async () => {
    const table = mixed(200, 'subsets-one');
    const report = await fitForest(table, { target: 'value', exclude: ['label'], params: { trees: 8, seed: 9, featuresPerSplit: 'all' }, workers: 1, permutationImportance: false });
    const forest = report.forest;
    const x = encodeTable(forest.schema, table);
    const p = forest.schema.features.length;
    const explainer = new ContributionExplainer(forest);
    let worst = 0;
    for (const t of [0, 3, 7]) {
      const alone: Forest = { ...forest, trees: [forest.trees[t]] };
      const single = new ContributionExplainer(alone);
      assert.deepEqual(explainer.baseOver([t]), single.base);
      for (let i = 0; i < 200; i += 9) {
        const mine = explainer.explainRow(x, i * p, undefined, [t]);
        assert.deepEqual(mine, single.explainRow(x, i * p));
        const slow = bruteShapley(alone, x, i * p);
        for (let j = 0; j < p; j++) worst = Math.max(worst, Math.abs(mine[j] - slow.phi[j]));
      }
    }
    assert.ok(worst < 1e-10, `largest difference from brute force ${worst}`);
  });

  it('refuse an empty set of trees and indices that name no tree', async () => {
    const report = await fitForest(mixed(80, 'subsets-bad'), { target: 'value', exclude: ['label'], params: { trees: 3 }, workers: 1, permutationImportance: false });
    const explainer = new ContributionExplainer(report.forest);
    const x = new Float64Array(explainer.features);
    assert.throws(() => explainer.explainRow(x, 0, undefined, []), /at least one tree/);
    assert.throws(() => explainer.baseOver([3]), /no tree 3; the forest has 3/);
    assert.throws(() => explainer.explainRow(x, 0, undefined, [0, -1]), /no tree -1/);
    assert.throws(() => outOfBagTrees(new Uint8Array(6), 3, 2, 2), /no training row 2/);
  });
});
