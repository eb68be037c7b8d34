// A training row explained by the trees that never drew it, as the explanation thread and the session's cache
// serve it. Core's additivity is checked in test/core/explain/tree-subsets.test.ts; here the question is whether
// the host sends the right training position, the thread picks that row's out-of-bag trees from the counts it
// was given once, and the answers for all trees and for out-of-bag trees are kept apart.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import type { LoadResult } from '../../src/core/csv/types';
import { ContributionExplainer } from '../../src/core/explain/contributions';
import { outOfBagTrees } from '../../src/core/forest/bootstrap';
import { fitForest, type FitReport } from '../../src/core/forest/fit';
import { encodeTable, leafOf, levelCounts } from '../../src/core/forest/predict';
import { Explanations, outputsOf } from '../../src/extension/session/explanations';
import { ExplainClient, type ExplainerLike } from '../../src/extension/workers/explainClient';
import { ExplainState, type ExplainRequest, type ExplainSetup } from '../../src/extension/workers/explainJobs';

const FIXTURES = path.resolve(__dirname, '..', '..', '..', 'test', 'fixtures', 'open');

/** A fit as the editor makes one: the draws kept, and the whole table encoded. */
interface Fitted {
  load: LoadResult;
  report: FitReport;
  encoded: Float64Array;
}

async function fitFile(file: string, target: string, params: { trees: number; seed: number }, holdout?: number): Promise<Fitted> {
  const load = await loadCsv(path.join(FIXTURES, file));
  const report = await fitForest(load.table, { target, params, workers: 2, holdout, keepInBag: true, permutationImportance: false });
  return { load, report, encoded: encodeTable(report.forest.schema, load.table) };
}

const close = (a: number, b: number, tol = 1e-9) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(a), Math.abs(b));

/** The thread's answers computed in-process, counting the requests that reach it. */
function inProcess(setup: ExplainSetup): { explainer: ExplainerLike; requests: ExplainRequest[] } {
  const state = new ExplainState(setup);
  const requests: ExplainRequest[] = [];
  const explainer: ExplainerLike = {
    run: (request) => {
      requests.push(request);
      return Promise.resolve(state.handle(request) as never);
    },
    dispose: () => Promise.resolve(),
  };
  return { explainer, requests };
}

function setupOf(f: Fitted, inBag?: Uint8Array): ExplainSetup {
  const { forest } = f.report;
  const p = forest.schema.features.length;
  const all = f.encoded;
  const rows = f.report.trainRows;
  const trainX = new Float64Array(rows.length * p);
  rows.forEach((r, i) => trainX.set(all.subarray(r * p, r * p + p), i * p));
  return { forest, trainX, trainCount: rows.length, quantiles: null, inBag };
}

