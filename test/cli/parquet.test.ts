// The command line on Parquet and .csv.gz: fit, votes, explain and predict answer as on the CSV they copy, and
// predict writes Parquet or CSV by the output's extension.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { gzipSync } from 'node:zlib';
import { writeParquetWithDuckDb } from '../core/csv/parquet-writer';
import type { FitJson } from './output';

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function json<T>(...args: string[]): T {
  const r = copse(...args, '--json');
  assert.equal(r.code, 0, r.stderr);
  return JSON.parse(r.stdout) as T;
}

describe('copse on Parquet and gzip files', function () {
  this.timeout(180_000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-parquet-cli-'));
  const parquet = path.join(dir, 'kites.parquet');
  const gz = path.join(dir, 'kites.csv.gz');
  const model = path.join(dir, 'kites.json');
  before(async () => {
    await writeParquetWithDuckDb(kites, parquet, { compression: 'zstd', rowGroupRows: 2048 });
    writeFileSync(gz, gzipSync(readFileSync(kites)));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('fits the same forest from the CSV, its Parquet copy and its gzip copy', () => {
    const fit = (file: string, save: string) => json<FitJson>('fit', file, '--target', 'outcome', '--trees', '15', '--seed', '4', '--save', save);
    const fromCsv = fit(kites, path.join(dir, 'csv.json'));
    const fromParquet = fit(parquet, model);
    const fromGz = fit(gz, path.join(dir, 'gz.json'));
    assert.deepEqual(fromParquet.oob, fromCsv.oob);
    assert.deepEqual(fromGz.oob, fromCsv.oob);
    const trees = (f: string) => readFileSync(f, 'utf8').split('\n').slice(1).join('\n');
    assert.equal(trees(model), trees(path.join(dir, 'csv.json')), 'the trees, bit for bit');
  });

  it('votes and explains rows of a Parquet file as of the CSV', () => {
    for (const command of ['votes', 'explain']) {
      // Each file with the forest fitted on it (the two forests are the same), so both answer out-of-bag.
      const onCsv = json<{ rows: unknown[] }>(command, path.join(dir, 'csv.json'), kites, '--rows', '1,7,12');
      const onParquet = json<{ rows: unknown[] }>(command, model, parquet, '--rows', '1,7,12');
      assert.equal(onParquet.rows.length, 3);
      // A Parquet file has no text lines; everything else about each row is the same.
      const withoutLine = (rows: unknown[]) => rows.map((r) => ({ ...(r as Record<string, unknown>), line: undefined }));
      assert.deepEqual(withoutLine(onParquet.rows), withoutLine(onCsv.rows), command);
    }
  });

  it('predict --out writes Parquet for .parquet and CSV otherwise, with the same answers', async () => {
    const csvOut = path.join(dir, 'scored.csv');
    const pqOut = path.join(dir, 'scored.parquet');
    const before = readFileSync(parquet);
    assert.equal(copse('predict', model, kites, '--out', csvOut).code, 0);
    const r = copse('predict', model, parquet, '--out', pqOut);
    assert.equal(r.code, 0, r.stderr);
    assert.ok(readFileSync(parquet).equals(before), 'the input is never modified');
    const fromCsv = readFileSync(csvOut, 'utf8').trimEnd().split('\n').map((l) => l.split(','));
    const hp = await import('hyparquet');
    const rows = await hp.parquetReadObjects({ file: await hp.asyncBufferFromFile(pqOut) });
    assert.equal(rows.length, fromCsv.length - 1);
    const header = fromCsv[0];
    // The forest was fitted on the Parquet file, so scoring it also adds the out-of-bag columns; the CSV is another file.
    assert.deepEqual(Object.keys(rows[0]).slice(0, header.length), header, 'the input columns, then the added ones, in order');
    assert.ok(Object.keys(rows[0]).includes('oob_predicted_outcome'));
    assert.ok(rows.every((row) => row.row_role === 'training'));
    for (const name of ['predicted_outcome', 'tree_agreement', 'probability_soared', 'wind_kmh', 'sail', 'night_flight']) {
      const j = header.indexOf(name);
      rows.forEach((row, i) => assert.equal(row[name] === null ? '' : String(row[name]), fromCsv[i + 1][j], `${name}, row ${i + 1}`));
    }
    const pqToCsv = path.join(dir, 'from-parquet.csv');
    assert.equal(copse('predict', model, parquet, '--out', pqToCsv).code, 0);
    const lines = readFileSync(pqToCsv, 'utf8').trimEnd().split('\n');
    assert.ok(lines[0].startsWith(header.join(',')));
    assert.equal(lines.length, fromCsv.length);
    const gzToParquet = path.join(dir, 'from-gz.parquet');
    assert.equal(copse('predict', model, gz, '--out', gzToParquet).code, 0);
    const fromGz = await hp.parquetReadObjects({ file: await hp.asyncBufferFromFile(gzToParquet) });
    assert.deepEqual(fromGz.map((row): unknown => row.predicted_outcome), rows.map((row): unknown => row.predicted_outcome));
  });
});
