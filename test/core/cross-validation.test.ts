// k-fold cross-validation (src/core/summary/cross-validation.ts): stratified folds, determinism, and the
// five-fold estimate on Pima (test/fixtures/open/SOURCES.md) against scikit-learn 1.2.1's StratifiedKFold with
// RandomForestClassifier, recorded by scripts/sklearn_metrics_reference.py with the tolerance stated there.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import { shuffle, stream } from '../../src/core/forest/rng';
import { foldsOf, spreadOf } from '../../src/core/metrics/folds';
import { crossValidate } from '../../src/core/summary/cross-validation';
import type { CrossValidationSummary } from '../../src/core/summary/types';

const root = path.join(__dirname, '..', '..', '..');
interface Band {
  mean: number;
  min: number;
  max: number;
  tolerance: number;
}
const ref = JSON.parse(readFileSync(path.join(root, 'test/fixtures/reference/sklearn-metrics.json'), 'utf8')) as {
  sklearnVersion: string;
  crossValidation: { file: string; target: string; folds: number; trees: number; scores: Record<'accuracy' | 'auc' | 'brier', Band> };
};

describe('folds', () => {
  it('stratified folds give each fold every class in its share, sizes within one row, the same for the same seed', () => {
    const classOf = (i: number) => (i % 10 < 7 ? 0 : i % 10 < 9 ? 1 : 2); // 70% / 20% / 10%
    const make = () => {
      const r = stream(7, 'folds');
      return foldsOf(103, 5, (a) => shuffle(a, r), classOf);
    };
    const f = make();
    assert.deepEqual(f, make());
    const sizes = [0, 1, 2, 3, 4].map((k) => f.filter((x) => x === k).length);
    assert.ok(Math.max(...sizes) - Math.min(...sizes) <= 1, `sizes ${sizes.join(',')}`);
    for (const c of [0, 1, 2]) {
      const per = [0, 1, 2, 3, 4].map((k) => Array.from(f).filter((x, i) => x === k && classOf(i) === c).length);
      assert.ok(Math.max(...per) - Math.min(...per) <= 1, `class ${c}: ${per.join(',')}`);
    }
  });

  it('refuses fewer than two folds or more folds than rows', () => {
    assert.throws(() => foldsOf(10, 1, () => {}), /at least 2 folds/);
    assert.throws(() => foldsOf(3, 5, () => {}), /at least 5 rows/);
  });

  it('the spread is the sample standard deviation (n - 1, common practice)', () => {
    const s = spreadOf([1, 2, 3, 4]);
    assert.equal(s.mean, 2.5);
    assert.ok(Math.abs(s.sd - Math.sqrt(5 / 3)) < 1e-12);
  });
});

describe(`five-fold cross-validation on Pima against scikit-learn ${ref.sklearnVersion}`, function () {
  this.timeout(600000);
  const cv = ref.crossValidation;
  let one: CrossValidationSummary;
  let two: CrossValidationSummary;
  before(async () => {
    const { table } = await loadCsv(path.join(root, cv.file), { target: cv.target });
    const fit = { target: cv.target, params: { trees: cv.trees, seed: 1 } };
    one = await crossValidate(table, { ...fit, workers: 1 }, { folds: cv.folds });
    two = await crossValidate(table, { ...fit, workers: 2 }, { folds: cv.folds });
  });

  it('has one score object per fold, and every row is scored once', () => {
    assert.equal(one.folds.length, 5);
    assert.equal(one.folds.reduce((a, f) => a + f.rows, 0), 532);
  });

  it('gives the same folds and scores for one worker and for two', () => {
    assert.deepEqual(one, two);
  });

  for (const key of ['accuracy', 'auc', 'brier'] as const) {
    it(`the mean ${key} over folds lies within scikit-learn's runs (10 seeds) widened by the recorded tolerance`, () => {
      const band = cv.scores[key];
      const ours = one.mean[key] as number;
      assert.ok(ours >= band.min - band.tolerance && ours <= band.max + band.tolerance, `ours ${ours}, scikit-learn ${band.min}..${band.max} ± ${band.tolerance}`);
    });
  }
});
