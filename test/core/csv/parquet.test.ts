// Parquet input: how each type becomes a column kind, overrides, and one clear sentence for a damaged file.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { loadCsv } from '../../../src/core/csv/load';
import { FixtureDir, kinds, loadError, numeric, reasonOf, texts } from './helpers';
import { writeParquetWithDuckDb } from './parquet-writer';

const ROWS = 3000;

/** Every type the reader maps, and some it leaves out, from one CSV of row numbers. */
const TYPED = `SELECT
  i::INTEGER % 50 AS small_int,
  (i * 1234567891)::BIGINT % 1000 AS big_int,
  (i % 97) / 8.0 AS ratio,
  ((i % 89) / 4)::DECIMAL(9, 2) AS price,
  CASE WHEN i % 10 = 0 THEN NULL ELSE ['oak', 'ash', 'elm'][i % 3 + 1] END AS wood,
  ['low', 'mid', 'high'][i % 3 + 1]::ENUM('low', 'mid', 'high') AS grade,
  i % 4 = 0 AS wet,
  DATE '2023-03-01' + (i % 300)::INTEGER AS planted,
  TIMESTAMP '2023-03-01 06:00:00' + to_minutes((i % 500)::BIGINT) AS checked_at,
  [i, i + 1] AS pair_list,
  {'a': i} AS nested,
  MAP {'k': i} AS lookup,
  'x'::BLOB AS raw,
  CASE WHEN i % 3 = 0 THEN 'yes' ELSE 'no' END AS label
FROM src`;

describe('Parquet input', function () {
  this.timeout(120_000);
  const dir = new FixtureDir();
  let typed = '';
  before(async () => {
    const csv = dir.write('rows.csv', 'i\n' + Array.from({ length: ROWS }, (_, i) => String(i)).join('\n') + '\n');
    typed = path.join(dir.path, 'typed.parquet');
    await writeParquetWithDuckDb(csv, typed, { compression: 'zstd', rowGroupRows: 2048, select: TYPED });
  });
  after(() => dir.remove());

  it('maps Parquet types onto column kinds and leaves nested and binary columns out with a reason', async () => {
    const r = await loadCsv(typed, { target: 'label' });
    assert.deepEqual(kinds(r), {
      small_int: 'numeric',
      big_int: 'numeric',
      ratio: 'numeric',
      price: 'numeric',
      wood: 'categorical',
      grade: 'categorical',
      wet: 'boolean',
      planted: 'numeric',
      checked_at: 'numeric',
      label: 'boolean',
    });
    assert.equal(r.table.rowCount, ROWS);
    assert.equal(r.format, 'parquet');
    assert.deepEqual(numeric(r, 'small_int').slice(0, 3), [0, 1, 2]);
    assert.deepEqual(numeric(r, 'price').slice(5, 7), [1.25, 1.5]); // 5/4 and 6/4 to two places
    assert.deepEqual(texts(r, 'wood').slice(0, 3), [null, 'ash', 'elm']);
    assert.deepEqual(numeric(r, 'planted').slice(0, 2), [19417, 19418]); // 2023-03-01 is day 19,417 after 1970-01-01
    assert.equal(numeric(r, 'checked_at')[1], 19417 + (6 * 60 + 1) / 1440);
    assert.ok(r.notes.some((n) => n.includes("'planted' holds ISO dates")), 'dates carry the same note as in a CSV');
    assert.match(reasonOf(r, 'pair_list'), /list in each cell/);
    assert.match(reasonOf(r, 'nested'), /struct/);
    assert.match(reasonOf(r, 'lookup'), /map|list/);
    assert.match(reasonOf(r, 'raw'), /raw bytes/);
    assert.equal(r.header.length, 14, 'the header lists every column, read or not');
  });

  it('takes the same column-kind overrides as a CSV, and samples rows the same way', async () => {
    const r = await loadCsv(typed, { target: 'label', columnTypes: { small_int: 'categorical', wood: 'exclude', big_int: 'categorical' } });
    assert.equal(kinds(r).small_int, 'categorical');
    assert.equal(kinds(r).wood, undefined);
    assert.match(reasonOf(r, 'wood'), /excluded/);
    assert.equal(texts(r, 'small_int')[7], '7');
    const sampled = await loadCsv(typed, { target: 'label', sampleRows: 500, sampleSeed: 3 });
    assert.equal(sampled.table.rowCount, 500);
    assert.ok(sampled.notes.some((n) => n.includes('uniform random sample of 500 of the 3,000 rows')));
  });

  it('refuses a list column as the target, naming it', async () => {
    await loadError(typed, { target: 'pair_list' }, "'pair_list'", 'list');
  });

  describe('a damaged file: one sentence naming the file, and the column and row group where they apply', () => {
    it('a file cut short (the footer is gone)', async () => {
      const bytes = readFileSync(typed);
      await loadError(dir.write('cut.parquet', bytes.subarray(0, Math.floor(bytes.length * 0.6))), undefined, 'PAR1', 'truncated');
    });

    it('a file too short to hold a footer', async () => {
      await loadError(dir.write('tiny.parquet', Buffer.from('PAR1PAR1')), undefined, 'too short');
    });

    it('a footer that is not Parquet metadata', async () => {
      const bytes = Buffer.from(readFileSync(typed));
      const metaLength = bytes.readUInt32LE(bytes.length - 8);
      bytes.fill(0xee, bytes.length - 8 - metaLength, bytes.length - 8);
      await loadError(dir.write('footer.parquet', bytes), undefined, /footer|damaged/);
    });

    it('column chunks that claim more bytes than the file holds', async () => {
      const bytes = readFileSync(typed);
      const metaLength = bytes.readUInt32LE(bytes.length - 8);
      const footer = bytes.subarray(bytes.length - 8 - metaLength);
      // Half the data removed, the footer kept: later chunks now point beyond the data.
      const shortened = Buffer.concat([bytes.subarray(0, Math.floor((bytes.length - footer.length) / 2)), footer]);
      await loadError(dir.write('claims.parquet', shortened), undefined, /column '[a-z_]+' in row group \d+ claims bytes/);
    });

    it('scrambled page data', async () => {
      const bytes = Buffer.from(readFileSync(typed));
      const metaLength = bytes.readUInt32LE(bytes.length - 8);
      for (let at = 4; at < bytes.length - 8 - metaLength; at += 3) bytes[at] ^= 0xa5;
      await loadError(dir.write('scrambled.parquet', bytes), undefined, /column '[a-z_]+' in row group 1/);
    });
  });
});
