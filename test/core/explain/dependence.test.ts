// Partial dependence (Friedman 2001, Annals of Statistics 29(5); section 8.2 from memory) as the mean of individual
// conditional expectation curves (Goldstein, Kapelner, Bleich & Pitkin 2015, JCGS 24(1)), checked against
// brute force: score every sampled row with the feature overwritten, through the forest's own scorer.
import * as assert from 'node:assert/strict';
import seedrandom from 'seedrandom';
import { featureGrid, partialDependence, partialDependence2D, sampleRowIndices } from '../../../src/core/explain/dependence';
import { fitForest } from '../../../src/core/forest/fit';
import type { Forest } from '../../../src/core/forest/forest';
import { encodeTable, predictEncoded } from '../../../src/core/forest/predict';
import { tableFrom } from '../helpers/table';
import { mixed, openDataset } from './helpers/data';

/** Forest outputs with features set to the given values, for each listed row: [row][output]. */
function scoredWith(forest: Forest, x: Float64Array, rows: ArrayLike<number>, set: Array<[number, number]>): Float64Array {
  const p = forest.schema.features.length;
  const copy = new Float64Array(rows.length * p);
  for (let s = 0; s < rows.length; s++) {
    copy.set(x.subarray(rows[s] * p, rows[s] * p + p), s * p);
    for (const [f, v] of set) copy[s * p + f] = v;
  }
  const pred = predictEncoded(forest, copy, rows.length);
  return pred.proba ?? pred.value!;
}

const pearson = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  const n = a.length;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i] / n;
    mb += b[i] / n;
  }
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    sab += (a[i] - ma) * (b[i] - mb);
    saa += (a[i] - ma) ** 2;
    sbb += (b[i] - mb) ** 2;
  }
  return sab / Math.sqrt(saa * sbb);
};

