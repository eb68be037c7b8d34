// Hover wording from synthetic per-tree votes, where every count is known by construction.
import * as assert from 'node:assert/strict';
import { contributionsMarkdown, escapeMd, formatContribution, formatLevel, hoverMarkdown, intervalMarkdown } from '../../src/extension/editor/hoverText';
import { RowVotes, voteEntropy, voteMargin } from '../../src/core/forest/row-votes';
import type { Prediction } from '../../src/core/forest/predict';

// 5 trees, 2 rows, classes a/b/c. Tree-major votes: tree t's vote for row r at t * 2 + r.
const votes = Uint8Array.from([
  1, 0, // tree 0
  1, 0, // tree 1
  2, 0, // tree 2
  1, 0, // tree 3
  0, 0, // tree 4
]);
const prediction: Prediction = {
  rows: 2,
  proba: Float64Array.from([0.2, 0.6, 0.2, 1, 0, 0]),
  predicted: Float64Array.from([1, 0]),
  votes,
  agreement: Float64Array.from([0.6, 1]),
  // Out-of-bag for row 0: the leaves of trees 2 and 4 (c and a, each certain), averaged.
  oob: { proba: Float64Array.from([0.5, 0, 0.5, 0, 0, 0]), predicted: Float64Array.from([0, NaN]), trees: Int32Array.from([2, 0]) },
};
// Row 0 is training row 0; trees 2 and 4 never drew it. Row 1 is held out.
const inBag = Uint8Array.from([1, 2, 0, 1, 0]);
const store = new RowVotes('classification', ['a', 'b', 'c'], prediction, Float64Array.from([2, 0]), {
  trainPos: Int32Array.from([0, -1]),
  trainCount: 1,
  inBag,
}, new Set([1]));

