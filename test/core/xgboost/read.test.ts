// XGBoost's JSON models read by Copse, checked against XGBoost itself: the fixtures under
// test/fixtures/xgboost/ were written by scripts/xgboost_reference.py with Debian's python3-xgboost (the version
// each file records, 1.7.4 when written), on open datasets (test/fixtures/open/SOURCES.md).
import { strict as assert } from 'node:assert';
import { explainRows } from '../../../src/core/explain/contributions';
import { predictEncoded } from '../../../src/core/forest/predict';
import { openCase, widen, type Gap } from './helpers';

// XGBoost sums float32 leaf values in float32; Copse sums the same values in doubles, so scores agree to float32
// summation error. The bound 1e-4 on probabilities and values (relative for values) is the issue's.
const SCORE_TOLERANCE = 1e-4;
// Contributions: 1e-3 relative per feature and bias, relative to the larger of |XGBoost's value| and 1e-3 of the
// row's largest |contribution| (a contribution near zero is compared on the row's scale, not its own).
const CONTRIB_TOLERANCE = 1e-3;

const CASES = ['binary', 'multiclass', 'softmax', 'gaps', 'forest'];

describe('XGBoost JSON models (reference: XGBoost 1.7.4 predict and pred_contribs)', () => {
  for (const name of CASES) {
    it(`${name}: scores every row as XGBoost's predict does`, async () => {
      const c = await openCase(name);
      const { forest, x, rows, expected } = c;
      assert.equal(rows, expected.predict.length);
      const pred = predictEncoded(forest, x, rows);
      const K = forest.schema.target.task === 'classification' ? forest.schema.target.classes!.length : 1;
      const gap: Gap = { abs: 0, rel: 0 };
      for (let i = 0; i < rows; i++) {
        const theirs = expected.predict[i];
        if (name === 'binary') widen(gap, pred.proba![i * 2 + 1], theirs[0]);
        else if (name === 'softmax') assert.equal(pred.predicted[i], theirs[0], `row ${i}: label`);
        else if (K > 1) for (let k = 0; k < K; k++) widen(gap, pred.proba![i * K + k], theirs[k]);
        else widen(gap, pred.value![i], theirs[0], 1);
      }
      if (name === 'softmax') {
        // multi:softmax predicts labels; its probabilities are the softmax of the margins XGBoost reports.
        for (let i = 0; i < rows; i++) {
          const m = expected.margin[i];
          const top = Math.max(...m);
          const e = m.map((v) => Math.exp(v - top));
          const s = e.reduce((a, b) => a + b, 0);
          for (let k = 0; k < K; k++) widen(gap, pred.proba![i * K + k], e[k] / s);
        }
      }
      // eslint-disable-next-line no-console -- the measured agreement goes to the run's log; the assertion below holds the bound.
      console.log(`      ${name}: ${rows} rows, largest difference ${gap.abs.toExponential(2)} (relative ${gap.rel.toExponential(2)})`);
      if (K > 1 || name === 'binary') assert.ok(gap.abs <= SCORE_TOLERANCE, `${name}: probabilities differ by ${gap.abs}`);
      else assert.ok(gap.rel <= SCORE_TOLERANCE, `${name}: values differ by ${gap.rel} relative`);
    });

    it(`${name}: contributions equal XGBoost's TreeSHAP (pred_contribs) per feature and bias, on every row`, async () => {
      const { forest, x, rows, expected } = await openCase(name);
      const c = explainRows(forest, x, rows);
      const p = c.features;
      const K = c.outputs;
      const gap: Gap = { abs: 0, rel: 0 };
      let worst = '';
      for (let i = 0; i < rows; i++) {
        // Two classes: XGBoost explains the log-odds of class 1, which Copse keeps as output 1 (output 0 stays 0).
        const lists: number[][] = K === 2 ? [expected.contribs[i] as number[]] : K === 1 ? [expected.contribs[i] as number[]] : (expected.contribs[i] as number[][]);
        lists.forEach((theirs, q) => {
          const k = K === 2 ? 1 : q;
          assert.equal(theirs.length, p + 1);
          const scale = Math.max(...theirs.map(Math.abs)) * 1e-3;
          for (let j = 0; j <= p; j++) {
            const ours = j < p ? c.contributions[(i * p + j) * K + k] : c.base[k];
            const d = Math.abs(ours - theirs[j]);
            const rel = d / Math.max(Math.abs(theirs[j]), scale);
            widen(gap, ours, theirs[j], scale);
            if (rel > CONTRIB_TOLERANCE && !worst) worst = `row ${i}, output ${k}, ${j < p ? forest.schema.features[j].name : 'bias'}: ${ours} vs ${theirs[j]}`;
          }
        });
      }
      // eslint-disable-next-line no-console -- the measured agreement goes to the run's log; the assertion below holds the bound.
      console.log(`      ${name}: contributions differ by at most ${gap.abs.toExponential(2)} (relative ${gap.rel.toExponential(2)})`);
      assert.equal(worst, '', worst);
    });
  }
});
