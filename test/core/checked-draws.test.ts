// Recovering which trees drew which rows of a saved forest's own training table, from the seed alone, and
// refusing when the rows cannot be told for certain. Seeded data of our own.
import * as assert from 'node:assert/strict';
import seedrandom from 'seedrandom';
import { outOfBagTrees } from '../../src/core/forest/bootstrap';
import { fitForest } from '../../src/core/forest/fit';
import { encodeTable } from '../../src/core/forest/predict';
import { checkedDraws } from '../../src/core/forest/checked-draws';
import type { Table } from '../../src/core/data/table';
import type { Forest } from '../../src/core/forest/forest';
import { tableFrom } from './helpers/table';

/** Two numeric features and a category; a three-class label and a value, both missing on every 17th row. */
function rows(n: number, seed: string): Table {
  const rng = seedrandom(seed);
  const a: number[] = [];
  const b: number[] = [];
  const tint: string[] = [];
  const label: Array<string | null> = [];
  const value: Array<number | null> = [];
  for (let i = 0; i < n; i++) {
    const av = rng() * 2 - 1;
    const bv = rng();
    const t = ['ash', 'rust', 'moss'][Math.floor(rng() * 3)];
    const s = av + 0.8 * bv + (t === 'moss' ? 0.5 : 0) + 0.3 * (rng() - 0.5);
    a.push(av);
    b.push(bv);
    tint.push(t);
    // Uneven classes, so balanced weights differ from 1.
    label.push(i % 17 === 3 ? null : s < 0 ? 'few' : s < 1.1 ? 'many' : 'some');
    value.push(i % 17 === 3 ? null : s);
  }
  return tableFrom({ a, b, tint, label, value });
}

/** The forest as a model file written before the holdout's size was recorded reads. */
function withoutHeldOut(forest: Forest): Forest {
  const training = { ...forest.training };
  delete (training as { heldOut?: number }).heldOut;
  return { ...forest, training };
}

function pick(table: Table, keep: (i: number) => boolean): Table {
  const idx = Array.from({ length: table.rowCount }, (_, i) => i).filter(keep);
  return {
    rowCount: idx.length,
    columns: table.columns.map((c) => (c.kind === 'numeric' ? { ...c, values: Float64Array.from(idx, (i) => c.values[i]) } : { ...c, codes: Int32Array.from(idx, (i) => c.codes[i]) })),
    lineOfRow: Int32Array.from(idx, (i) => table.lineOfRow[i]),
  };
}

/** The refusal's sentence, or a line saying there was none, so a match against it fails readably. */
function refusal(answer: ReturnType<typeof checkedDraws>): string {
  return typeof answer === 'string' ? answer : `no refusal: the draws of ${answer.checkedTrees} trees were recovered`;
}

describe('recovering a forest’s draws from its training table', function () {
  this.timeout(120000);

  it('finds the fit’s training rows past a holdout and rows without a target, with each row’s out-of-bag trees (balanced weights too)', async () => {
    const table = rows(300, 'draws-a');
    const report = await fitForest(table, {
      target: 'label',
      exclude: ['value'],
      holdout: 0.25,
      params: { trees: 15, seed: 12, classWeight: 'balanced' },
      workers: 2,
      permutationImportance: false,
      keepInBag: true,
    });
    const { forest, trainRows, holdoutRows, rows: results } = report;
    const all = Array.from({ length: table.rowCount }, (_, i) => i);
    const got = checkedDraws(forest, table, encodeTable(forest.schema, table), null, all);
    assert.ok(typeof got !== 'string', refusal(got));
    assert.deepEqual(got.trainRows, trainRows);
    assert.equal(got.checkedTrees, 15);
    const position = new Map(Array.from(trainRows, (r, i) => [r, i]));
    for (const r of all) {
      const at = position.get(r);
      if (at === undefined) {
        assert.equal(got.outOfBag[r], null, `row ${r} was not trained on`);
        continue;
      }
      assert.deepEqual(got.outOfBag[r], outOfBagTrees(results.inBag!, 15, trainRows.length, at));
    }
    assert.ok(holdoutRows!.length > 50 && got.outOfBag.filter((t) => t === null).length === table.rowCount - trainRows.length);
    // A model file written before the holdout's size was kept: the split is inferred, and the covers confirm it.
    const older = checkedDraws(withoutHeldOut(forest), table, encodeTable(forest.schema, table), null, all);
    assert.deepEqual(older, got);
  });

  it('refuses a table the forest was fitted on a part of, another target, or too few rows', async () => {
    const table = rows(240, 'draws-b');
    // A fit on every other row stands in for a sampled load, which the model does not record.
    const half = pick(table, (i) => i % 2 === 0);
    const report = await fitForest(half, { target: 'value', exclude: ['label'], params: { trees: 8, seed: 3 }, workers: 1, permutationImportance: false, keepInBag: true });
    const { forest } = report;
    const x = encodeTable(forest.schema, table);
    // The model records that nothing was held out, so the extra rows give it away at once...
    assert.match(refusal(checkedDraws(forest, table, x, null, [0])), /fitted on 113 rows; this reading of the data has 226 with a target\.$/);
    // ...and a model file too old to say is caught by its trees.
    assert.match(refusal(checkedDraws(withoutHeldOut(forest), table, x, null, [0])), /do not reproduce the trees \(tree 1, leaf \d+: /);
    const tooFew = pick(table, (i) => i < 60);
    assert.match(refusal(checkedDraws(forest, tooFew, encodeTable(forest.schema, tooFew), null, [0])), /fitted on 113 rows; this reading of the data has only 56 with a target/);
    const renamed = { ...table, columns: table.columns.map((c) => (c.name === 'value' ? { ...c, name: 'worth' } : c)) };
    assert.match(refusal(checkedDraws(forest, renamed, x, null, [0])), /no column "value"/);
    assert.match(refusal(checkedDraws(forest, table, x, 'f'.repeat(64), [0])), /not the one the forest was trained on/);
    // The table it was fitted on is recovered exactly.
    const own = checkedDraws(forest, half, encodeTable(forest.schema, half), null, [0, 1]);
    assert.ok(typeof own !== 'string', refusal(own));
    const n = report.trainRows.length;
    assert.deepEqual(own.outOfBag, [0, 1].map((i) => outOfBagTrees(report.rows.inBag!, 8, n, i)));
  });
});
