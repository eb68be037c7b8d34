// The active-forest session on real fits: hovers, votes, suspects and maps agree with core computed
// directly. Iris: Fisher (1936), via the open fixture (see test/fixtures/open/SOURCES.md).
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { readFileSync } from 'node:fs';
import { loadCsvText } from '../../src/core/csv/load';
import { inBagCounts } from '../../src/core/forest/bootstrap';
import { predictEncoded, predictTable } from '../../src/core/forest/predict';
import { cellCentre, isRegionMap } from '../../src/protocol/messages';
import { voteMargin } from '../../src/core/forest/row-votes';
import { loadForForest } from '../../src/extension/session/loadFor';
import { readSettings } from '../../src/extension/settings';
import { FIXTURES, fitFixture, readerOf, type Fitted } from './helpers';

const panel = { ...readSettings({ get: () => undefined }).settings.panel, gridResolution: 12, pointsDrawn: 60, dependenceRows: 1000, pairFeatures: 3 };

describe('extension session (iris, classification)', () => {
  let f: Fitted;
  before(async () => {
    f = await fitFixture(path.join(FIXTURES, 'iris.csv'), 'species', { trees: 40, seed: 3 });
  });
  after(async () => f?.session.dispose());

  it('scores every tree on every row on its scoring thread, matching core\'s in-process predictor', () => {
    const { store } = f.session;
    const expected = predictTable(f.report.forest, f.load.table);
    const n = f.load.table.rowCount;
    assert.equal(store.trees, 40);
    let differ = 0;
    for (let r = 0; r < n; r++) for (let t = 0; t < 40; t++) if (store.vote(t, r) !== expected.votes[t * n + r]) differ++;
    assert.equal(differ, 0);
  });

  it('counts out-of-bag trees as core does, and recomputes Breiman margins identical to core\'s', () => {
    f.report.trainRows.forEach((r, i) => {
      const a = f.session.store.answer(r);
      const oobTrees = f.report.rows.oobTrees[i];
      assert.equal(a.oob?.tally.trees ?? 0, oobTrees);
      const core = f.report.rows.margin![i];
      if (Number.isNaN(core)) assert.equal(a.margin, undefined);
      else {
        assert.equal(a.margin, core);
        const t = a.oob!.tally;
        if (t.kind === 'classification') assert.ok(Math.abs(voteMargin(t.counts, a.truth!, t.trees) - core) < 1e-12, `row ${r}`);
      }
      if (a.all.tally.kind === 'classification') assert.equal(a.all.tally.counts.reduce((x, y) => x + y, 0), 40);
      // The headline of a training row is the out-of-bag answer, the same as the fit's own out-of-bag prediction.
      if (a.oob) {
        assert.equal(a.lead, 'out-of-bag');
        const K = f.report.forest.schema.target.classes!.length;
        a.oob.proba!.forEach((p, k) => assert.ok(Math.abs(p - f.report.rows.oobProba![i * K + k]) < 1e-12, `row ${r} class ${k}`));
      }
    });
  });

  it('lists suspects most doubtful first, each with an out-of-bag majority other than its label', () => {
    const s = f.session.suspects(50);
    for (let i = 1; i < s.length; i++) assert.ok(s[i - 1].score <= s[i].score);
    for (const x of s) {
      assert.ok(x.score < 0);
      assert.notEqual(x.oobPredicted, x.label);
    }
    // Iris has a handful of versicolor/virginica rows that forests misclassify out-of-bag (common practice to expect a few).
    assert.ok(s.length >= 1 && s.length <= 15, `${s.length} suspects`);
    // The same rows, in the same order, as the fit's own report lists (one definition, in core).
    assert.deepEqual(
      s.map((x) => x.row),
      f.report.suspects.map((d) => f.report.trainRows[d.index] + 1),
    );
    const lines = f.session.suspectLines(50);
    assert.equal(lines[0].line, s[0].row + 1, 'one-line rows: data row N sits on line N + 1');
  });

  it('hovers on the right row of the file, and not on the header', () => {
    const text = readFileSync(f.file, 'utf8');
    const read = readerOf(text);
    assert.equal(f.session.rowAtLine(1, read), undefined);
    assert.equal(f.session.rowAtLine(2, read), 0);
    const md = f.session.hover(0, (row) => `command:copse.showRowVotes?${row}`);
    assert.match(md, /row 1 \(training row; \d+ of 40 trees never saw it\)/);
    assert.match(md, /Out-of-bag prediction of species: setosa/);
    assert.match(md, /command:copse\.showRowVotes\?1/);
  });

  it('reports per-row votes for the disagreement view, out-of-bag trees included', () => {
    const [v] = f.session.rowVotes([77]);
    const r = 76;
    assert.equal(v.row, 77);
    assert.equal(v.votes.length, 40);
    const counts = [0, 0, 0];
    for (const c of v.votes) counts[c]++;
    assert.deepEqual(v.counts, counts);
    const n = f.report.rows.count;
    const i = Array.from(f.report.trainRows).indexOf(r);
    const expectedOob = [];
    const inBag = inBagCounts(f.report.forest.params, 40, n);
    for (let t = 0; t < 40; t++) if (inBag[t * n + i] === 0) expectedOob.push(t);
    assert.deepEqual(v.outOfBag, expectedOob);
    assert.equal(expectedOob.length, f.report.rows.oobTrees[i]);
    assert.equal(v.label, f.report.rows.truth[i]);
    assert.deepEqual(f.session.rowVotes([9999]), []);
  });

  it('picks the two petal measurements for the first map (the leading iris features, common knowledge)', () => {
    const axes = f.session.defaultAxes()!;
    assert.deepEqual([axes.x, axes.y].sort(), ['petal_length', 'petal_width']);
  });

  it('scores a typical-row map exactly as core predicts the same grid rows', async () => {
    const map = await f.session.regionMap('petal_length', 'sepal_width', { mode: 'typical' }, panel);
    assert.ok(isRegionMap(map));
    const schema = f.report.forest.schema;
    const p = schema.features.length;
    const fx = schema.features.findIndex((x) => x.name === 'petal_length');
    const fy = schema.features.findIndex((x) => x.name === 'sepal_width');
    const x = new Float64Array(map.nx * map.ny * p);
    for (let j = 0; j < map.ny; j++)
      for (let i = 0; i < map.nx; i++) {
        const o = (j * map.nx + i) * p;
        schema.features.forEach((g, k) => (x[o + k] = g.reference));
        x[o + fx] = cellCentre(map.x, map.nx, i);
        x[o + fy] = cellCentre(map.y, map.ny, j);
      }
    const direct = predictEncoded(f.report.forest, x, map.nx * map.ny);
    assert.equal(map.cells.task, 'classification');
    if (map.cells.task !== 'classification') return;
    for (let c = 0; c < map.nx * map.ny; c++) {
      assert.equal(map.cells.predicted[c], direct.predicted[c]);
      assert.ok(Math.abs(map.cells.strength[c] - direct.proba![c * 3 + direct.predicted[c]]) < 1e-12);
    }
    assert.equal(map.heldAt.length, 2);
    assert.ok(map.points && map.points.x.length <= 60 && map.points.total === 150);
    const species = readFileSync(f.file, 'utf8').split('\n').slice(1);
    map.points.row.forEach((row, k) => assert.equal(schema.target.classes![map.points!.target[k]], species[row - 1].split(',')[4]));
  });

  it('averages over rows for partial dependence (Friedman 2001, section 8.2): each cell is the mean prediction over the data with two features set', async () => {
    const map = await f.session.regionMap('petal_width', 'petal_length', { mode: 'averaged' }, { ...panel, gridResolution: 5 });
    assert.deepEqual(map.reference, { mode: 'averaged', sampleRows: 150 });
    const schema = f.report.forest.schema;
    const p = schema.features.length;
    const fx = schema.features.findIndex((x) => x.name === 'petal_width');
    const fy = schema.features.findIndex((x) => x.name === 'petal_length');
    const enc = f.session.encoded;
    if (map.cells.task !== 'classification') throw new Error('expected classes');
    for (const [i, j] of [[0, 0], [2, 3], [4, 4]]) {
      const x = Float64Array.from(enc);
      for (let r = 0; r < 150; r++) {
        x[r * p + fx] = cellCentre(map.x, 5, i);
        x[r * p + fy] = cellCentre(map.y, 5, j);
      }
      const pred = predictEncoded(f.report.forest, x, 150);
      const mean = [0, 1, 2].map((k) => Array.from({ length: 150 }, (_, r) => pred.proba![r * 3 + k]).reduce((a, b) => a + b, 0) / 150);
      const best = mean.indexOf(Math.max(...mean));
      assert.equal(map.cells.predicted[j * 5 + i], best);
      assert.ok(Math.abs(map.cells.strength[j * 5 + i] - mean[best]) < 1e-9);
    }
  });

  it('draws averaged maps coarser than typical ones, since every cell averages many rows', async () => {
    const map = await f.session.regionMap('petal_width', 'petal_length', { mode: 'averaged' }, { ...panel, gridResolution: 80, dependenceRows: 10 });
    assert.deepEqual([map.nx, map.ny], [40, 40]);
    assert.deepEqual(map.reference, { mode: 'averaged', sampleRows: 10 });
    const typical = await f.session.regionMap('petal_width', 'petal_length', { mode: 'typical' }, { ...panel, gridResolution: 80 });
    assert.deepEqual([typical.nx, typical.ny], [80, 80]);
  });

  it('holds the other features at a chosen row for a row map', async () => {
    const map = await f.session.regionMap('sepal_length', 'sepal_width', { mode: 'row', row: 120 }, panel);
    const values = readFileSync(f.file, 'utf8').split('\n')[120].split(',');
    assert.deepEqual(map.heldAt, [
      { feature: 'petal_length', value: String(Number(values[2])) },
      { feature: 'petal_width', value: String(Number(values[3])) },
    ]);
    await assert.rejects(f.session.regionMap('sepal_length', 'sepal_length', { mode: 'typical' }, panel), /two different features/);
    await assert.rejects(f.session.regionMap('sepal_length', 'nope', { mode: 'typical' }, panel), /no feature "nope"/);
  });

  it('draws small maps for pairs among the leading features, without points', async () => {
    const maps = await f.session.mapMatrix(panel, 10);
    assert.equal(maps.length, 3, 'three features make three pairs');
    for (const m of maps) {
      assert.equal(m.points, null);
      assert.ok(isRegionMap(m));
    }
  });

  it('scores another CSV with the same columns, in any column order, for hovers', async () => {
    const lines = readFileSync(f.file, 'utf8').trim().split('\n');
    const swapped = lines.slice(0, 6).map((l) => {
      const c = l.split(',');
      return [c[3], c[0], c[4], c[2], c[1]].join(',');
    });
    const text = swapped.join('\n') + '\n';
    // In five setosa rows petal_width is constant, so a plain read leaves it out; forcing the forest's kinds keeps it.
    const plain = await loadCsvText(text, {}, 'other.csv');
    await assert.rejects(f.session.scoreOther(plain.table, plain.delimiter, 'other.csv', () => text), /missing column "petal_width"/);
    const { table, delimiter } = await loadForForest((o) => loadCsvText(text, o, 'other.csv'), f.report.forest.schema);
    const other = await f.session.scoreOther(table, delimiter, 'other.csv', () => text);
    const direct = predictTable(f.report.forest, table);
    for (let r = 0; r < 5; r++) assert.equal(other.store.answer(r).headline.predicted, direct.predicted[r]);
    const md = f.session.hoverOther(other, 2);
    assert.match(md, /row 3 \(scored with the forest from iris\.csv\)/);
    assert.doesNotMatch(md, /out-of-bag/);
    assert.equal(other.lines.rowAt(3, readerOf(text)), 1);
  });
});

