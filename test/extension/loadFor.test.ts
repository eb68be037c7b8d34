// Reading a CSV for an existing forest: features are kept even where this file makes them look droppable.
import * as assert from 'node:assert/strict';
import { loadCsvText } from '../../src/core/csv/load';
import { encodeTable } from '../../src/core/forest/predict';
import type { Schema } from '../../src/core/base/schema';
import { columnTypesFor, loadForForest } from '../../src/extension/session/loadFor';

const schema: Schema = {
  features: [
    { name: 'size', kind: 'numeric', hadMissing: false, reference: 1, edges: [1] },
    { name: 'colour', kind: 'categorical', levels: ['red', 'blue'], hadMissing: false, reference: 0 },
    { name: 'ok', kind: 'boolean', levels: ['false', 'true'], hadMissing: false, reference: 0 },
  ],
  target: { name: 'y', task: 'classification', classes: ['a', 'b'] },
};

describe('extension loading for a forest', () => {
  it('forces the forest\'s kinds, reading booleans as categories', () => {
    assert.deepEqual(columnTypesFor(schema), { size: 'numeric', colour: 'categorical', ok: 'categorical' });
  });

  it('keeps a feature that is constant in this file, which a plain read leaves out', async () => {
    const text = 'size,colour,ok\n1,red,true\n1,blue,true\n';
    const plain = await loadCsvText(text, {}, 'x.csv');
    assert.ok(plain.dropped.some((d) => d.name === 'size'), 'a plain read drops the constant column');
    const kept = await loadForForest((o) => loadCsvText(text, o, 'x.csv'), schema);
    assert.deepEqual(kept.dropped, []);
    const x = encodeTable(schema, kept.table);
    assert.deepEqual(Array.from(x), [1, 0, 1, 1, 1, 1]);
  });

  it('falls back to a plain read when a feature is missing, so the mismatch is named by encodeTable', async () => {
    const text = 'size,colour\n1,red\n2,blue\n';
    const load = await loadForForest((o) => loadCsvText(text, o, 'x.csv'), schema);
    // Without forcing, both present columns would also be dropped here (all values distinct: identifier-like).
    assert.deepEqual(load.dropped, []);
    assert.throws(() => encodeTable(schema, load.table, 'x.csv'), /missing column "ok"\./);
  });
});
