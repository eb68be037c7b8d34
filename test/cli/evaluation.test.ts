// The ranking, calibration, threshold and cross-validation figures as the command line gives them: the JSON
// keys users script against, the score objects of cross-validation's folds, and `copse predict --threshold`
// agreeing exactly with the threshold tallies `copse fit` reports (same trees, same out-of-bag rows).
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';

const root = path.join(__dirname, '..', '..', '..');
const pima = path.join(root, 'test/fixtures/open/pima.csv');
const iris = path.join(root, 'test/fixtures/open/iris.csv');
const loaves = path.join(root, 'demo/loaf-rise.csv');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

interface Tally {
  threshold: number;
  truePositives: number;
  falsePositives: number;
}
interface Scores {
  rows: number;
  accuracy?: number;
  auc?: number;
  aucByClass?: Record<string, number>;
  averagePrecision?: number | Record<string, number>;
  brier?: number;
  positiveClass?: string;
  confusion?: { labels: string[]; counts: number[][] };
  curves?: {
    byClass: Array<{ label: string; roc: unknown[]; precisionRecall: unknown[]; calibration: { equalWidth: Array<{ rows: number }>; equalCount: Array<{ rows: number }> } }>;
    thresholds?: { positives: number; negatives: number; tallies: Tally[]; presets: Array<{ kind: string; threshold: number | null }> };
  };
  r2?: number;
  diagnostics?: { pairs: Array<{ actual: number; predicted: number }>; rows: number };
}
interface FitJson {
  oob: Scores;
  test?: Scores;
  cv?: { folds: Scores[]; mean: Record<string, number>; sd: Record<string, number>; repeats: number };
}

function fit(...args: string[]): FitJson {
  const r = copse('fit', ...args, '--json', '--no-importance', '--trees', '60', '--workers', '2');
  assert.equal(r.code, 0, r.stderr);
  return JSON.parse(r.stdout) as FitJson;
}

describe('copse fit: ranking and calibration scores', function () {
  this.timeout(300000);

  it('two classes: auc, averagePrecision and brier under oob and test, read for the second class, with curves of bounded size', () => {
    const j = fit(pima, '--target', 'type', '--holdout', '0.25');
    for (const s of [j.oob, j.test!]) {
      assert.equal(s.positiveClass, 'Yes');
      assert.ok(s.auc! > 0.7 && s.auc! <= 1, `auc ${s.auc}`);
      assert.equal(typeof s.averagePrecision, 'number');
      assert.ok(s.brier! > 0 && s.brier! < 0.25, `brier ${s.brier}`);
      const c = s.curves!;
      assert.equal(c.byClass.length, 1);
      assert.ok(c.byClass[0].roc.length <= 201 && c.byClass[0].roc.length > 10);
      assert.equal(c.byClass[0].calibration.equalWidth.reduce((a, b) => a + b.rows, 0), s.rows);
      assert.equal(c.thresholds!.tallies.length, 101);
    }
  });

  it('three classes: a macro ROC area, one per class, and average precision per class', () => {
    const j = fit(iris, '--target', 'species');
    assert.deepEqual(Object.keys(j.oob.aucByClass!), ['setosa', 'versicolor', 'virginica']);
    const mean = Object.values(j.oob.aucByClass!).reduce((a, b) => a + b, 0) / 3;
    assert.ok(Math.abs(j.oob.auc! - mean) < 1e-12);
    assert.deepEqual(Object.keys(j.oob.averagePrecision as object), ['setosa', 'versicolor', 'virginica']);
    assert.equal(j.oob.curves!.byClass.length, 3);
    assert.equal(j.oob.curves!.thresholds, undefined);
  });

  it('regression: predicted against actual pairs for out-of-bag rows', () => {
    const j = fit(loaves, '--target', 'rise_mm');
    assert.ok(j.oob.diagnostics!.pairs.length > 100 && j.oob.diagnostics!.pairs.length <= 400);
    assert.equal(j.oob.auc, undefined);
  });

  it('--folds 5 gives five fold score objects with the keys of test, their mean and sd; the same for one worker or two', () => {
    const j = fit(pima, '--target', 'type', '--folds', '5', '--holdout', '0.2');
    assert.equal(j.cv!.folds.length, 5);
    assert.equal(j.cv!.folds.reduce((a, f) => a + f.rows, 0), 532);
    for (const key of ['accuracy', 'auc', 'averagePrecision', 'brier', 'confusion', 'rows']) assert.ok(key in j.cv!.folds[0] && key in j.test!, key);
    const accuracies = j.cv!.folds.map((f) => f.accuracy!);
    const mean = accuracies.reduce((a, b) => a + b, 0) / 5;
    assert.ok(Math.abs(j.cv!.mean.accuracy - mean) < 1e-12);
    assert.ok(j.cv!.sd.accuracy > 0);
    const one = JSON.parse(copse('fit', pima, '--target', 'type', '--folds', '5', '--holdout', '0.2', '--json', '--no-importance', '--trees', '60', '--workers', '1').stdout) as FitJson;
    assert.deepEqual(one.cv, j.cv);
  });

  it('--repeats 2 runs the folds twice with different shuffles', () => {
    const j = fit(iris, '--target', 'species', '--folds', '3', '--repeats', '2');
    assert.equal(j.cv!.folds.length, 6);
    assert.equal(j.cv!.repeats, 2);
    assert.notDeepEqual(j.cv!.folds.slice(0, 3), j.cv!.folds.slice(3));
  });

  it('refuses --repeats without --folds, and --folds 1', () => {
    assert.match(copse('fit', iris, '--target', 'species', '--repeats', '2').stderr, /--repeats needs --folds/);
    assert.match(copse('fit', iris, '--target', 'species', '--folds', '1').stderr, /--folds takes a whole number of at least 2/);
  });

  it('the readable report states the areas, the Brier score and the threshold presets', () => {
    const r = copse('fit', pima, '--target', 'type', '--no-importance', '--trees', '40', '--holdout', '0.25');
    assert.match(r.stdout, /ROC AUC \d\.\d{3}\s+average precision \d\.\d{3}\s+Brier \d\.\d{3}\s+\(for "Yes"\)/);
    assert.match(r.stdout, /best balanced accuracy: 0\.\d\d/);
    assert.match(r.stdout, /the held-out figures are the honest check/);
  });
});

