// The features-per-split sweep as the panel gets it: which refits it runs, when an earlier sweep still
// applies, and the summary drawn (checked against core's sweep on iris with few trees).
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import { sweepFeaturesPerSplit } from '../../src/core/explain/index';
import { fitForest } from '../../src/core/forest/fit';
import { isHostToPanel } from '../../src/protocol/messages';
import type { FitChoices } from '../../src/extension/fit/choices';
import { featuresPerSplitOf, sweepKey, sweepOptions, sweepSummary } from '../../src/extension/fit/sweep';
import { readSettings } from '../../src/extension/settings';
import { FIXTURES } from './helpers';

const training = readSettings({ get: () => undefined }).settings.training;
const choices: FitChoices = { target: 'species', task: 'classification', trees: 12, featuresPerSplit: 'auto', maxDepth: null, minLeaf: 1, seed: 9, holdout: 0, exclude: [] };
const origin = { path: '/data/iris.csv', fingerprint: 'abc', choices };

describe('features-per-split sweep (host side)', function () {
  this.timeout(120_000);

  it('still applies after a refit that changed only the features per split, and not after any other change', () => {
    const key = sweepKey(origin);
    assert.equal(sweepKey({ ...origin, choices: { ...choices, featuresPerSplit: 3 } }), key);
    for (const other of [
      { ...origin, fingerprint: 'abd' },
      { ...origin, sampleRows: 100 },
      { ...origin, choices: { ...choices, trees: 13 } },
      { ...origin, choices: { ...choices, exclude: ['sepal_width'] } },
      { ...origin, choices: { ...choices, seed: 10 } },
      { ...origin, choices: { ...choices, holdout: 0.2 } },
    ]) {
      assert.notEqual(sweepKey(other), key, JSON.stringify(other));
    }
    // The order columns were left out in does not matter.
    assert.equal(
      sweepKey({ ...origin, choices: { ...choices, exclude: ['a', 'b'] } }),
      sweepKey({ ...origin, choices: { ...choices, exclude: ['b', 'a'] } }),
    );
  });

  it('refits with the fit’s own seed, rows and holdout, and skips permutation importance', () => {
    const o = sweepOptions({ ...choices, holdout: 0.25, exclude: ['id'] }, training);
    assert.equal(o.target, 'species');
    assert.equal(o.holdout, 0.25);
    assert.deepEqual(o.exclude, ['id']);
    assert.equal(o.params?.seed, 9);
    assert.equal(o.params?.trees, 12);
    assert.equal(o.permutationImportance, false);
    assert.equal(sweepOptions(choices, training).holdout, undefined, 'no holdout: the out-of-bag rows are the estimate');
  });

  it('summarises core’s sweep for the panel, best lowest, and marks the count of the forest shown', async () => {
    const load = await loadCsv(path.join(FIXTURES, 'iris.csv'));
    const options = { ...sweepOptions(choices, training), workers: 2 };
    const sweep = await sweepFeaturesPerSplit(load.table, options);
    const report = await fitForest(load.table, options);
    const current = featuresPerSplitOf(report.forest);
    // Four features: the square root rounded down is 2, the usual classification default (common practice).
    assert.equal(current, 2);
    assert.equal(sweep.defaultCount, 2);
    const s = sweepSummary(sweep, current);
    assert.deepEqual(s.points.map((q) => q.featuresPerSplit), [1, 2, 4]);
    const lowest = Math.min(...s.points.map((q) => q.oobError));
    assert.equal(s.points.find((q) => q.featuresPerSplit === s.best)!.oobError, lowest);
    assert.equal(s.current, 2);
    // The refit at the default count is the forest the fit grew: the same out-of-bag error.
    assert.equal(s.points.find((q) => q.featuresPerSplit === 2)!.oobError, report.curve[report.curve.length - 1]);
    assert.ok(isHostToPanel({ fit: 'f', type: 'sweep', state: 'done', progress: null, text: '', result: s }));
  });

  it('stops when cancelled part-way', async () => {
    const load = await loadCsv(path.join(FIXTURES, 'iris.csv'));
    const abort = new AbortController();
    let seen = 0;
    await assert.rejects(
      sweepFeaturesPerSplit(load.table, {
        ...sweepOptions({ ...choices, trees: 40 }, training),
        workers: 1,
        signal: abort.signal,
        onProgress: (done) => {
          seen = done;
          if (done >= 10) abort.abort();
        },
      }),
      { name: 'AbortError' },
    );
    assert.ok(seen < 3 * 40, `stopped after ${seen} trees`);
  });
});