describe('extension session (Friedman #1, regression)', () => {
  let f: Fitted;
  before(async () => {
    f = await fitFixture(path.join(FIXTURES, 'friedman1.csv'), 'y', { trees: 15, seed: 5 }, { holdout: 0.2 });
  });
  after(async () => f?.session.dispose());

  it('tells training rows from held-out rows and shows tree spread', () => {
    const held = f.report.holdoutRows![0];
    const a = f.session.store.answer(held);
    assert.equal(a.role, 'holdout');
    assert.equal(a.oob, undefined);
    const train = f.report.trainRows[0];
    assert.equal(f.session.store.answer(train).role, 'training');
    const md = f.session.hover(train);
    assert.match(md, /All 15 trees, including those fitted on this row: mean [-\d.]+, sd [\d.]+/);
    assert.match(md, /within ±[\d.]+ of the prediction/);
  });

  it('measures agreement as the share of trees within the tolerance of the forest value', () => {
    const r = f.report.holdoutRows![3];
    const s = f.session.store;
    const centre = s.answer(r).all.predicted;
    let near = 0;
    for (let t = 0; t < s.trees; t++) if (Math.abs(s.vote(t, r) - centre) <= s.tolerance) near++;
    assert.equal(s.answer(r).headline.agreement, near / s.trees);
    assert.ok(s.tolerance > 0);
  });

  it('lists the training rows whose label is far from their out-of-bag prediction, as the fit does', () => {
    const s = f.session.suspects(1000);
    assert.deepEqual(
      s.map((x) => x.row),
      f.report.suspects.map((d) => f.report.trainRows[d.index] + 1),
    );
    for (const x of s) assert.ok(Math.abs(x.score) > 3.5);
  });

  it('maps the mean over trees on the grid', async () => {
    const map = await f.session.regionMap('x1', 'x2', { mode: 'typical' }, { ...panel, gridResolution: 6 });
    const schema = f.report.forest.schema;
    const p = schema.features.length;
    const x = new Float64Array(36 * p);
    for (let j = 0; j < 6; j++)
      for (let i = 0; i < 6; i++) {
        const o = (j * 6 + i) * p;
        schema.features.forEach((g, k) => (x[o + k] = g.reference));
        x[o + 0] = cellCentre(map.x, 6, i);
        x[o + 1] = cellCentre(map.y, 6, j);
      }
    const direct = predictEncoded(f.report.forest, x, 36);
    if (map.cells.task !== 'regression') throw new Error('expected values');
    map.cells.value.forEach((v, c) => assert.ok(Math.abs(v - direct.value![c]) < 1e-9));
  });
});
