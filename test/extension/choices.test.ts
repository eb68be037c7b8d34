// The "adjust" step's parsing: what the user types into the input boxes.
import * as assert from 'node:assert/strict';
import { choicesFrom, describeChoice, paramsFor, parseChoice } from '../../src/extension/fit/choices';
import { readSettings } from '../../src/extension/settings';

const training = readSettings({ get: () => undefined }).settings.training;

describe('extension fit choices', () => {
  it('parses depth limits, with none / 0 / empty meaning no limit', () => {
    for (const t of ['none', '0', '', 'No limit']) assert.deepEqual(parseChoice('maxDepth', t), { ok: true, value: null });
    assert.deepEqual(parseChoice('maxDepth', '8'), { ok: true, value: 8 });
    assert.equal(parseChoice('maxDepth', '-2').ok, false);
    assert.equal(parseChoice('maxDepth', '2.5').ok, false);
  });

  it('reads holdout as a fraction or a percentage', () => {
    assert.deepEqual(parseChoice('holdout', '20%'), { ok: true, value: 0.2 });
    assert.deepEqual(parseChoice('holdout', '0.25'), { ok: true, value: 0.25 });
    assert.deepEqual(parseChoice('holdout', '30'), { ok: true, value: 0.3 });
    assert.deepEqual(parseChoice('holdout', '0'), { ok: true, value: 0 });
    assert.equal(parseChoice('holdout', '95%').ok, false);
  });

  it('accepts the features-per-split spellings and rejects others with a message', () => {
    assert.deepEqual(parseChoice('featuresPerSplit', 'auto'), { ok: true, value: 'auto' });
    assert.deepEqual(parseChoice('featuresPerSplit', 'third'), { ok: true, value: 'third' });
    assert.deepEqual(parseChoice('featuresPerSplit', '0.3'), { ok: true, value: 0.3 });
    const bad = parseChoice('featuresPerSplit', 'half');
    assert.equal(bad.ok, false);
    assert.ok(!bad.ok && bad.message.length > 10);
    assert.equal(parseChoice('trees', '0').ok, false);
    assert.deepEqual(parseChoice('trees', ' 250 '), { ok: true, value: 250 });
  });

  it('starts from the settings and turns adjusted choices into core parameters', () => {
    const c = { ...choicesFrom(training, 'species', 'classification'), trees: 30, maxDepth: 4, minLeaf: 3, seed: 7, featuresPerSplit: 2 as const };
    const p = paramsFor(c, training);
    assert.equal(p.task, 'classification');
    assert.equal(p.trees, 30);
    assert.equal(p.maxDepth, 4);
    assert.equal(p.minLeaf, 3);
    assert.equal(p.seed, 7);
    assert.equal(p.featuresPerSplit, 2);
    assert.equal(describeChoice(c, 'maxDepth'), '4');
    assert.equal(describeChoice({ ...c, holdout: 0 }, 'holdout'), 'none (out-of-bag estimate only)');
    assert.equal(describeChoice({ ...c, exclude: ['a', 'b'] }, 'exclude'), 'a, b');
  });

  it('takes cross-validation folds from 2 to 20, with 0, none or empty meaning none', () => {
    for (const t of ['0', 'none', '']) assert.deepEqual(parseChoice('folds', t), { ok: true, value: 0 });
    assert.deepEqual(parseChoice('folds', '5'), { ok: true, value: 5 });
    assert.equal(parseChoice('folds', '1').ok, false);
    assert.equal(parseChoice('folds', '21').ok, false);
    const c = choicesFrom(training, 'species', 'classification');
    assert.equal(describeChoice(c, 'folds'), 'none');
    assert.match(describeChoice({ ...c, folds: 5 }, 'folds'), /^5 \(fits 5 more forests/);
  });
});
