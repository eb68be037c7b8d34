// Ranking and calibration scores (src/core/metrics) against scikit-learn 1.2.1 on fixed probabilities that
// scripts/sklearn_metrics_reference.py recorded in test/fixtures/reference/sklearn-metrics.json (with the
// library versions), and against small cases worked by hand.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { brierScore, calibrationCurve } from '../../src/core/metrics/calibration';
import { evaluateProbabilities } from '../../src/core/metrics/evaluation';
import { averagePrecision, binaryCurve, rocAuc, rocPoints, thin } from '../../src/core/metrics/ranking';
import { classificationScores } from '../../src/core/metrics/scores';
import { readTally, thresholdPresets, thresholdTable } from '../../src/core/metrics/thresholds';

const root = path.join(__dirname, '..', '..', '..');
interface Case {
  name: string;
  classes: number;
  truth: number[];
  proba: number[][];
  auc: number;
  averagePrecision: number | number[];
  brier: number;
  calibration?: Record<'equalWidth' | 'equalCount', { observed: number[]; meanPredicted: number[] }>;
}
const ref = JSON.parse(readFileSync(path.join(root, 'test/fixtures/reference/sklearn-metrics.json'), 'utf8')) as { sklearnVersion: string; cases: Case[] };
const TOL = 1e-9;
const near = (ours: number, theirs: number, what: string) => assert.ok(Math.abs(ours - theirs) <= TOL, `${what}: ours ${ours}, scikit-learn ${theirs}`);

describe(`ranking and calibration scores against scikit-learn ${ref.sklearnVersion}`, () => {
  for (const c of ref.cases) {
    const labels = Array.from({ length: c.classes }, (_, k) => `c${k}`);
    const proba = Float64Array.from(c.proba.flat());
    const e = evaluateProbabilities(c.truth, proba, labels);
    it(`${c.name}: ROC AUC equals roc_auc_score${c.classes > 2 ? ' (one-vs-rest, macro)' : ''}`, () => near(e.auc, c.auc, 'auc'));
    it(`${c.name}: average precision equals average_precision_score${c.classes > 2 ? ' per class' : ''}`, () => {
      if (typeof c.averagePrecision === 'number') near(e.averagePrecision as number, c.averagePrecision, 'average precision');
      else c.averagePrecision.forEach((v, k) => near((e.averagePrecision as Record<string, number>)[labels[k]], v, `average precision of ${labels[k]}`));
    });
    // Two classes: brier_score_loss; more: the summed form, computed by the script with numpy from Brier (1950)'s formula.
    it(`${c.name}: Brier score equals ${c.classes > 2 ? "the summed form's" : 'brier_score_loss'}`, () => near(e.brier, c.brier, 'brier'));
    if (c.calibration) {
      for (const rule of ['equalWidth', 'equalCount'] as const) {
        it(`${c.name}: calibration bins (${rule}) equal calibration_curve's non-empty bins`, () => {
          const p1 = c.proba.map((r) => r[1]);
          const bins = calibrationCurve(p1, c.truth, rule === 'equalWidth' ? 'equal-width' : 'equal-count').filter((b) => b.rows > 0);
          const theirs = c.calibration![rule];
          assert.equal(bins.length, theirs.observed.length);
          bins.forEach((b, j) => {
            near(b.observed, theirs.observed[j], `observed share in bin ${j}`);
            near(b.meanPredicted, theirs.meanPredicted[j], `mean predicted in bin ${j}`);
          });
          assert.equal(bins.reduce((a, b) => a + b.rows, 0), c.truth.length);
        });
      }
    }
  }
});