describe('extension hover text', () => {
  it('tallies all trees and the out-of-bag trees separately', () => {
    const a = store.answer(0);
    assert.deepEqual(a.all.tally, { kind: 'classification', counts: [1, 3, 1], trees: 5 });
    assert.deepEqual(a.oob?.tally, { kind: 'classification', counts: [1, 0, 1], trees: 2 });
    assert.equal(a.lead, 'out-of-bag');
    assert.equal(a.headline, a.oob);
    assert.equal(a.oob?.agreement, 0.5, 'one of the two out-of-bag trees votes a');
    assert.deepEqual(store.outOfBagTrees(0), [2, 4]);
    assert.equal(a.role, 'training');
    assert.equal(store.answer(1).role, 'holdout');
    assert.equal(store.answer(1).oob, undefined);
  });

  it('computes Breiman\'s margin from out-of-bag votes: share for the label minus the largest other share', () => {
    // Label c (code 2): OOB votes a=1, c=1 of 2, so margin = 1/2 - 1/2 = 0 (Breiman 2001, section 3.1 definition).
    assert.equal(store.answer(0).margin, 0);
    assert.equal(voteMargin([3, 1, 0], 1, 4), -0.5);
    assert.ok(Number.isNaN(voteMargin([0, 0, 0], 1, 0)));
  });

  it('leads a training row with what the trees that never saw it say, then all trees, labelled as such', () => {
    const md = hoverMarkdown(store.answer(0), { target: 'kind', classes: ['a', 'b', 'c'], dataRow: 7, showVotesLink: 'command:copse.showRowVotes?x' });
    assert.match(md, /row 7 \(training row; 2 of 5 trees never saw it\)/);
    assert.match(md, /\*\*Out-of-bag prediction of kind: a\*\* \(the 2 trees that never saw this row\)/);
    assert.match(md, /Probability: a 50\.0% · c 50\.0% · b 0\.0%/);
    assert.match(md, /Label: c \(differs\)/);
    assert.match(md, /All 5 trees, including the 3 fitted on this row: b 60\.0%/);
    assert.ok(md.indexOf('Out-of-bag prediction') < md.indexOf('All 5 trees'), 'the out-of-bag answer comes first');
    assert.match(md, /\| all 5 trees \| 3 \| 1 \| 1 \|/);
    assert.match(md, /\| 2 out-of-bag trees \| 0 \| 1 \| 1 \|/);
    assert.match(md, /Agreement: 50\.0% of out-of-bag trees vote a · out-of-bag margin \+0/);
    assert.match(md, /\[Show this row's tree votes\]\(command:copse\.showRowVotes\?x\)/);
  });

  it('says when a row was held out, and adds the suspect reason', () => {
    const md = hoverMarkdown(store.answer(1), { target: 'kind', classes: ['a', 'b', 'c'], dataRow: 8, suspectReason: 'odd one' });
    assert.match(md, /held out of training/);
    assert.doesNotMatch(md, /out-of-bag trees \|/);
    assert.match(md, /\*\*Predicted kind: a\*\* \(all 5 trees\)/);
    assert.match(md, /Doubtful row:\*\* odd one/);
  });

  it('escapes labels so a class name cannot add links or markup', () => {
    assert.equal(escapeMd('[x](command:evil)'), '\\[x\\]\\(command:evil\\)');
    const md = hoverMarkdown(store.answer(0), { target: '*t*', classes: ['a', '[b](http://x)', 'c'], dataRow: 1 });
    assert.doesNotMatch(md, /\[b\]\(http/);
  });

  it('folds classes beyond six into one column, keeping the true class visible', () => {
    const K = 9;
    const v = Uint8Array.from([0, 1, 2, 3, 4, 5, 6, 7, 8, 0]);
    const p: Prediction = { rows: 1, proba: new Float64Array(K).fill(1 / K), predicted: Float64Array.from([0]), votes: v, agreement: Float64Array.from([0.2]) };
    const classes = Array.from({ length: K }, (_, k) => `k${k}`);
    const s = new RowVotes('classification', classes, p, Float64Array.from([8]), undefined);
    const md = hoverMarkdown(s.answer(0), { target: 't', classes, dataRow: 1 });
    const header = md.split('\n').find((l) => l.startsWith('| Votes'))!;
    assert.equal(header.split('|').length - 2, 7, 'Votes + 5 classes + others');
    assert.match(header, /k8/);
    assert.match(header, /4 others/);
  });

  it('describes regression rows by the trees\' mean and spread', () => {
    const p: Prediction = { rows: 1, value: Float64Array.from([2]), predicted: Float64Array.from([2]), votes: Float32Array.from([1, 2, 3]), spread: Float64Array.from([0.8165]) };
    const s = new RowVotes('regression', [], p, Float64Array.from([2.5]), undefined, new Set(), 0.5);
    const a = s.answer(0);
    assert.equal(a.headline.agreement, 1 / 3, 'only the tree at 2 is within 0.5 of 2');
    const t = a.all.tally;
    assert.equal(t.kind, 'regression');
    if (t.kind === 'regression') {
      assert.equal(t.mean, 2);
      assert.ok(Math.abs(t.sd - Math.sqrt(2 / 3)) < 1e-12, 'population sd of 1, 2, 3');
    }
    const md = hoverMarkdown(a, { target: 'y', classes: [], dataRow: 3, tolerance: 0.5 });
    assert.match(md, /All 3 trees: mean 2, sd 0\.8165, range 1 to 3/);
    assert.match(md, /Label: 2\.5 \(\+0\.5 from the prediction\)/);
  });

  it('measures vote entropy in bits', () => {
    assert.equal(voteEntropy([5, 5]), 1);
    assert.equal(voteEntropy([10, 0, 0]), 0);
  });

  it('writes contributions signed with about two significant digits, and sums the rest', () => {
    assert.deepEqual([0.3124, -0.0123, 0, -0, 3.456, -123.4, 1e-5].map(formatContribution), ['+0.31', '\u22120.012', '+0', '+0', '+3.5', '\u2212123', '+0.00001']);
    const md = contributionsMarkdown({
      className: 'virginica',
      target: 'species',
      base: 1 / 3,
      prediction: 0.9,
      top: [
        { feature: 'petal_width', contribution: 0.31 },
        { feature: 'petal_length', contribution: 0.27 },
        { feature: 'sepal_width', contribution: -0.02 },
      ],
      others: 1,
      rest: -0.0013,
    });
    assert.match(md, /to the probability of virginica \(from 0\.3333 on average to 0\.9 here\): petal\\_width \+0\.31 · petal\\_length \+0\.27 · sepal\\_width \u22120\.02 · 1 other \u22120\.0013/);
    const value = contributionsMarkdown({ target: 'price', base: 230, prediction: 262, top: [{ feature: 'area', contribution: 32 }], others: 0, rest: 0 });
    assert.match(value, /to the predicted price \(from 230 on average to 262 here\): area \+32\n/);
    assert.doesNotMatch(value, /other/);
  });

  it('escapes names in the explanation parts, so a feature cannot add links or markup', () => {
    const md = contributionsMarkdown({ className: '[c](command:x)', target: 't', base: 0, prediction: 1, top: [{ feature: '**[a](http://x)**', contribution: 1 }], others: 0, rest: 0 });
    assert.doesNotMatch(md, /\[a\]\(http/);
    assert.doesNotMatch(md, /\[c\]\(command/);
    assert.doesNotMatch(intervalMarkdown(0.9, 1, 2, '[y](command:z)'), /\[y\]\(command/);
  });

  it('names the interval by its level and gives both ends', () => {
    assert.deepEqual([0.9, 0.95, 0.975, 0.5].map(formatLevel), ['90%', '95%', '97.5%', '50%']);
    assert.match(intervalMarkdown(0.8, 10.25, 14.5, 'y'), /^\*\*80% prediction interval\*\* for y: 10\.25 to 14\.5\n/);
  });
});
