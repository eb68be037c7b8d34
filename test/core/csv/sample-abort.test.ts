// Row sampling (reservoir, seeded) and stopping a load part-way.
import * as assert from 'node:assert/strict';
import { loadCsv, loadCsvText } from '../../../src/core/csv/load';
import { loadFromSource } from '../../../src/core/csv/loader';
import type { ByteSource } from '../../../src/core/csv/sources';
import { FixtureDir, numeric } from './helpers';

/** Row i holds its own index, so a sampled row tells which file row it was; `line` is where it starts. */
function indexed(n: number, multiLineEvery = 0): string {
  const out = ['idx,group,note'];
  for (let i = 0; i < n; i++) out.push(`${i},g${i % 4},${multiLineEvery && i % multiLineEvery === 0 ? '"two\nlines"' : 'one'}`);
  return out.join('\n') + '\n';
}
const types = { idx: 'numeric' } as const;

describe('csv sampling', () => {
  it('keeps the requested number of rows, in file order, each with its own line', async () => {
    const r = await loadCsvText(indexed(500, 7), { sampleRows: 40, sampleSeed: 3, columnTypes: types });
    assert.equal(r.rowsRead, 500);
    assert.equal(r.table.rowCount, 40);
    const idx = numeric(r, 'idx');
    for (let i = 1; i < idx.length; i++) assert.ok(idx[i] > idx[i - 1], 'file order');
    // Row k starts on line 2 + k + (rows before k that spanned two lines: indices 0, 7, 14, ... below k).
    const lineOf = (k: number) => 2 + k + Math.ceil(k / 7);
    assert.deepEqual(Array.from(r.table.lineOfRow), idx.map(lineOf));
    assert.deepEqual(Array.from(r.table.rowNumber!), idx.map((k) => k + 1), 'each kept row knows its data row number');
    assert.ok(r.notes.includes('Kept a uniform random sample of 40 of the 500 rows (seed 3).'), JSON.stringify(r.notes));
  });

  it('gives the same sample for the same seed and a different one for another seed', async () => {
    const text = indexed(1000);
    const a = await loadCsvText(text, { sampleRows: 50, sampleSeed: 11, columnTypes: types });
    const b = await loadCsvText(text, { sampleRows: 50, sampleSeed: 11, columnTypes: types });
    const c = await loadCsvText(text, { sampleRows: 50, sampleSeed: 12, columnTypes: types });
    assert.deepEqual(a.table, b.table);
    assert.notDeepEqual(numeric(a, 'idx'), numeric(c, 'idx'));
    const d = await loadCsvText(text, { sampleRows: 50, columnTypes: types });
    const e = await loadCsvText(text, { sampleRows: 50, columnTypes: types });
    assert.deepEqual(d.table, e.table, 'a default seed, not a random one');
  });

  it('keeps every row with the same probability, as reservoir sampling promises (J. S. Vitter 1985, "Random sampling with a reservoir", ACM TOMS 11(1); chi-square over 400 seeds against the 0.999 quantile of chi2(49) = 85.35 from scipy.stats)', async () => {
    const n = 50;
    const k = 10;
    const seeds = 400;
    const hits = new Array<number>(n).fill(0);
    const text = indexed(n);
    for (let s = 0; s < seeds; s++) {
      const r = await loadCsvText(text, { sampleRows: k, sampleSeed: s, columnTypes: types });
      for (const i of numeric(r, 'idx')) hits[i]++;
    }
    const expected = (seeds * k) / n;
    const chi2 = hits.reduce((sum, h) => sum + (h - expected) ** 2 / expected, 0);
    // Sampling without replacement makes the counts vary less than the multinomial the quantile assumes, so
    // this bound is conservative; a sampler favouring early or late rows exceeds it many times over.
    assert.ok(chi2 < 85.35, `chi-square ${chi2.toFixed(1)}; counts ${hits.join(' ')}`);
    const firstHalf = hits.slice(0, n / 2).reduce((a, b) => a + b, 0);
    assert.ok(Math.abs(firstHalf - (seeds * k) / 2) < 150, `first half kept ${firstHalf} times`);
  });

  it('does not sample, nor say so, when the file has no more rows than asked for', async () => {
    const r = await loadCsvText(indexed(30), { sampleRows: 30, columnTypes: types });
    assert.equal(r.table.rowCount, 30);
    assert.deepEqual(numeric(r, 'idx'), Array.from({ length: 30 }, (_, i) => i));
    assert.ok(!r.notes.some((n) => /sample/.test(n)));
  });

  it('samples among the rows that have a target, and says so', async () => {
    const text = ['idx,y'].concat(Array.from({ length: 300 }, (_, i) => `${i},${i % 3 === 0 ? '' : i % 2 ? 'a' : 'b'}`)).join('\n');
    const r = await loadCsvText(text, { target: 'y', sampleRows: 20, columnTypes: types });
    assert.equal(r.table.rowCount, 20);
    assert.ok(numeric(r, 'idx').every((i) => i % 3 !== 0));
    assert.ok(r.notes.some((n) => n === 'Kept a uniform random sample of 20 of the 200 rows with a target value (seed 1).'), JSON.stringify(r.notes));
    assert.ok(r.notes.some((n) => /Dropped 100 rows whose target 'y' is missing \(the first on line 2\)/.test(n)));
  });

  it('infers kinds from the sampled rows alone, with levels in the order the sample shows them', async () => {
    const text = ['c,x'].concat(Array.from({ length: 2000 }, (_, i) => `${i < 1000 ? `early${i % 5}` : `late${i % 5}`},${i % 7}`)).join('\n');
    const r = await loadCsvText(text, { sampleRows: 100, sampleSeed: 5 });
    const col = r.table.columns.find((c) => c.name === 'c');
    assert.ok(col && col.kind === 'categorical');
    const seen: string[] = [];
    for (const code of col.codes) if (!seen.includes(col.levels[code])) seen.push(col.levels[code]);
    assert.deepEqual(col.levels, seen);
    assert.ok(col.levels.length <= 10);
  });
});

describe('csv abort', () => {
  let dir: FixtureDir;
  before(() => (dir = new FixtureDir()));
  after(() => dir.remove());

  it('rejects at once with an AbortError when the signal has already fired', async () => {
    const file = dir.write('a.csv', 'a,b\n1,2\n');
    const controller = new AbortController();
    controller.abort();
    await assert.rejects(loadCsv(file, { signal: controller.signal }), (e: Error) => e.name === 'AbortError');
    await assert.rejects(loadCsvText('a,b\n1,2\n', { signal: controller.signal }), (e: Error) => e.name === 'AbortError');
  });

  it('stops reading part-way through when the signal fires', async () => {
    const controller = new AbortController();
    let served = 0;
    const total = 50;
    const source: ByteSource = {
      label: 'slow.csv',
      // eslint-disable-next-line @typescript-eslint/require-await -- async so the loader gets the AsyncIterable it takes.
      read: async function* () {
        yield Buffer.from('a,b\n');
        for (let i = 0; i < total; i++) {
          served++;
          if (served === 5) controller.abort();
          yield Buffer.from(`${i},${i % 3}\n`.repeat(100));
        }
      },
    };
    await assert.rejects(loadFromSource(source, { signal: controller.signal }), (e: Error) => e.name === 'AbortError' && /slow\.csv/.test(e.message));
    assert.ok(served < total, `read ${served} of ${total} chunks`);
  });
});