describe('ranking scores on cases worked by hand', () => {
  it('a perfect ranking has ROC area 1 and average precision 1; the reverse has area 0 (common practice)', () => {
    const good = binaryCurve([0.9, 0.8, 0.3, 0.1], [1, 1, 0, 0]);
    assert.equal(rocAuc(good), 1);
    assert.equal(averagePrecision(good), 1);
    assert.equal(rocAuc(binaryCurve([0.1, 0.2, 0.8, 0.9], [1, 1, 0, 0])), 0);
  });

  it("scikit-learn's documented example: truth 0 0 1 1, scores 0.1 0.4 0.35 0.8 give AUC 0.75 and AP 0.8333 (docstrings, from memory)", () => {
    const c = binaryCurve([0.1, 0.4, 0.35, 0.8], [0, 0, 1, 1]);
    assert.equal(rocAuc(c), 0.75);
    near(averagePrecision(c), 5 / 6, 'average precision');
  });

  it('a tie between a positive and a negative counts half in the ROC area (Mann-Whitney, common practice)', () => {
    // One positive at 0.7 against negatives at 0.7 (a tie: half) and 0.2 (a win): (0.5 + 1) / 2.
    assert.equal(rocAuc(binaryCurve([0.7, 0.7, 0.2], [1, 0, 0])), 0.75);
  });

  it('the Brier score of certain, right answers is 0 and of certain, wrong ones 1 (two classes) or 2 (summed form)', () => {
    assert.equal(brierScore([0, 1], [1, 0, 0, 1], 2), 0);
    assert.equal(brierScore([0, 1], [0, 1, 1, 0], 2), 1);
    assert.equal(brierScore([0, 2], [0, 1, 0, 1, 0, 0], 3), 2);
  });

  it('a thinned curve keeps its ends and at most about the limit of points', () => {
    const pts = Array.from({ length: 5000 }, (_, i) => [i / 4999, Math.sqrt(i / 4999)] as const);
    const kept = thin(pts, 200, (p) => p);
    assert.ok(kept.length <= 201 && kept.length > 50, `${kept.length} points`);
    assert.deepEqual(kept[0], pts[0]);
    assert.deepEqual(kept[kept.length - 1], pts[4999]);
  });

  it('ROC points start at no row flagged and end at every row flagged', () => {
    const r = rocPoints(binaryCurve([0.9, 0.4, 0.4, 0.1], [1, 0, 1, 0]));
    assert.deepEqual([r[0].falsePositiveRate, r[0].truePositiveRate], [0, 0]);
    assert.deepEqual([r[r.length - 1].falsePositiveRate, r[r.length - 1].truePositiveRate], [1, 1]);
  });
});

describe('thresholds for two classes', () => {
  const c = ref.cases.find((x) => x.classes === 2 && x.truth.length === 200)!;
  const proba = Float64Array.from(c.proba.flat());
  const table = thresholdTable(c.truth, proba);

  it('at 0.5 the tallies give the confusion table of the usual answer (larger probability, ties to the first class)', () => {
    const usual = classificationScores(c.truth, proba, ['a', 'b']);
    const at = readTally(table, table.tallies[50]);
    assert.equal(at.threshold, 0.5);
    assert.deepEqual(at.confusion.map((r) => [...r]), usual.confusion);
  });

  it('each tally counts the rows whose probability exceeds the threshold', () => {
    for (const t of [table.tallies[0], table.tallies[37], table.tallies[100]]) {
      let tp = 0;
      let fp = 0;
      c.truth.forEach((y, i) => {
        if (proba[i * 2 + 1] > t.threshold) {
          if (y === 1) tp++;
          else fp++;
        }
      });
      assert.deepEqual([t.truePositives, t.falsePositives], [tp, fp], `at ${t.threshold}`);
    }
  });

  it('presets: the recall preset is the highest threshold keeping recall at the target; balanced accuracy is at its best', () => {
    const [best, recall, precision] = thresholdPresets(table, 0.9);
    const read = table.tallies.map((t) => readTally(table, t));
    const at = (th: number | null) => read.find((r) => r.threshold === th)!;
    assert.ok(at(recall.threshold).recall >= 0.9);
    const above = read.filter((r) => r.threshold > recall.threshold!);
    assert.ok(above.every((r) => r.recall < 0.9));
    assert.equal(at(best.threshold).balancedAccuracy, Math.max(...read.map((r) => r.balancedAccuracy)));
    if (precision.threshold !== null) {
      assert.ok(at(precision.threshold).precision >= 0.9);
      assert.ok(read.filter((r) => r.threshold < precision.threshold!).every((r) => !(r.precision >= 0.9)));
    }
  });
});
