import * as assert from 'node:assert/strict';
import { binColumns, binOf, describeFeatures, numericEdges } from '../../src/core/data/binning';
import { tableFrom } from './helpers/table';

describe('binning', () => {
  it('is exact for few distinct values: one bin each, edges halfway between', () => {
    const edges = numericEdges(Float64Array.from([3, 1, 2, 2, 10, NaN]), true);
    assert.deepEqual(edges, [1.5, 2.5, 6.5]);
    assert.deepEqual([1, 2, 3, 10, 0, 100].map((x) => binOf(edges, x)), [0, 1, 2, 3, 0, 3]);
  });

  it('uses at most 256 bins and keeps them roughly equal in size for many values', () => {
    const v = Float64Array.from({ length: 100000 }, (_, i) => Math.sin(i) * 1000);
    const edges = numericEdges(v, false);
    assert.ok(edges.length <= 255 && edges.length > 240, `${edges.length} edges`);
    const counts = new Array<number>(edges.length + 1).fill(0);
    for (const x of v) counts[binOf(edges, x)]++;
    assert.ok(Math.max(...counts) < 3 * (v.length / 256), `largest bin ${Math.max(...counts)}`);
  });

  it('puts every training value on the same side of each edge as its bin (the split invariant)', () => {
    const v = Float64Array.from({ length: 5000 }, (_, i) => Math.round(Math.cos(i * 7.1) * 300) / 7);
    const edges = numericEdges(v, false);
    for (const x of v) {
      const b = binOf(edges, x);
      for (let e = 0; e < edges.length; e++) assert.equal(b <= e, x <= edges[e]);
    }
  });

  it('keeps adjacent doubles apart', () => {
    const a = 1;
    const b = 1 + Number.EPSILON;
    const edges = numericEdges(Float64Array.from([a, b]), false);
    assert.equal(binOf(edges, a), 0);
    assert.equal(binOf(edges, b), 1);
  });

  it('gives missing cells their own code after the value bins, and levels their own bins', () => {
    const t = tableFrom({ x: [1, null, 3], c: ['u', 'v', null] });
    const rows = Int32Array.from([0, 1, 2]);
    const { infos } = describeFeatures(t.columns, rows);
    const m = binColumns(t.columns, infos, rows);
    assert.deepEqual(Array.from(m.valueBins), [2, 2]);
    assert.deepEqual(Array.from(m.bins), [0, 0, 2, 1, 1, 2]);
    assert.equal(infos[0].reference, 2);
    assert.equal(infos[1].hadMissing, true);
  });
});
