// Permutation importance on given rows. Friedman #1 (Friedman 1991, "Multivariate adaptive regression
// splines", Annals of Statistics 19:1-67; fixture in test/fixtures/open, SOURCES.md): y depends on x1..x5 only,
// so shuffling any of x6..x10 must cost the forest less than shuffling any of x1..x5.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../../src/core/csv/load';
import { fitForest } from '../../../src/core/forest/fit';
import { encodeTable, predictEncoded } from '../../../src/core/forest/predict';
import { findColumn } from '../../../src/core/data/table';
import { permutationOnRows } from '../../../src/core/explain/permutation';

const open = path.join(__dirname, '..', '..', '..', '..', 'test', 'fixtures', 'open');

describe('permutation importance on given rows', function () {
  this.timeout(120_000);

  it('ranks the Friedman #1 noise features below the five it is made of', async () => {
    const load = await loadCsv(path.join(open, 'friedman1.csv'));
    const { forest } = await fitForest(load.table, { target: 'y', params: { trees: 40, seed: 3 }, workers: 2 });
    const x = encodeTable(forest.schema, load.table);
    const y = findColumn(load.table, 'y')!;
    assert.equal(y.kind, 'numeric');
    const truth = Float64Array.from(y.kind === 'numeric' ? y.values : []);
    const score = (rows: Float64Array, n: number) => Promise.resolve(predictEncoded(forest, rows, n));
    const imp = await permutationOnRows({ x, rows: load.table.rowCount, features: 10, truth, task: 'regression', seed: 5, maxRows: 600 }, score);
    assert.equal(imp.rows, 600);
    const names = forest.schema.features.map((f) => f.name);
    const of = (name: string) => imp.mean[names.indexOf(name)];
    const signal = ['x1', 'x2', 'x3', 'x4', 'x5'].map(of);
    const noise = ['x6', 'x7', 'x8', 'x9', 'x10'].map(of);
    assert.ok(Math.min(...signal) > Math.max(...noise), `signal ${signal.join(', ')} vs noise ${noise.join(', ')}`);
    // x4 enters linearly with weight 10 and x3 only through (x3 - 0.5)^2 with weight 20 over [0, 1]: x4 moves y more.
    assert.ok(of('x4') > of('x3'));
    // Same seed, same figures: every shuffle comes from a named stream.
    const again = await permutationOnRows({ x, rows: load.table.rowCount, features: 10, truth, task: 'regression', seed: 5, maxRows: 600 }, score);
    assert.deepEqual(again.mean, imp.mean);
  });

  it('measures a classifier by accuracy lost and leaves unlabelled rows out', async () => {
    const load = await loadCsv(path.join(open, 'iris.csv'));
    const target = load.table.columns[load.table.columns.length - 1].name;
    const { forest } = await fitForest(load.table, { target, params: { trees: 30, seed: 1 }, workers: 2 });
    const x = encodeTable(forest.schema, load.table);
    const truth = Float64Array.from(predictEncoded(forest, x, load.table.rowCount).predicted);
    truth.fill(NaN, 0, 50);
    const imp = await permutationOnRows(
      { x, rows: load.table.rowCount, features: forest.schema.features.length, truth, task: 'classification', seed: 2 },
      (rows, n) => Promise.resolve(predictEncoded(forest, rows, n)),
    );
    assert.equal(imp.rows, 100);
    // Truth is the forest's own answer, so nothing is wrong before shuffling.
    assert.equal(imp.baseline, 0);
    for (const m of imp.mean) assert.ok(m >= 0 && m <= 1);
    assert.ok(Math.max(...imp.mean) > 0.1, 'some feature must matter to iris');
  });

  it('says nothing when no row is labelled', async () => {
    const imp = await permutationOnRows(
      { x: new Float64Array(4), rows: 2, features: 2, truth: Float64Array.of(NaN, NaN), task: 'regression', seed: 1 },
      () => Promise.reject(new Error('must not score')),
    );
    assert.equal(imp.rows, 0);
    assert.ok(Number.isNaN(imp.mean[0]));
  });
});
