// Cautions in the summary: imbalance, leakage, many-valued categories, missing values.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import type { Column } from '../../src/core/data/table';
import { cautions, type CautionInput } from '../../src/core/checks/cautions';
import { singleFeatureScore } from '../../src/core/checks/single-feature';
import { sampleRows } from '../../src/core/data/sample';
import { FIXTURES } from '../extension/helpers';

function rng(seed: number): () => number {
  let s = seed >>> 0 || 1;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

function input(features: Column[], truth: number[], extra: Partial<CautionInput> = {}): CautionInput {
  return {
    task: 'classification',
    classes: ['no', 'yes'],
    target: 'y',
    features,
    trainRows: Int32Array.from(truth.keys()),
    truth: Float64Array.from(truth),
    oobScore: NaN,
    seed: 1,
    ...extra,
  };
}

const numeric = (name: string, values: number[]): Column => ({ name, kind: 'numeric', values: Float64Array.from(values) });

describe('extension cautions', () => {
  const n = 600;
  const r = rng(9);
  const truth = Array.from({ length: n }, () => (r() < 0.5 ? 1 : 0));
  const noise = numeric('noise', truth.map(() => r()));

  it('flags a feature that restates the target (leakage), naming it', () => {
    const copy = numeric('outcome_code', truth.map((y) => y * 10 + r()));
    const out = cautions(input([noise, copy], truth));
    const leak = out.filter((c) => c.kind === 'leakage');
    assert.equal(leak.length, 1);
    assert.equal(leak[0].column, 'outcome_code');
    assert.match(leak[0].message, /"outcome_code" alone predicts "y"/);
  });

  it('does not flag a strong but honest feature: petal width on iris (about 95% alone, from memory)', async () => {
    const { table } = await loadCsv(path.join(FIXTURES, 'iris.csv'));
    const species = table.columns.find((c) => c.name === 'species')!;
    if (species.kind === 'numeric') throw new Error('species should be categorical');
    const features = table.columns.filter((c) => c.name !== 'species');
    const c = cautions({
      task: 'classification',
      classes: species.levels,
      target: 'species',
      features,
      trainRows: Int32Array.from({ length: table.rowCount }, (_, i) => i),
      truth: Float64Array.from(species.codes),
      oobScore: 0.95,
      seed: 1,
    });
    assert.deepEqual(c.filter((x) => x.kind === 'leakage'), []);
    const pw = features.find((f) => f.name === 'petal_width')!;
    const rows = sampleRows(150, 150, 1);
    const s = singleFeatureScore(pw, { task: 'classification', classes: species.levels, trainRows: Int32Array.from({ length: 150 }, (_, i) => i), truth: Float64Array.from(species.codes) }, rows.subarray(0, 75), rows.subarray(75))!;
    assert.ok(s.score > 0.85 && s.score < 0.98, `petal width alone: ${s.score}`);
    assert.ok(Math.abs(s.baseline - 1 / 3) < 0.15);
  });

  it('does not mistake an identifier-like category for leakage, but warns about its many levels', () => {
    const ids: Column = { name: 'ticket', kind: 'categorical', codes: Int32Array.from(truth.keys()), levels: truth.map((_, i) => `T${i}`) };
    const out = cautions(input([noise, ids], truth));
    assert.equal(out.filter((c) => c.kind === 'leakage').length, 0);
    const card = out.filter((c) => c.kind === 'cardinality');
    assert.equal(card.length, 1);
    assert.match(card[0].message, /"ticket" has 600 distinct values/);
  });

  it('flags one feature carrying nearly all permutation importance', () => {
    const a = numeric('a', truth.map(() => r()));
    const out = cautions(input([noise, a, numeric('b', truth.map(() => r()))], truth, { permutation: Float64Array.from([0.001, 0.3, -0.002]) }));
    const dom = out.filter((c) => c.kind === 'leakage');
    assert.equal(dom.length, 1);
    assert.equal(dom[0].column, 'a');
    // 0.3 of the 0.301 positive total.
    assert.match(dom[0].message, /carries 99\.7% of the permutation importance/);
  });

  it('flags a rare class below 10% of rows and quotes balanced accuracy', () => {
    const skew = truth.map((_, i) => (i % 25 === 0 ? 1 : 0));
    const out = cautions(input([noise], skew, { oobBalancedAccuracy: 0.61 }));
    const imb = out.filter((c) => c.kind === 'imbalance');
    assert.equal(imb.length, 1);
    assert.match(imb[0].message, /"yes" is 4\.0% of training rows \(24 of 600\)/);
    assert.match(imb[0].message, /balanced accuracy is 61\.0%/);
    assert.equal(cautions(input([noise], truth)).filter((c) => c.kind === 'imbalance').length, 0);
  });

  it('lists features with more than 20% missing', () => {
    const holes = numeric('holes', truth.map((_, i) => (i % 3 === 0 ? NaN : i)));
    const out = cautions(input([noise, holes], truth));
    const miss = out.filter((c) => c.kind === 'missing');
    assert.equal(miss.length, 1);
    assert.match(miss[0].message, /"holes" 33\.3%/);
    assert.doesNotMatch(miss[0].message, /noise/);
  });

  it('checks regression leakage by held-back R²', () => {
    const y = truth.map(() => r() * 100);
    const out = cautions({ ...input([noise, numeric('y_copy', y.map((v) => v + r() * 0.01))], y), task: 'regression', classes: [] });
    assert.deepEqual(out.filter((c) => c.kind === 'leakage').map((c) => c.column), ['y_copy']);
  });

  it('draws a reproducible sample without repeats', () => {
    const a = sampleRows(100, 30, 4);
    assert.deepEqual(Array.from(a), Array.from(sampleRows(100, 30, 4)));
    assert.equal(new Set(a).size, 30);
    assert.notDeepEqual(Array.from(a), Array.from(sampleRows(100, 30, 5)));
  });
});
