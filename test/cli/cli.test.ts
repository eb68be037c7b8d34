// The command line as scripts use it: exit codes, one-sentence errors, JSON keys, and files it must not touch.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { ClassVoteRow, FitJson, PredictJson, VotesJson } from './output';

const root = path.join(__dirname, '..', '..', '..');
const iris = path.join(root, 'test/fixtures/open/iris.csv');
const kites = path.join(root, 'demo/kite-flights.csv');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('copse command line', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-cli-'));
  const model = path.join(dir, 'iris.json');
  let fit: FitJson;

  before(() => {
    const r = copse('fit', iris, '--target', 'species', '--trees', '60', '--seed', '7', '--holdout', '0.2', '--save', model, '--json');
    assert.equal(r.code, 0, r.stderr);
    fit = JSON.parse(r.stdout) as FitJson;
  });

  it('fit --json prints the keys scripts rely on', () => {
    for (const k of ['task', 'rows', 'features', 'dropped', 'trees', 'oob', 'test', 'importance', 'seconds']) assert.ok(k in fit, `missing ${k}`);
    assert.equal(fit.task, 'classification');
    assert.equal(fit.rows, 120);
    assert.equal(fit.trees, 60);
    assert.deepEqual(fit.features, ['sepal_length', 'sepal_width', 'petal_length', 'petal_width']);
    assert.ok(fit.oob!.accuracy! > 0.85 && fit.test!.accuracy! > 0.8);
    assert.equal(fit.test!.rows, 30);
    assert.ok(typeof fit.importance.impurity.petal_length === 'number');
    assert.ok(typeof fit.importance.permutation.petal_width === 'number');
    assert.ok(fit.seconds.load >= 0 && fit.seconds.fit > 0);
  });

  it('fit gives the same result for the same seed on any number of workers', () => {
    const a = JSON.parse(copse('fit', iris, '--target', 'species', '--trees', '30', '--seed', '3', '--workers', '1', '--json').stdout) as FitJson;
    const b = JSON.parse(copse('fit', iris, '--target', 'species', '--trees', '30', '--seed', '3', '--workers', '3', '--json').stdout) as FitJson;
    assert.deepEqual(a.oob, b.oob);
    assert.deepEqual(a.importance, b.importance);
  });

  it('leaves out the identifier column of the demo data, with a reason', () => {
    const r = JSON.parse(copse('fit', kites, '--target', 'outcome', '--trees', '20', '--json').stdout) as FitJson;
    const id = r.dropped.find((d) => d.name === 'flight_id');
    assert.ok(id && /identifier|unique/i.test(id.reason), JSON.stringify(r.dropped));
    assert.ok(!r.features.includes('flight_id'));
  });

  it('predict writes input columns plus prediction, probabilities and agreement, and never its input', () => {
    const out = path.join(dir, 'scored.csv');
    const before = statSync(iris).mtimeMs;
    const r = copse('predict', model, iris, '--out', out);
    assert.equal(r.code, 0, r.stderr);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    assert.equal(lines.length, 151);
    // iris.csv is the model's own training file, so the out-of-bag columns follow the all-trees ones.
    assert.equal(
      lines[0],
      'sepal_length,sepal_width,petal_length,petal_width,species,predicted_species,probability_setosa,probability_versicolor,probability_virginica,tree_agreement,' +
        'oob_predicted_species,oob_probability_setosa,oob_probability_versicolor,oob_probability_virginica,oob_trees,row_role',
    );
    const first = lines[1].split(',');
    assert.equal(first[5], 'setosa');
    assert.ok(Math.abs(Number(first[6]) + Number(first[7]) + Number(first[8]) - 1) < 1e-4);
    assert.equal(statSync(iris).mtimeMs, before);
    const refused = copse('predict', model, iris, '--out', iris);
    assert.notEqual(refused.code, 0);
    assert.match(refused.stderr, /Refusing to write predictions over the input file/);
    assert.equal(statSync(iris).mtimeMs, before);
  });

  it('votes shows every tree on the asked rows, consistent with predict', () => {
    const r = copse('votes', model, iris, '--rows', '1,51,150', '--json');
    assert.equal(r.code, 0, r.stderr);
    const v = JSON.parse(r.stdout) as VotesJson<ClassVoteRow>;
    assert.deepEqual(v.rows.map((x) => x.row), [1, 51, 150]);
    for (const row of v.rows) {
      assert.equal(row.trees.length, 60);
      assert.equal(row.allTrees.trees, 60);
      const counts: Record<string, number> = {};
      for (const c of row.trees) counts[c] = (counts[c] ?? 0) + 1;
      for (const [c, n] of Object.entries(row.allTrees.counts)) assert.equal(counts[c] ?? 0, n);
      // The top-level keys are all the trees' answer, as before out-of-bag answers; each group's agreement is
      // over its own trees.
      assert.deepEqual([row.prediction, row.counts, row.agreement], [row.allTrees.prediction, row.allTrees.counts, row.allTrees.agreement]);
      for (const g of [row.allTrees, row.outOfBag].filter((g) => g !== undefined)) assert.equal(g.agreement, g.counts[g.prediction] / g.trees);
    }
    assert.equal(v.rows[0].prediction, 'setosa');
    const p = JSON.parse(copse('predict', model, iris, '--json').stdout) as PredictJson;
    assert.equal(p.predictions[50].predicted_species, v.rows[1].prediction);
    for (const [j, row] of [1, 51, 150].entries()) {
      const oob = p.predictions[row - 1];
      assert.equal(oob.row_role, v.rows[j].role);
      assert.equal(oob.oob_predicted_species ?? undefined, v.rows[j].outOfBag?.prediction);
    }
  });

  it('predict adds a quantile-forest interval around each regression prediction (Meinshausen 2006)', () => {
    const diabetes = path.join(root, 'test/fixtures/open/diabetes.csv');
    const reg = path.join(dir, 'diabetes.json');
    assert.equal(copse('fit', diabetes, '--target', 'progression', '--trees', '80', '--save', reg).code, 0);
    const out = path.join(dir, 'diabetes-scored.csv');
    const r = copse('predict', reg, diabetes, '--training', diabetes, '--interval', '0.9', '--out', out);
    assert.equal(r.code, 0, r.stderr);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    const head = lines[0].split(',');
    const at = head.indexOf('predicted_progression');
    assert.deepEqual(head.slice(at, at + 4), ['predicted_progression', 'tree_spread', 'lower_90', 'upper_90']);
    let ordered = 0;
    for (const line of lines.slice(1)) {
      const c = line.split(',').map(Number);
      const [pred, , lo, hi] = c.slice(at, at + 4);
      if (lo <= pred && pred <= hi) ordered++;
    }
    assert.equal(ordered, lines.length - 1, 'every interval holds its prediction');
    assert.match(copse('predict', reg, diabetes, '--interval', '0.9').stderr, /needs --training/);
    assert.match(copse('predict', model, iris, '--training', iris, '--interval', '0.9').stderr, /for regression forests/);
  });

  it('every subcommand answers --help', () => {
    for (const c of ['fit', 'predict', 'votes']) {
      const r = copse(c, '--help');
      assert.equal(r.code, 0);
      assert.match(r.stdout, new RegExp(`^Usage: copse ${c}`));
    }
  });

  const errors: Array<[string, () => string[], RegExp]> = [
    ['no target', () => ['fit', iris], /needs --target/],
    ['an unknown target', () => ['fit', iris, '--target', 'colour'], /colour/],
    ['a missing file', () => ['fit', path.join(dir, 'nope.csv'), '--target', 'y'], /nope\.csv/],
    ['a bad flag value', () => ['fit', iris, '--target', 'species', '--trees', 'many'], /--trees takes a whole number/],
    ['an unknown flag', () => ['fit', iris, '--target', 'species', '--n-trees', '5'], /n-trees/],
    ['a broken model', () => {
      const bad = path.join(dir, 'bad.json');
      writeFileSync(bad, '{"format":"copse-forest","version":1,');
      return ['predict', bad, iris];
    }, /not complete JSON/],
    ['columns that do not match the model', () => {
      const other = path.join(dir, 'other.csv');
      writeFileSync(other, 'sepal_length,petal_width,extra\n1,2,3\n4,5,6\n');
      return ['predict', model, other];
    }, /missing columns "sepal_width", "petal_length".*extra column \(ignored\) "extra"/],
    ['a row that is not there', () => ['votes', model, iris, '--rows', '151'], /no row 151/],
  ];
  for (const [what, args, message] of errors) {
    it(`says what is wrong in one sentence, with no stack trace, for ${what}`, () => {
      const r = copse(...args());
      assert.notEqual(r.code, 0);
      assert.match(r.stderr, message);
      assert.doesNotMatch(r.stderr, /\n\s+at /);
    });
  }

  it('shows the stack with --debug', () => {
    const r = copse('fit', iris, '--target', 'colour', '--debug');
    assert.notEqual(r.code, 0);
    assert.match(r.stderr, /\n\s+at /);
  });
});
