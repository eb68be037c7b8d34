// Fit report → panel summary: plain JSON the protocol guard accepts, NaN turned into null.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { isFitSummary, isHostToPanel } from '../../src/protocol/messages';
import { quantile, residualSummary } from '../../src/core/summary/parts';
import { impurityFromTrees } from '../../src/core/explain/impurity';
import { summarizeOpened } from '../../src/core/summary/opened';
import { trainingRowsIn } from '../../src/core/forest/membership';
import { membershipOf } from '../../src/core/forest/row-votes';
import { predictEncoded } from '../../src/core/forest/predict';
import { panelSummary } from '../../src/extension/summary/panel';
import { statusText } from '../../src/extension/statusText';
import { fitLogLines } from '../../src/extension/fit/fitLog';
import { FIXTURES, fitFixture, type Fitted } from './helpers';

describe('extension summary', () => {
  let iris: Fitted;
  let reg: Fitted;
  before(async () => {
    iris = await fitFixture(path.join(FIXTURES, 'iris.csv'), 'species', { trees: 30, seed: 2 });
    reg = await fitFixture(path.join(FIXTURES, 'diabetes.csv'), 'progression', { trees: 20, seed: 2 }, { holdout: 0.25 });
  });
  after(async () => {
    await iris?.session.dispose();
    await reg?.session.dispose();
  });

  it('builds a classification summary the protocol accepts and that survives JSON', () => {
    const s = iris.session.summary;
    assert.ok(isFitSummary(s));
    assert.ok(isHostToPanel({ type: 'summary', fit: s.fit, summary: JSON.parse(JSON.stringify(s)) as unknown }));
    assert.ok(!isHostToPanel({ type: 'summary', fit: 'another fit', summary: s }), 'a summary names its own fit');
    assert.equal(s.trees, 30);
    assert.deepEqual(s.classes, ['setosa', 'versicolor', 'virginica']);
    assert.equal(s.curve.length, 30);
    assert.equal(s.oob?.kind, 'classification');
    const total = s.importance.reduce((a, m) => a + m.impurity, 0);
    assert.ok(Math.abs(total - 1) < 1e-9);
    assert.equal(s.heldOut, null);
  });

  it('builds a regression summary with held-out scores and OOB residual quartiles', () => {
    const s = reg.session.summary;
    assert.ok(isFitSummary(s));
    assert.equal(s.heldOut?.from, 'holdout');
    assert.equal(s.rowsUsed, 442, 'training plus held-out rows: all of the diabetes data (Efron et al. 2004)');
    const oob = s.oob;
    assert.ok(oob?.kind === 'regression' && oob.residuals);
    if (oob?.kind === 'regression' && oob.residuals) {
      const r = oob.residuals;
      assert.ok(r.min <= r.q1 && r.q1 <= r.median && r.median <= r.q3 && r.q3 <= r.max);
    }
  });

  it('uses R\'s default quantile rule (type 7; Hyndman and Fan 1996)', () => {
    // R: quantile(1:10) gives 1.00 3.25 5.50 7.75 10.00 (from memory; type 7 is h = (n - 1) q + 1, interpolated).
    const xs = Array.from({ length: 10 }, (_, i) => i + 1);
    assert.deepEqual([0, 0.25, 0.5, 0.75, 1].map((q) => quantile(xs, q)), [1, 3.25, 5.5, 7.75, 10]);
    assert.deepEqual(residualSummary(Float64Array.from([1, 2, NaN]), Float64Array.from([0, 0, 0])), { min: 1, q1: 1.25, median: 1.5, q3: 1.75, max: 2 });
  });

  it('reads impurity importance back from saved trees as core measured it while fitting', () => {
    for (const f of [iris, reg]) {
      const fromTrees = impurityFromTrees(f.report.forest);
      const core = f.report.importance.impurity;
      // Trees store node values and covers as 32-bit floats, so agreement is to about six digits.
      fromTrees.forEach((v, k) => assert.ok(Math.abs(v - core[k]) < 1e-5, `${f.file} feature ${k}: ${v} vs ${core[k]}`));
      const order = (a: ArrayLike<number>) => Array.from(a, (v, k) => [v, k]).sort((x, y) => y[0] - x[0]).map((e) => e[1]);
      assert.deepEqual(order(fromTrees).slice(0, 3), order(core).slice(0, 3));
    }
  });

  it('shows an opened forest against its own training file with the fit\'s own out-of-bag scores and doubtful rows', () => {
    const forest = { ...iris.report.forest, training: { ...iris.report.forest.training, fingerprint: iris.load.fingerprint } };
    const table = iris.load.table;
    const training = trainingRowsIn(forest, table, iris.load.fingerprint);
    assert.ok('trainRows' in training, 'the training rows are recovered from the seed');
    if (!('trainRows' in training)) return;
    assert.deepEqual(Array.from(training.trainRows), Array.from(iris.report.trainRows));
    assert.deepEqual(training.inBag, iris.report.rows.inBag, 'the same bootstrap draws as the fit');
    const membership = membershipOf(training.trainRows, table.rowCount, training.inBag);
    const prediction = predictEncoded(forest, iris.session.encoded, table.rowCount, membership);
    const base = { forest, table, prediction, truth: iris.session.truth, file: 'iris.csv', rowsRead: 150, sampled: false };
    const same = summarizeOpened({ ...base, fingerprint: iris.load.fingerprint, training });
    assert.equal(same.oob?.accuracy, iris.report.oob.kind === 'classification' ? iris.report.oob.accuracy : NaN, 'bit for bit the fit\'s out-of-bag accuracy');
    assert.equal(same.oob?.logLoss, iris.report.oob.kind === 'classification' ? iris.report.oob.logLoss : NaN);
    assert.equal(same.suspectCount, iris.report.suspects.length);
    assert.deepEqual(
      same.suspects.map((r) => r.row),
      iris.report.suspects.map((d) => iris.report.trainRows[d.index] + 1),
    );
    assert.ok(isFitSummary(panelSummary(same, { fit: 'f', uri: 'file:///iris.csv' })));
    // Read another way (here: a forest that says it held rows out), the training rows cannot be told apart: no in-sample scores.
    const shifted = { ...forest, training: { ...forest.training, heldOut: 10 } };
    const unknown = trainingRowsIn(shifted, table, iris.load.fingerprint);
    assert.ok('unknown' in unknown);
    const blind = summarizeOpened({ ...base, forest: shifted, prediction: predictEncoded(shifted, iris.session.encoded, 150), fingerprint: iris.load.fingerprint, training: unknown });
    assert.equal(blind.oob, null);
    assert.equal(blind.test, undefined);
    assert.equal(blind.suspectCount, null);
    assert.ok(blind.warnings.some((w) => /in-sample/.test(w)));
    const other = summarizeOpened({ ...base, prediction: predictEncoded(forest, iris.session.encoded, 150), fingerprint: 'another file', training: trainingRowsIn(forest, table, 'another file') });
    assert.equal(other.testFrom, 'file');
    assert.equal(other.oob, null);
    assert.deepEqual(other.curve, []);
    assert.ok(other.test?.accuracy !== undefined && other.test.accuracy > 0.9);
  });

  it('names the forest in the status bar and logs parameters, notes and timings', () => {
    const st = statusText(iris.session.summary);
    assert.match(st.text, /^\$\(list-tree\) 30 trees · OOB \d+\.\d%$/);
    assert.match(st.tooltip, /predicting species \(classification\) from iris\.csv/);
    const lines = fitLogLines({
      path: iris.file,
      load: iris.load,
      tableRows: 150,
      sampled: false,
      params: iris.report.forest.params,
      exclude: ['sepal_width'],
      holdout: 0,
      workers: 0,
      fitNotes: ['a fit note'],
      summary: iris.session.summary,
      seconds: { load: 0.01, fit: 0.5, score: 0.02, summary: 0.001 },
    });
    const text = lines.join('\n');
    assert.match(text, /parameters: trees 30, features per split sqrt, impurity gini/);
    assert.match(text, /left out by choice: sepal_width/);
    assert.match(text, /fit note: a fit note/);
    assert.match(text, /timings: read 10 ms, fit 500 ms/);
    assert.doesNotMatch(text, /n_estimators|max_features|mtry/);
  });
});