describe('copse predict --threshold', function () {
  this.timeout(300000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-threshold-'));
  const model = path.join(dir, 'pima.json');
  let fitted: FitJson;
  before(() => {
    fitted = fit(pima, '--target', 'type', '--save', model);
  });

  for (const threshold of [0.2, 0.39, 0.5, 0.73]) {
    it(`at ${threshold}, the out-of-bag confusion equals fit's tally at ${threshold}`, () => {
      const r = copse('predict', model, pima, '--threshold', String(threshold), '--json');
      assert.equal(r.code, 0, r.stderr);
      const p = JSON.parse(r.stdout) as { threshold: number; outOfBag: Scores; predictions: Array<Record<string, unknown>> };
      const t = fitted.oob.curves!.thresholds!;
      const tally = t.tallies.find((x) => x.threshold === threshold)!;
      assert.deepEqual(p.outOfBag.confusion!.counts, [
        [t.negatives - tally.falsePositives, tally.falsePositives],
        [t.positives - tally.truePositives, tally.truePositives],
      ]);
      const flagged = p.predictions.filter((row) => row.oob_predicted_type === 'Yes').length;
      assert.equal(flagged, tally.truePositives + tally.falsePositives);
    });
  }

  it('0.5 gives the usual answers', () => {
    const p = JSON.parse(copse('predict', model, pima, '--threshold', '0.5', '--json').stdout) as { outOfBag: Scores };
    assert.deepEqual(p.outOfBag.confusion, fitted.oob.confusion);
  });

  it('is refused for three classes and for a threshold outside [0, 1]', () => {
    const irisModel = path.join(dir, 'iris.json');
    assert.equal(copse('fit', iris, '--target', 'species', '--trees', '10', '--save', irisModel).code, 0);
    assert.match(copse('predict', irisModel, iris, '--threshold', '0.4').stderr, /two classes; this one has 3 classes/);
    assert.match(copse('predict', model, pima, '--threshold', '1.5').stderr, /probability between 0 and 1/);
  });
});
