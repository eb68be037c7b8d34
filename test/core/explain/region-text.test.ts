// The words behind a decision-region map: built from an invented grid whose answer is known by
// construction, so each share and range in the sentence can be checked by hand.
import * as assert from 'node:assert/strict';
import { CLOSE_VOTE, describeRegions } from '../../../src/core/explain/region-text';
import type { NumericAxis } from '../../../src/core/explain/grid-axis';

const X: NumericAxis = { feature: 'wind_kmh', kind: 'numeric', min: 0, max: 40 };
const Y: NumericAxis = { feature: 'gust', kind: 'numeric', min: 0, max: 10 };

describe('describeRegions: a decision-region map in words', () => {
  it('names each class with its share and where it wins, and the share of close votes', () => {
    // 40 × 10 cells, one per km/h: "crashed" above 30 km/h, "soared" below; the 4 columns next to 30 are close votes.
    const nx = 40;
    const ny = 10;
    const predicted: number[] = [];
    const strength: number[] = [];
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        predicted.push(i >= 30 ? 1 : 0);
        strength.push(i >= 28 && i < 32 ? 0.55 : 0.9);
      }
    }
    const t = describeRegions({ x: X, y: Y, nx, ny, cells: { task: 'classification', predicted, strength } }, ['soared', 'crashed']);
    assert.ok(CLOSE_VOTE > 0.55);
    assert.match(t.sentence, /soared on 75% of the map, mostly where wind_kmh is below 30; /);
    assert.match(t.sentence, /crashed on 25% of the map, mostly where wind_kmh is above 30\./);
    assert.match(t.sentence, /10% of the map is a close vote/);
    assert.equal(t.table.columns.length, 8, 'the 40 columns are read as 8 bands');
    assert.equal(t.table.rows.length, 8);
    assert.equal(t.table.columns[0], '0–5');
    assert.equal(t.table.rows[0].cells[7], 'crashed (100%)', 'the last band (35–40) is all crashed');
    assert.equal(t.table.rows[0].cells[0], 'soared (100%)');
  });

  it('gives a regression map its range and where it is highest and lowest', () => {
    const nx = 10;
    const ny = 10;
    const value: number[] = [];
    for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) value.push(i * 10);
    const t = describeRegions({ x: X, y: Y, nx, ny, cells: { task: 'regression', value } }, []);
    assert.match(t.sentence, /runs from 0 to 90: highest mostly where wind_kmh is above 32, lowest mostly where wind_kmh is below 8\./);
    assert.equal(t.table.columns[0], '0–4', '10 columns in 8 bands: the first holds one');
    assert.equal(t.table.rows[0].cells[0], '0');
    assert.equal(t.table.rows[0].cells[7], '85', 'the last band holds columns 8 and 9');
  });

  it('lists the levels of a level axis', () => {
    const x = { feature: 'sky', kind: 'categorical' as const, levels: ['clear', 'haze', 'storm'] };
    const t = describeRegions(
      { x, y: Y, nx: 3, ny: 2, cells: { task: 'classification', predicted: [0, 0, 1, 0, 0, 1], strength: [1, 1, 1, 1, 1, 1] } },
      ['soared', 'crashed'],
    );
    assert.match(t.sentence, /crashed on 33% of the map, mostly where sky is storm/);
    assert.deepEqual(t.table.columns, ['clear', 'haze', 'storm']);
  });
});