describe('partial dependence and ICE curves', function () {
  this.timeout(120000);

  it('recover the shape of each term of an additive function (monotone where the term is)', async () => {
    // y = 3 x0 + sin(2 pi x1) + noise, x uniform: the partial dependence on x0 is 3 x0 plus a constant and
    // on x1 is sin(2 pi x1) plus a constant (Friedman 2001: for additive f it recovers each term up to a constant).
    const rng = seedrandom('additive');
    const x0: number[] = [];
    const x1: number[] = [];
    const x2: number[] = [];
    const y: number[] = [];
    for (let i = 0; i < 800; i++) {
      x0.push(rng());
      x1.push(rng());
      x2.push(rng());
      y.push(3 * x0[i] + Math.sin(2 * Math.PI * x1[i]) + 0.1 * (rng() - 0.5));
    }
    const table = tableFrom({ x0, x1, x2, y });
    const rep = await fitForest(table, { target: 'y', params: { trees: 60, seed: 2 }, workers: 2, permutationImportance: false });
    const x = encodeTable(rep.forest.schema, table);
    const pd0 = partialDependence(rep.forest, x, table.rowCount, 0, { gridSize: 15 });
    const g0 = pd0.grid.values;
    // Monotone: no step down larger than the noise a forest leaves (a tenth of the 3-unit rise, a loose bound).
    let drops = 0;
    for (let g = 1; g < g0.length; g++) if (pd0.average[g] < pd0.average[g - 1] - 0.05) drops++;
    assert.equal(drops, 0, Array.from(pd0.average).map((v) => v.toFixed(3)).join(' '));
    const slope = (pd0.average[g0.length - 1] - pd0.average[0]) / (g0[g0.length - 1] - g0[0]);
    // A forest flattens towards the ends of a range (leaves average the nearest rows), so the end-to-end
    // slope falls somewhat short of 3 (common practice); it must not exceed it by much.
    assert.ok(slope > 2.1 && slope < 3.3, `slope ${slope}`);
    assert.ok(pearson(pd0.average, g0) > 0.99);
    const pd1 = partialDependence(rep.forest, x, table.rowCount, 1, { gridSize: 15 });
    const sine = Array.from(pd1.grid.values, (v) => Math.sin(2 * Math.PI * v));
    assert.ok(pearson(pd1.average, sine) > 0.97, `correlation ${pearson(pd1.average, sine)}`);
    // The noise feature barely moves the prediction.
    const pd2 = partialDependence(rep.forest, x, table.rowCount, 2, { gridSize: 15 });
    const range = (a: Float64Array) => Math.max(...a) - Math.min(...a);
    assert.ok(range(pd2.average) < 0.15 * range(pd0.average), `noise range ${range(pd2.average)}`);
  });

  for (const [task, target, drop] of [['classification', 'label', 'value'], ['regression', 'value', 'label']] as const) {
    it(`equal brute-force averaging of rescored rows, ${task}, numeric and level features`, async () => {
      const table = mixed(400, `pd-${task}`);
      const rep = await fitForest(table, { target, exclude: [drop], params: { trees: 25, seed: 4 }, workers: 2, permutationImportance: false });
      const forest = rep.forest;
      const x = encodeTable(forest.schema, table);
      const K = task === 'classification' ? 3 : 1;
      for (const name of ['a', 'colour']) {
        const f = forest.schema.features.findIndex((s) => s.name === name);
        const pd = partialDependence(forest, x, table.rowCount, f, { sampleRows: 60, gridSize: 12 });
        const G = pd.grid.values.length;
        assert.equal(pd.iceRows.length, 60);
        if (name === 'colour') assert.deepEqual(pd.grid.labels, forest.schema.features[f].levels);
        let worst = 0;
        for (let g = 0; g < G; g++) {
          const scored = scoredWith(forest, x, pd.iceRows, [[f, pd.grid.values[g]]]);
          for (let s = 0; s < pd.iceRows.length; s++) for (let k = 0; k < K; k++) worst = Math.max(worst, Math.abs(pd.ice[(s * G + g) * K + k] - scored[s * K + k]));
          for (let k = 0; k < K; k++) {
            let mean = 0;
            for (let s = 0; s < pd.iceRows.length; s++) mean += scored[s * K + k];
            worst = Math.max(worst, Math.abs(pd.average[g * K + k] - mean / pd.iceRows.length));
          }
        }
        assert.ok(worst < 1e-12, `${name}: largest difference ${worst}`);
      }
    });
  }

  it('is exactly the mean of its ICE curves, and every row counts once in the distribution', async () => {
    const table = await openDataset('diabetes.csv', 'progression');
    const rep = await fitForest(table, { target: 'progression', params: { trees: 30 }, workers: 2, permutationImportance: false });
    const x = encodeTable(rep.forest.schema, table);
    const bmi = rep.forest.schema.features.findIndex((f) => f.name === 'bmi');
    const pd = partialDependence(rep.forest, x, table.rowCount, bmi, { sampleRows: 100, seed: 9 });
    const G = pd.grid.values.length;
    for (let g = 0; g < G; g++) {
      let s = 0;
      for (let r = 0; r < 100; r++) s += pd.ice[r * G + g];
      assert.equal(pd.average[g], s / 100);
    }
    const d = pd.distribution;
    assert.equal(d.counts.reduce((a, b) => a + b, 0) + d.missing, table.rowCount);
    assert.equal(d.boundaries.length, G - 1);
    // Diabetes (Efron et al. 2004): BMI is among the strongest predictors of progression; its curve rises.
    assert.ok(pd.average[G - 1] - pd.average[0] > 40, `rise ${pd.average[G - 1] - pd.average[0]}`);
    // Quantile points spread the rows over the cells roughly evenly; an even grid leaves its tails sparse.
    const even = partialDependence(rep.forest, x, table.rowCount, bmi, { sampleRows: 20, spacing: 'even' });
    const ec = even.distribution.counts;
    assert.ok(ec[0] + ec[ec.length - 1] < ec[Math.floor(ec.length / 3)] + ec[Math.floor(ec.length / 2)], Array.from(ec).join(' '));
  });

  it('counts missing cells and unseen levels apart, and places values on cell boundaries in the lower cell', async () => {
    const table = mixed(300, 'pd-distribution');
    const rep = await fitForest(table, { target: 'label', exclude: ['value'], params: { trees: 5 }, workers: 1, permutationImportance: false });
    const forest = rep.forest;
    const x = encodeTable(forest.schema, table);
    const a = forest.schema.features.findIndex((f) => f.name === 'a');
    const pd = partialDependence(forest, x, table.rowCount, a, { grid: [-1, 0, 1], sampleRows: 10 });
    let missing = 0;
    let low = 0;
    for (let i = 0; i < table.rowCount; i++) {
      const v = x[i * forest.schema.features.length + a];
      if (Number.isNaN(v)) missing++;
      else if (v <= -0.5) low++;
    }
    assert.ok(missing > 0);
    assert.equal(pd.distribution.missing, missing);
    assert.equal(pd.distribution.counts[0], low);
    assert.deepEqual(Array.from(pd.distribution.boundaries), [-0.5, 0.5]);
    // A level column: a missing cell and a level the model never saw both count as missing.
    const colour = forest.schema.features.findIndex((f) => f.name === 'colour');
    const fresh = tableFrom({ a: [0.1, 0.2, 0.3, 0.4], b: [1, 1, 1, 1], colour: ['red', 'teal', null, 'blue'], flag: ['yes', 'no', 'no', 'yes'], noise: [0, 0, 0, 0] });
    const fx = encodeTable(forest.schema, fresh);
    const byLevel = partialDependence(forest, fx, 4, colour);
    assert.equal(byLevel.distribution.missing, 2);
    const levels = forest.schema.features[colour].levels!;
    assert.equal(byLevel.distribution.counts[levels.indexOf('red')], 1);
    assert.equal(byLevel.distribution.counts[levels.indexOf('blue')], 1);
  });

  it('two-feature partial dependence equals brute force on every cell, for every pairing of numeric and level axes', async () => {
    const table = mixed(300, 'pd2');
    const rep = await fitForest(table, { target: 'label', exclude: ['value'], params: { trees: 20 }, workers: 2, permutationImportance: false });
    const forest = rep.forest;
    const x = encodeTable(forest.schema, table);
    const at = (name: string) => forest.schema.features.findIndex((f) => f.name === name);
    const even = (name: string, n: number) => Array.from(featureGrid(forest, x, table.rowCount, at(name), { gridSize: n, spacing: 'even' }).values);
    const levels = (name: string) => forest.schema.features[at(name)].levels!.map((_, i) => i);
    // Grids given out of order and with a level code the model never saw, which scores as missing.
    const pairs: Array<[string, number[], string, number[]]> = [
      ['a', even('a', 7).reverse(), 'colour', levels('colour')],
      ['colour', [...levels('colour'), 9], 'b', even('b', 6)],
      ['a', even('a', 5), 'b', [1.5, 0.2, 0.9, 0.05]],
      ['colour', levels('colour').reverse(), 'flag', levels('flag')],
    ];
    for (const [fx, xGrid, fy, yGrid] of pairs) {
      const pd = partialDependence2D(forest, x, table.rowCount, at(fx), at(fy), { xGrid, yGrid, sampleRows: 40 });
      assert.equal(pd.rows.length, 40);
      let worst = 0;
      for (let j = 0; j < yGrid.length; j++) {
        for (let i = 0; i < xGrid.length; i++) {
          const scored = scoredWith(forest, x, pd.rows, [[at(fx), xGrid[i]], [at(fy), yGrid[j]]]);
          for (let k = 0; k < 3; k++) {
            let mean = 0;
            for (let s = 0; s < 40; s++) mean += scored[s * 3 + k];
            worst = Math.max(worst, Math.abs(pd.values[(j * xGrid.length + i) * 3 + k] - mean / 40));
          }
        }
      }
      assert.ok(worst < 1e-12, `${fx} x ${fy}: largest difference ${worst}`);
    }
    const a = at('a');
    const xGrid = even('a', 4);
    // For the same seed a map and a curve average over the same rows, so they can be read side by side.
    const one = partialDependence(forest, x, table.rowCount, a, { grid: xGrid, sampleRows: 40 });
    const two = partialDependence2D(forest, x, table.rowCount, a, at('b'), { xGrid, yGrid: [0.5], sampleRows: 40 });
    assert.deepEqual(one.iceRows, two.rows);
    assert.throws(() => partialDependence2D(forest, x, table.rowCount, a, a, { xGrid, yGrid: xGrid }), /two different/);
    assert.throws(() => partialDependence(forest, x, table.rowCount, a, { grid: [0, NaN] }), /finite/);
  });

  it('samples rows deterministically for a seed, without repeats, and takes all rows when there are few', () => {
    const a = sampleRowIndices(1000, 50, 3);
    assert.deepEqual(a, sampleRowIndices(1000, 50, 3));
    assert.notDeepEqual(a, sampleRowIndices(1000, 50, 4));
    assert.equal(new Set(a).size, 50);
    for (let i = 1; i < a.length; i++) assert.ok(a[i] > a[i - 1]);
    assert.deepEqual(sampleRowIndices(5, 50, 3), Int32Array.from([0, 1, 2, 3, 4]));
  });
});
