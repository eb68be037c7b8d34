// `copse explain` as scripts and people read it: JSON keys, contributions that add up to what `copse predict`
// prints for the same row, the readable table largest first, help and one-sentence errors.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { numberIn, type ClassExplainedRow, type ExplainJson, type PredictJson, type ValueExplainedRow } from '../../cli/output';
import { root } from './helpers/data';

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

const sum = (o: Record<string, number>) => Object.values(o).reduce((a, b) => a + b, 0);

describe('copse explain', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-explain-'));
  const iris = path.join(root, 'test/fixtures/open/iris.csv');
  const diabetes = path.join(root, 'test/fixtures/open/diabetes.csv');
  const irisModel = path.join(dir, 'iris.json');
  const diabetesModel = path.join(dir, 'diabetes.json');

  before(() => {
    for (const [data, target, model] of [[iris, 'species', irisModel], [diabetes, 'progression', diabetesModel]]) {
      const r = copse('fit', data, '--target', target, '--trees', '40', '--seed', '2', '--no-importance', '--save', model, '--json');
      assert.equal(r.code, 0, r.stderr);
    }
  });

  it('--json gives per row the prediction, base and per-class contributions that add up to the probabilities', () => {
    // --all-trees: the training file's rows are otherwise explained over their out-of-bag trees (test/cli/explain-oob.test.ts).
    const r = copse('explain', irisModel, iris, '--rows', '1,77,150', '--json', '--all-trees');
    assert.equal(r.code, 0, r.stderr);
    const out = JSON.parse(r.stdout) as ExplainJson<ClassExplainedRow>;
    assert.equal(out.task, 'classification');
    assert.deepEqual(out.rows.map((x) => x.row), [1, 77, 150]);
    const scored = (JSON.parse(copse('predict', irisModel, iris, '--json').stdout) as PredictJson).predictions;
    for (const row of out.rows) {
      for (const k of ['row', 'prediction', 'base', 'contributions']) assert.ok(k in row, `missing ${k}`);
      assert.deepEqual(Object.keys(row.contributions), ['setosa', 'versicolor', 'virginica']);
      for (const c of Object.keys(row.contributions)) {
        assert.deepEqual(Object.keys(row.contributions[c]), ['sepal_length', 'sepal_width', 'petal_length', 'petal_width']);
        assert.ok(Math.abs(row.base[c] + sum(row.contributions[c]) - row.probabilities[c]) < 1e-9);
      }
      const same = scored.find((s) => s.row === row.row);
      assert.ok(same, `predict has no row ${row.row}`);
      assert.equal(row.prediction, same.predicted_species);
      // predict prints six significant digits.
      assert.ok(Math.abs(row.probabilities.virginica - numberIn(same, 'probability_virginica')) < 1e-5);
    }
  });

  it('--json for a regression gives one contribution per feature, adding up to the predicted value', () => {
    const out = JSON.parse(copse('explain', diabetesModel, diabetes, '--rows', '3', '--json', '--all-trees').stdout) as ExplainJson<ValueExplainedRow>;
    const row = out.rows[0];
    assert.equal(typeof row.base, 'number');
    assert.equal(Object.keys(row.contributions).length, 10);
    const scored = (JSON.parse(copse('predict', diabetesModel, diabetes, '--json').stdout) as PredictJson).predictions[2];
    assert.ok(Math.abs(row.base + sum(row.contributions) - row.prediction) < 1e-9);
    // predict prints six significant digits.
    assert.ok(Math.abs(row.prediction - numberIn(scored, 'predicted_progression')) <= 1e-5 * row.prediction);
  });

  it('prints a readable table, largest contribution first, and folds the rest into one line with --top', () => {
    const r = copse('explain', diabetesModel, diabetes, '--rows', '3', '--top', '4');
    assert.equal(r.code, 0, r.stderr);
    const lines = r.stdout.split('\n');
    assert.match(lines[0], /^Row 3 \(line 4\), over the \d+ trees that did not train on this row: predicted [\d.]+, against [\d.]+ on average$/);
    assert.match(copse('explain', diabetesModel, diabetes, '--rows', '3', '--all-trees').stdout, /^Row 3 \(line 4\): predicted [\d.]+, against [\d.]+ on average\n/);
    const values = lines.slice(2, 6).map((l) => Math.abs(Number(l.trim().split(/\s+/).pop())));
    assert.equal(values.length, 4);
    for (let i = 1; i < 4; i++) assert.ok(values[i] <= values[i - 1], r.stdout);
    assert.match(lines[6], /^ {2}\(6 more features, together [+-][\d.]+\)$/);
    const chosen = copse('explain', irisModel, iris, '--rows', '77', '--class', 'setosa');
    assert.match(chosen.stdout, /probability of "setosa"/);
  });

  it('has help like the other commands, and one-sentence errors with exit code 2 for bad input', () => {
    const help = copse('explain', '--help');
    assert.equal(help.code, 0);
    assert.match(help.stdout, /^Usage: copse explain MODEL DATA\.csv --rows/);
    const noRows = copse('explain', irisModel, iris);
    assert.equal(noRows.code, 2);
    assert.match(noRows.stderr, /needs --rows/);
    const far = copse('explain', irisModel, iris, '--rows', '151');
    assert.equal(far.code, 2);
    assert.match(far.stderr, /has 150 data rows; there is no row 151/);
    const cls = copse('explain', diabetesModel, diabetes, '--rows', '1', '--class', 'x');
    assert.equal(cls.code, 2);
    assert.match(cls.stderr, /--class applies to classification/);
    const unknown = copse('explain', irisModel, iris, '--rows', '1', '--class', 'rose');
    assert.match(unknown.stderr, /no class "rose"/);
  });
});
