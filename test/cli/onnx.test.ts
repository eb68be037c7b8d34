// The scoring commands on ONNX files: a Copse export reads back as the model it came from, and a forest written
// outside Copse (scikit-learn 1.2.1 through onnx.helper, test/core/onnx/fixtures/make_sklearn_onnx.py) scores a
// CSV as scikit-learn itself did, once its positional features are named by the CSV's columns.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { SklearnPredictions } from '../core/onnx/helpers';
import { numberIn, type ClassExplainedRow, type ClassVoteRow, type ExplainJson, type PredictJson, type VotesJson } from './output';

const root = path.join(__dirname, '..', '..', '..');
const iris = path.join(root, 'test/fixtures/open/iris.csv');
const diabetes = path.join(root, 'test/fixtures/open/diabetes.csv');
const fixtures = path.join(root, 'test/core/onnx/fixtures');
const sklearnIris = path.join(fixtures, 'sklearn-iris.onnx');
const sklearnDiabetes = path.join(fixtures, 'sklearn-diabetes.onnx');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function json<T>(...args: string[]): T {
  const r = copse(...args, '--json');
  assert.equal(r.code, 0, r.stderr);
  return JSON.parse(r.stdout) as T;
}

describe('copse commands on ONNX files', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-cli-onnx-'));
  const model = path.join(dir, 'iris.json');
  const onnx = path.join(dir, 'iris.onnx');
  const reference = JSON.parse(readFileSync(path.join(fixtures, 'sklearn-predictions.json'), 'utf8')) as SklearnPredictions;

  before(() => {
    const fit = copse('fit', iris, '--target', 'species', '--trees', '30', '--seed', '3', '--save', model);
    assert.equal(fit.code, 0, fit.stderr);
    const exported = copse('export', model, onnx);
    assert.equal(exported.code, 0, exported.stderr);
  });

  it('votes and predictions from a Copse export equal those of the model file it came from', () => {
    const rows = ['--rows', '1,51,71,120,134'];
    const a = json<VotesJson<ClassVoteRow>>('votes', model, iris, ...rows);
    const b = json<VotesJson<ClassVoteRow>>('votes', onnx, iris, ...rows);
    assert.deepEqual(b.rows, a.rows);
    assert.match(b.warnings.join(' '), /Imported from an ONNX TreeEnsembleClassifier/);
    const pa = json<PredictJson>('predict', model, iris);
    const pb = json<PredictJson>('predict', onnx, iris);
    // The export rounds thresholds down to float32; iris's one-decimal values sit far from any threshold.
    assert.deepEqual(pb.predictions, pa.predictions);
  });

  it('scores a scikit-learn forest by position as scikit-learn did, and refuses to guess the columns', () => {
    const refused = copse('predict', sklearnIris, iris);
    assert.equal(refused.code, 2);
    assert.match(refused.stderr, /names its 4 features by position.*--by-position/);
    const ambiguous = copse('predict', sklearnIris, iris, '--by-position');
    assert.equal(ambiguous.code, 2);
    assert.match(ambiguous.stderr, /reads 4 features by position, but .* has 5 columns .*--leave-out species/);
    const out = json<PredictJson>('predict', sklearnIris, iris, '--by-position', '--leave-out', 'species');
    assert.equal(out.rows, 150);
    let largest = 0;
    out.predictions.forEach((p, i) => {
      reference.iris.classes.forEach((c, k) => (largest = Math.max(largest, Math.abs(numberIn(p, `probability_${c}`) - reference.iris.proba[i][k]))));
    });
    // scikit-learn's probabilities, recorded by make_sklearn_onnx.py; predict prints six decimals.
    assert.ok(largest <= 5e-7 + 1e-12, `largest difference ${largest}`);
  });

  it('regression by position matches scikit-learn, and intervals are refused without the training sample', () => {
    const out = json<PredictJson>('predict', sklearnDiabetes, diabetes, '--by-position', '--leave-out', reference.diabetes.target);
    let largest = 0;
    out.predictions.forEach((p, i) => (largest = Math.max(largest, Math.abs(numberIn(p, Object.keys(p)[1]) - reference.diabetes.value[i]))));
    assert.ok(largest <= 1e-6, `largest difference ${largest}`);
    const r = copse('predict', sklearnDiabetes, diabetes, '--by-position', '--leave-out', reference.diabetes.target, '--interval', '0.9', '--training', diabetes);
    assert.equal(r.code, 2);
    assert.match(r.stderr, /--interval needs the rows the forest was trained on/);
  });

  it('explains an imported forest with covers from the data, and the contributions still add up (Lundberg et al. 2020)', () => {
    const out = json<ExplainJson<ClassExplainedRow>>('explain', sklearnIris, iris, '--by-position', '--leave-out', 'species', '--rows', '71,120');
    assert.match(out.warnings.join(' '), /weighed by the 150 rows/);
    // With covers counted on these rows, the average prediction is the mean of the forest over exactly them
    // (to the six decimals predict prints).
    const all = json<PredictJson>('predict', sklearnIris, iris, '--by-position', '--leave-out', 'species');
    for (const c of reference.iris.classes) {
      const mean = all.predictions.reduce((s, p) => s + numberIn(p, `probability_${c}`), 0) / 150;
      assert.ok(Math.abs(out.rows[0].base[c] - mean) < 5e-7, `base of ${c}: ${out.rows[0].base[c]} against ${mean}`);
    }
    for (const row of out.rows) {
      for (const c of reference.iris.classes) {
        const sum = Object.values(row.contributions[c]).reduce((s, v) => s + v, 0);
        assert.ok(Math.abs(row.base[c] + sum - row.probabilities[c]) < 1e-9, `row ${row.row} class ${c}`);
      }
      // Covers counted from the data: some feature moves a doubtful row's prediction, none is left at zero weight.
      assert.ok(Object.values(row.contributions[row.prediction]).some((v) => Math.abs(v) > 0.01));
    }
  });

  it('--leave-out without --by-position is a usage error', () => {
    const r = copse('votes', model, iris, '--rows', '1', '--leave-out', 'species');
    assert.equal(r.code, 2);
    assert.match(r.stderr, /--leave-out goes with --by-position/);
  });
});