describe('out-of-bag explanations on the explanation thread (iris, classification, with a holdout)', function () {
  this.timeout(120_000);
  let f: Fitted;
  before(async () => {
    f = await fitFile('iris.csv', 'species', { trees: 30, seed: 5 }, 0.2);
  });

  it('explains each training row over the trees that never drew it, adding up to its out-of-bag probabilities', () => {
    const { forest, rows } = f.report;
    const state = new ExplainState(setupOf(f, rows.inBag));
    const setup = setupOf(f);
    const p = forest.schema.features.length;
    const n = setup.trainCount;
    const T = forest.trees.length;
    const K = 3;
    const counts = levelCounts(forest.schema);
    // Every training row in one request, and one row asked for over all trees, to see the two mixed.
    const positions = Int32Array.from({ length: n + 1 }, (_, i) => (i < n ? i : -1));
    const x = new Float64Array((n + 1) * p);
    x.set(setup.trainX);
    x.set(setup.trainX.subarray(0, p), n * p);
    const c = state.handle({ kind: 'contributions', x, rows: n + 1, outOfBag: positions });
    let worst = 0;
    for (let i = 0; i < n; i++) {
      const trees = outOfBagTrees(rows.inBag!, T, n, i);
      assert.equal(c.trees[i], trees.length || T);
      assert.equal(c.outOfBag[i], trees.length ? 1 : 0);
      if (!trees.length) continue;
      const sum = outputsOf(c, i);
      // Walked tree by tree with the scorer's walk, independently of the explainer.
      const mean = new Float64Array(K);
      for (const t of trees) {
        const leaf = leafOf(forest.trees[t], counts, x, i * p);
        for (let k = 0; k < K; k++) mean[k] += forest.trees[t].value[leaf * K + k] / trees.length;
      }
      for (let k = 0; k < K; k++) {
        worst = Math.max(worst, Math.abs(sum[k] - mean[k]), Math.abs(sum[k] - rows.oobProba![i * K + k]));
      }
    }
    assert.ok(worst < 1e-9, `largest gap ${worst}`);
    const whole = new ContributionExplainer(forest);
    assert.equal(c.outOfBag[n], 0);
    assert.equal(c.trees[n], T);
    assert.deepEqual(c.values.subarray(n * p * K), whole.explainRow(setup.trainX, 0));
    assert.deepEqual(c.base.subarray(n * K), whole.base);
  });

  it('answers over all trees, and says why, when it was given no bootstrap counts', () => {
    const setup = setupOf(f);
    const c = new ExplainState(setup).handle({ kind: 'contributions', x: setup.trainX.slice(0, 4), rows: 1, outOfBag: Int32Array.of(0) });
    assert.equal(c.outOfBag[0], 0);
    assert.equal(c.trees[0], f.report.forest.trees.length);
    assert.match(c.note!, /not known here, so all trees were used/);
    assert.throws(() => new ExplainState(setupOf(f, new Uint8Array(7))), /in-bag counts have 7 entries/);
  });

  it('keeps a row’s out-of-bag answer apart from its all-trees one, and asks the thread once for each', async () => {
    const { forest, rows, trainRows, holdoutRows } = f.report;
    const { explainer, requests } = inProcess(setupOf(f, rows.inBag));
    const e = new Explanations(forest, explainer, f.encoded, f.load.table.rowCount, trainRows, 1);
    const position = 12;
    const r = trainRows[position];
    const oob = await e.rowContributions(r, 'now', undefined, 'out-of-bag');
    const all = await e.rowContributions(r, 'now');
    assert.equal(requests.length, 2);
    assert.equal(await e.rowContributions(r, 'idle', undefined, 'out-of-bag'), oob);
    assert.equal(await e.rowContributions(r, 'idle'), all);
    assert.equal(requests.length, 2, 'both answers are cached');
    assert.deepEqual((requests[0] as { outOfBag?: Int32Array }).outOfBag, Int32Array.of(position), 'the training position, not the table row');
    assert.equal(oob.outOfBag[0], 1);
    assert.equal(oob.trees[0], rows.oobTrees[position]);
    assert.equal(all.outOfBag[0], 0);
    assert.equal(all.trees[0], forest.trees.length);

    const truth = rows.truth[position];
    const shown = e.explanationOf(oob, truth);
    assert.equal(shown.outOfBag, true);
    assert.equal(shown.trees, rows.oobTrees[position]);
    assert.ok(close(shown.prediction, rows.oobProba![position * 3 + truth]), `${shown.prediction} vs ${rows.oobProba![position * 3 + truth]}`);
    assert.ok(close(shown.base + shown.values.reduce((a, v) => a + v, 0), shown.prediction));

    // A held-out row was drawn by no tree: its out-of-bag trees are all of them, computed once.
    const held = holdoutRows![0];
    const before = requests.length;
    const heldAll = await e.rowContributions(held, 'now');
    const heldOob = await e.rowContributions(held, 'now', undefined, 'out-of-bag');
    assert.equal(requests.length, before + 1);
    assert.equal(heldOob.outOfBag[0], 1);
    assert.equal(heldOob.trees[0], forest.trees.length);
    assert.deepEqual(heldOob.values, heldAll.values);
  });
});

describe('out-of-bag explanations on a real explanation thread (diabetes, regression)', function () {
  this.timeout(120_000);
  let f: Fitted;
  let e: Explanations;
  before(async () => {
    f = await fitFile('diabetes.csv', 'progression', { trees: 20, seed: 2 });
    // As the editor starts it after a regression fit: the report rides along for intervals, the counts with it.
    const setup = { ...setupOf(f), forest: undefined, quantiles: { from: 'fit' as const, report: f.report, table: f.load.table } };
    e = new Explanations(f.report.forest, new ExplainClient(setup), f.encoded, f.load.table.rowCount, f.report.trainRows, 2);
  });
  after(async () => e?.dispose());

  it('takes the fit’s own bootstrap counts when the setup has none, and adds up to the out-of-bag value', async () => {
    const { rows, trainRows } = f.report;
    let checked = 0;
    for (const position of [0, 41, 200, 441]) {
      if (rows.oobTrees[position] === 0) continue;
      const c = await e.rowContributions(trainRows[position], 'now', undefined, 'out-of-bag');
      const shown = e.explanationOf(c, null);
      assert.equal(shown.outOfBag, true);
      assert.equal(shown.trees, rows.oobTrees[position]);
      assert.ok(close(shown.prediction, rows.oobValue![position]), `${shown.prediction} vs ${rows.oobValue![position]}`);
      checked++;
    }
    assert.ok(checked >= 3);
  });
});
