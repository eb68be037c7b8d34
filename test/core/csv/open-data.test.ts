// The loader against published data and against pandas, an independent CSV reader.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { loadCsv } from '../../../src/core/csv/load';
import type { LoadResult } from '../../../src/core/csv/types';
import { kinds, numeric, texts } from './helpers';

const OPEN = join(__dirname, '..', '..', '..', '..', 'test', 'fixtures', 'open');
const PYTHON = '/usr/bin/python3'; // Debian's, with pandas (python3-pandas)

/** pandas.read_csv of the file, round-trip float parsing (correctly rounded, like ours), as JSON columns. */
function pandasColumns(file: string): Record<string, (number | string | null)[]> {
  const script = [
    'import json, sys, pandas',
    "df = pandas.read_csv(sys.argv[1], float_precision='round_trip')",
    'out = {c: [None if pandas.isna(v) else (v.item() if hasattr(v, "item") else v) for v in df[c]] for c in df.columns}',
    'print(json.dumps(out))',
  ].join('\n');
  const r = spawnSync(PYTHON, ['-c', script, file], { encoding: 'utf8', maxBuffer: 64 << 20 });
  assert.equal(r.status, 0, `pandas failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as Record<string, (number | string | null)[]>;
}

function assertSameAsPandas(r: LoadResult, file: string): void {
  const ref = pandasColumns(file);
  assert.deepEqual(r.header, Object.keys(ref));
  for (const c of r.table.columns) {
    const want = ref[c.name];
    if (c.kind === 'numeric') assert.deepEqual(numeric(r, c.name), want, c.name);
    else assert.deepEqual(texts(r, c.name), want.map((v) => (v === null ? null : String(v))), c.name);
  }
}

describe('csv open datasets', () => {
  it('iris: 150 rows, four numeric measurements, 50 of each of 3 species (Fisher 1936), cells as pandas reads them', async () => {
    const file = join(OPEN, 'iris.csv');
    const r = await loadCsv(file, { target: 'species' });
    assert.equal(r.table.rowCount, 150);
    assert.deepEqual(kinds(r), { sepal_length: 'numeric', sepal_width: 'numeric', petal_length: 'numeric', petal_width: 'numeric', species: 'categorical' });
    const species = texts(r, 'species');
    for (const s of ['setosa', 'versicolor', 'virginica']) assert.equal(species.filter((x) => x === s).length, 50, s);
    assert.deepEqual(r.dropped, []);
    assertSameAsPandas(r, file);
  });

  it('wine: 178 rows, 13 numeric features, cultivars 59/71/48 (UCI Wine), cells as pandas reads them', async () => {
    const file = join(OPEN, 'wine.csv');
    const r = await loadCsv(file, { target: 'cultivar' });
    assert.equal(r.table.rowCount, 178);
    const cultivar = texts(r, 'cultivar');
    assert.deepEqual(['class_0', 'class_1', 'class_2'].map((c) => cultivar.filter((x) => x === c).length), [59, 71, 48]);
    assert.equal(Object.values(kinds(r)).filter((k) => k === 'numeric').length, 13);
    assertSameAsPandas(r, file);
  });

  it('Pima: 532 rows (Pima.tr 200 then Pima.te 332, MASS help page) x 7 numeric columns, type No 355 / Yes 177 as MASS 7.3-58.2 holds them, cells as pandas reads them', async () => {
    const file = join(OPEN, 'pima.csv');
    const r = await loadCsv(file, { target: 'type' });
    assert.equal(r.table.rowCount, 532);
    assert.deepEqual(kinds(r), { npreg: 'numeric', glu: 'numeric', bp: 'numeric', skin: 'numeric', bmi: 'numeric', ped: 'numeric', age: 'numeric', type: 'boolean' });
    // No/Yes is one of the pairs the loader reads as a boolean column (src/core/csv/infer.ts).
    const type = texts(r, 'type');
    assert.deepEqual(['No', 'Yes'].map((c) => type.filter((x) => x === c).length), [355, 177]);
    // table(Pima.tr$type) in MASS 7.3-58.2: the first 200 rows are the training frame, unchanged.
    assert.deepEqual(['No', 'Yes'].map((c) => type.slice(0, 200).filter((x) => x === c).length), [132, 68]);
    assert.deepEqual(r.dropped, []);
    assertSameAsPandas(r, file);
  });

  it('diabetes and Friedman #1: numeric targets stay numeric, cells as pandas reads them', async () => {
    for (const [name, target, rows] of [['diabetes.csv', 'progression', 442], ['friedman1.csv', 'y', 1000]] as const) {
      const file = join(OPEN, name);
      const r = await loadCsv(file, { target });
      assert.equal(r.table.rowCount, rows);
      assert.equal(kinds(r)[target], 'numeric');
      assertSameAsPandas(r, file);
    }
  });
});
