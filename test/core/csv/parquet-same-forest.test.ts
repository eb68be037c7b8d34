// The same table, the same forest: a Parquet (from an independent writer) or gzip copy of a CSV loads to the same
// columns and rows, and fits, for the same seed, to the same forest bit for bit and so the same out-of-bag figures.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { gzipSync } from 'node:zlib';
import { loadCsv } from '../../../src/core/csv/load';
import type { LoadResult } from '../../../src/core/csv/types';
import { fitForest } from '../../../src/core/forest/fit';
import { serializeModel } from '../../../src/core/model/file';
import { FixtureDir, assertUnchanged, snapshot } from './helpers';
import { writeParquetWithDuckDb } from './parquet-writer';

const demo = path.join(__dirname, '..', '..', '..', '..', 'demo');

/**
 * A committed demo CSV three times over (DuckDB's row groups hold at least 2,048 rows, and the check needs several),
 * with blanks punched in (nulls in numeric and text columns) and a date column added.
 */
function withGapsAndDates(file: string): string {
  const lines = readFileSync(path.join(demo, file), 'utf8').trimEnd().split('\n');
  const header = lines[0].split(',');
  const out = [[...header, 'logged_on'].join(',')];
  const body = [...lines.slice(1), ...lines.slice(1), ...lines.slice(1)];
  for (let i = 1; i <= body.length; i++) {
    const cells = body[i - 1].split(',');
    for (let j = 0; j < cells.length - 1; j++) if ((i * 7 + j * 3) % 23 === 0) cells[j] = '';
    const day = new Date(Date.UTC(2025, 0, 1) + (i % 400) * 86_400_000).toISOString().slice(0, 10);
    out.push([...cells, i % 17 === 0 ? '' : day].join(','));
  }
  return out.join('\n') + '\n';
}

function sameTable(a: LoadResult, b: LoadResult, what: string): void {
  assert.equal(a.table.rowCount, b.table.rowCount, what);
  assert.deepEqual(a.table.columns, b.table.columns, `${what}: columns, kinds and every cell`);
  assert.deepEqual(a.table.rowNumber, b.table.rowNumber, what);
  assert.deepEqual(a.dropped.map((d) => d.name).sort(), b.dropped.map((d) => d.name).sort(), what);
  assert.deepEqual(a.notes, b.notes, what);
}

describe('the same table, the same forest (Parquet written by DuckDB, and .csv.gz)', function () {
  this.timeout(300_000);
  const dir = new FixtureDir();
  after(() => dir.remove());

  for (const { csv, target, seed, keepText } of [
    { csv: 'kite-flights.csv', target: 'outcome', seed: 11, keepText: [] as string[] },
    { csv: 'loaf-rise.csv', target: 'rise_mm', seed: 5, keepText: ['steam_oven'] },
  ]) {
    it(`${csv}: snappy and zstd Parquet with several row groups, and gzip, fit as the CSV does`, async () => {
      const text = withGapsAndDates(csv);
      const plainFile = dir.write(csv, text);
      const plain = await loadCsv(plainFile, { target });
      const textColumns = plain.table.columns.filter((c) => c.kind !== 'numeric');
      assert.ok(textColumns.length >= 2, 'text categories (and a boolean) are part of the check');
      assert.ok(
        plain.table.columns.some((c) => c.kind === 'numeric' && c.values.some(Number.isNaN)),
        'nulls in numeric columns are part of the check',
      );
      assert.ok(plain.notes.some((n) => n.includes("'logged_on' holds ISO dates")), 'a date column is part of the check');

      const copies: [string, string][] = [['gzip', dir.write(`${csv}.gz`, gzipSync(text))]];
      for (const compression of ['snappy', 'zstd'] as const) {
        const file = path.join(dir.path, `${csv}.${compression}.parquet`);
        await writeParquetWithDuckDb(plainFile, file, { compression, rowGroupRows: 2048, text: keepText });
        copies.push([compression, file]);
      }
      const fit = (r: LoadResult) => fitForest(r.table, { target, params: { trees: 20, seed }, workers: 2, permutationImportance: true });
      const reference = await fit(plain);
      for (const [what, file] of copies) {
        const before = snapshot(file);
        const loaded = await loadCsv(file, { target });
        assertUnchanged(file, before);
        sameTable(loaded, plain, what);
        if (what !== 'gzip') {
          const hp = await import('hyparquet');
          const groups = (await hp.parquetMetadataAsync(await hp.asyncBufferFromFile(file))).row_groups.length;
          assert.ok(groups >= 3, `${what}: DuckDB wrote ${groups} row groups; the check needs several`);
        }
        const report = await fit(loaded);
        assert.equal(serializeModel(report.forest), serializeModel(reference.forest), `${what}: the forest, bit for bit`);
        assert.deepEqual(report.oob, reference.oob, `${what}: out-of-bag figures`);
        assert.deepEqual(report.rows.margin, reference.rows.margin, `${what}: per-row margins`);
        assert.deepEqual(report.importance, reference.importance, `${what}: importance`);
      }
    });
  }
});
