// Explanations as the editor and panel get them: through the explanation thread, into hover text and
// protocol data. Core's own numbers are checked in test/core/explain; here the question is whether the
// host hands over the right rows, outputs and units, and keeps the slow work off the way of what is urgent.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { readFileSync } from 'node:fs';
import { ContributionExplainer, meanAbsoluteContributions, partialDependence, predictInterval, quantileIndexFromFit } from '../../src/core/explain/index';
import { predictEncoded } from '../../src/core/forest/predict';
import { loadCsvText } from '../../src/core/csv/load';
import { fitForest } from '../../src/core/forest/fit';
import { Scorer } from '../../src/core/forest/scorer';
import { isHostToPanel } from '../../src/protocol/messages';
import type { GlobalContributions } from '../../src/protocol/messages';
import { ForestSession } from '../../src/extension/session/session';
import { dependenceMessage, Explanations, largestContributions } from '../../src/extension/session/explanations';
import type { ExplainerLike } from '../../src/extension/workers/explainClient';
import { ExplainClient } from '../../src/extension/workers/explainClient';
import { intervalsReady } from '../../src/extension/session/rowText';
import { membershipOf } from '../../src/core/forest/row-votes';
import { csvOf, fitFixture, FIXTURES, summaryFor, type Fitted } from './helpers';
import { inBagCounts } from '../../src/core/forest/bootstrap';

const close = (a: number, b: number, tol = 1e-9) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(a), Math.abs(b));

describe('extension explanations (iris, classification)', function () {
  this.timeout(120_000);
  let f: Fitted;
  before(async () => {
    f = await fitFixture(path.join(FIXTURES, 'iris.csv'), 'species', { trees: 20, seed: 3 });
  });
  after(async () => f?.session.dispose());

  it('explains the predicted class, and base plus contributions is the forest’s probability (local accuracy, Lundberg et al. 2020)', async () => {
    const s = f.session;
    for (const dataRow of [1, 60, 120, 150]) {
      const c = await s.contributions(dataRow);
      const r = s.numbering.tableRow(dataRow)!;
      // A training row is explained over the trees that never saw it: the answer its hover leads with.
      const answer = s.store.answer(r).headline;
      assert.equal(s.store.answer(r).lead, 'out-of-bag');
      assert.equal(c.outOfBag, true);
      assert.equal(c.trees, answer.tally.trees);
      assert.equal(c.row, dataRow);
      assert.equal(c.output, answer.predicted, 'the class those trees predict is the one explained');
      assert.deepEqual(c.features.map((x) => x.feature), s.forest.schema.features.map((x) => x.name));
      const sum = c.base + c.features.reduce((a, x) => a + x.contribution, 0);
      assert.ok(close(sum, answer.proba![answer.predicted], 1e-9), `row ${dataRow}: ${sum} vs ${answer.proba![answer.predicted]}`);
      assert.ok(close(c.prediction, sum));
      assert.ok(isHostToPanel({ fit: 'f', type: 'contributions', row: dataRow, state: 'ready', contributions: c, text: '' }));
    }
  });

  it('gives the same numbers as core’s explainer run in-process, and shows the row’s own values', async () => {
    const s = f.session;
    const p = s.p;
    const explainer = new ContributionExplainer(f.report.forest);
    const c = await s.contributions(77);
    const r = s.numbering.tableRow(77)!;
    const oobTrees = s.store.outOfBagTrees(r)!;
    const direct = explainer.explainRow(s.encoded, r * p, undefined, oobTrees);
    const K = explainer.outputs;
    c.features.forEach((x, j) => assert.ok(close(x.contribution, direct[j * K + c.output!]), x.feature));
    assert.ok(close(c.base, explainer.baseOver(oobTrees)[c.output!]));
    // Row 77 of iris.csv is its 78th line: the values shown are that line's.
    const cells = readFileSync(f.file, 'utf8').split('\n')[77].split(',');
    assert.deepEqual(c.features.map((x) => x.value), cells.slice(0, 4).map((v) => String(Number(v))));
  });

  it('lists the three largest contributions in the hover, signed, for the predicted class', async () => {
    const s = f.session;
    const r = s.numbering.tableRow(120)!;
    const md = (await s.hoverContributions(r))!;
    const c = await s.contributions(120);
    const top = [...c.features].sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution)).slice(0, 3);
    const label = s.classes[c.output!];
    assert.match(md, new RegExp(`to the probability of ${label}`));
    const listed = [...md.matchAll(/([a-z\\_]+) ([+\u2212][\d.e-]+)/g)].map((m) => [m[1].replace(/\\/g, ''), m[2]]);
    assert.deepEqual(listed.slice(0, 3).map(([name]) => name), top.map((t) => t.feature));
    for (const [name, text] of listed.slice(0, 3)) {
      const v = c.features.find((x) => x.feature === name)!.contribution;
      assert.equal(text.startsWith('\u2212'), v < 0, `${name} ${text} has the sign of ${v}`);
    }
    assert.match(md, /1 other [+\u2212]/, 'the fourth feature is summed, not dropped');
  });

  it('has no intervals for a classifier, and says nothing about them in the hover', async () => {
    assert.equal(await f.session.hoverInterval(0, 0.9), undefined);
    assert.deepEqual(f.session.rowVotes([1], 0.9)[0].interval, undefined);
  });

  it('shows one feature’s partial dependence for the class whose curve moves most, with its curves and the data’s spread', async () => {
    const s = f.session;
    const d = await s.dependence('petal_length', null);
    assert.ok(isHostToPanel({ fit: 'f', type: 'dependence', dependence: d }));
    const p = s.p;
    const fx = s.forest.schema.features.findIndex((x) => x.name === 'petal_length');
    const trainX = new Float64Array(s.trainRows.length * p);
    s.trainRows.forEach((r, i) => trainX.set(s.encoded.subarray(r * p, r * p + p), i * p));
    const direct = partialDependence(f.report.forest, trainX, s.trainRows.length, fx, { gridSize: 40, spacing: 'even', sampleRows: 200, seed: s.forest.params.seed });
    const K = direct.outputs;
    const range = (k: number) => {
      const v = Array.from({ length: direct.grid.values.length }, (_, g) => direct.average[g * K + k]);
      return Math.max(...v) - Math.min(...v);
    };
    const liveliest = [0, 1, 2].reduce((a, k) => (range(k) > range(a) ? k : a), 0);
    assert.equal(d.output, liveliest);
    d.average.forEach((v, g) => assert.ok(close(v, direct.average[g * K + liveliest])));
    // Iris has 150 rows, fewer than the 200 asked for: every training row has a curve, as its data row.
    assert.equal(d.ice.length, 150);
    assert.deepEqual(d.iceRows, Array.from({ length: 150 }, (_, i) => i + 1));
    // Even spacing from the smallest to the largest petal length in Fisher's table (1.0 to 6.9 cm).
    assert.ok(close(d.grid[0], 1, 1e-12) && close(d.grid[d.grid.length - 1], 6.9, 1e-12), `${d.grid[0]}..${d.grid[d.grid.length - 1]}`);
    assert.equal(d.counts.reduce((a, b) => a + b, 0) + d.missing, 150);
    // A class asked for by the panel is the one shown.
    const setosa = await s.dependence('petal_length', 0);
    assert.equal(setosa.output, 0);
    // Fisher's setosa petals are 1.0-1.9 cm and every other flower's at least 3.0 cm: setosa's curve drops
    // once, somewhere in that gap, by a good share of probability.
    const fall = (g: number) => setosa.average[g - 1] - setosa.average[g];
    let drop = 1;
    for (let g = 2; g < setosa.grid.length; g++) if (fall(g) > fall(drop)) drop = g;
    assert.ok(fall(drop) > 0.3, setosa.average.join(' '));
    assert.ok(setosa.grid[drop - 1] >= 1.9 && setosa.grid[drop] <= 3.0, `drop between ${setosa.grid[drop - 1]} and ${setosa.grid[drop]}`);
  });

  it('picks the most important feature to open the dependence view on', () => {
    const ranked = [...f.session.summary.importance].sort((a, b) => (b.permutation ?? 0) - (a.permutation ?? 0));
    assert.equal(f.session.defaultDependenceFeature(), ranked[0].feature);
  });

  it('gives hovers on another file the all-trees contributions; the fitted file\'s own row, its out-of-bag ones', async () => {
    const text = readFileSync(f.file, 'utf8');
    const lines = text.split('\n');
    const other = [lines[0], lines[5], lines[90]].join('\n') + '\n';
    const load = await loadCsvText(other);
    const file = await f.session.scoreOther(load.table, load.delimiter, 'other.csv', () => other);
    const mdOther = await f.session.hoverOtherContributions(file, 1);
    const mdSame = await f.session.hoverContributions(f.session.numbering.tableRow(90)!);
    assert.doesNotMatch(mdOther ?? '', /never saw this row/);
    assert.match(mdSame ?? '', /according to the \d+ trees that never saw this row/);
    // The same numbers once the fitted row is explained over all trees too.
    const all = f.session.explanations!.explanationOf(await f.session.explanations!.rowContributions(f.session.numbering.tableRow(90)!, 'now', undefined, 'all'), null);
    const fromOther = f.session.explanations!.explanationOf(await f.session.explanations!.contributions(file, 1, file.encoded, 'now'), null);
    assert.deepEqual(Array.from(fromOther.values), Array.from(all.values));
  });
});

describe('extension explanations (Friedman #1, regression)', function () {
  this.timeout(120_000);
  let f: Fitted;
  before(async () => {
    // Larger leaves keep the trees shallow, so contributions stay quick in a test.
    f = await fitFixture(path.join(FIXTURES, 'friedman1.csv'), 'y', { trees: 15, seed: 5, minLeaf: 5 }, { holdout: 0.2, intervalLevel: 0.9 });
  });
  after(async () => f?.session.dispose());

  it('puts each row’s interval at the chosen level beside its votes, as core’s quantile regression forest gives it', async () => {
    const s = f.session;
    const index = quantileIndexFromFit(f.report, f.load.table);
    const rows = [1, 2, 3, 400, 1000];
    assert.equal(await intervalsReady(s, rows, 0.9), true);
    const votes = s.rowVotes(rows, 0.9);
    for (const v of votes) {
      const r = s.numbering.tableRow(v.row)!;
      const direct = predictInterval(index, s.encoded.subarray(r * s.p, r * s.p + s.p), 1, 0.9);
      assert.deepEqual(v.interval, { level: 0.9, lower: direct.lower[0], upper: direct.upper[0] });
    }
    assert.ok(isHostToPanel({ fit: 'f', type: 'disagreement', rows: votes, selected: votes.length }));
    // Another level is computed afresh, not read from the 0.9 table.
    const r = s.numbering.tableRow(2)!;
    const md = (await s.hoverInterval(r, 0.5))!;
    const half = predictInterval(index, s.encoded.subarray(r * s.p, r * s.p + s.p), 1, 0.5);
    assert.match(md, /\*\*50% prediction interval\*\* for y: /);
    assert.ok(md.includes(`${String(Number(half.lower[0].toPrecision(4)))} to ${String(Number(half.upper[0].toPrecision(4)))}`), md);
  });

  it('covers roughly the stated share of held-out targets (Meinshausen 2006: quantile regression forests are calibrated)', async () => {
    const s = f.session;
    const held = f.report.holdoutRows!;
    let inside = 0;
    for (const r of held) {
      const md = (await s.hoverInterval(r, 0.9, 'soon'))!;
      const m = /: ([-\d.e]+) to ([-\d.e]+)/.exec(md)!;
      const y = s.truth[r];
      if (y >= Number(m[1]) && y <= Number(m[2])) inside++;
    }
    const coverage = inside / held.length;
    // 200 held-out rows and 15 trees: a loose band around 90%, wide enough for sampling noise.
    assert.ok(coverage > 0.75 && coverage <= 1, `coverage ${coverage}`);
  });

  it('ranks Friedman’s noise features x6..x10 below x4 in the global view, and reports as it goes', async () => {
    const updates: GlobalContributions[] = [];
    const g = await f.session.globalContributions((u) => updates.push(u));
    assert.ok(g.done && updates[updates.length - 1] === g);
    assert.ok(g.rows > 0 && g.rows <= g.planned && g.planned === 100);
    assert.ok(isHostToPanel({ fit: 'f', type: 'globalContributions', global: g, text: '' }));
    const by = new Map(g.features.map((x) => [x.feature, x.meanAbs]));
    // Friedman (1991): y depends on x1..x5 only, x4 with slope 10.
    for (const noise of ['x6', 'x7', 'x8', 'x9', 'x10']) assert.ok(by.get(noise)! < by.get('x4')! / 3, `${noise} ${by.get(noise)} vs x4 ${by.get('x4')}`);
  });

  it('rises with x4 in the dependence view about as steeply as Friedman’s 10 x4 term', async () => {
    const d = await f.session.dependence('x4', null);
    assert.equal(d.output, null);
    const G = d.grid.length;
    const rise = d.average[G - 1] - d.average[0];
    const span = d.grid[G - 1] - d.grid[0];
    // A forest flattens the ends a little, so less than the full slope of 10 over [0, 1].
    assert.ok(rise > 5 * span && rise < 11 * span, `rise ${rise} over ${span}`);
    assert.ok(d.ice.every((c) => c.length === G));
  });
});

describe('extension explanations without the fit in memory', function () {
  this.timeout(120_000);

  it('gives intervals for a saved forest shown against its own training table, and says why not against another', async () => {
    const file = path.join(FIXTURES, 'friedman1.csv');
    const text = readFileSync(file, 'utf8');
    const load = await loadCsvText(text);
    const report = await fitForest(load.table, { target: 'y', params: { trees: 8, seed: 2, minLeaf: 5 }, workers: 2 });
    // The summary is the fit's, made from its own training table; the session shows the forest against `t`.
    const fitSummary = summaryFor(report, { table: load.table, rowsRead: load.rowsRead }, 'f');
    const make = async (t: typeof load) =>
      ForestSession.create({
        forest: report.forest,
        csv: csvOf(file, t),
        text: () => text,
        summary: fitSummary,
        scorer: new Scorer(report.forest),
        explainer: (setup) => new ExplainClient(setup),
        quantiles: { from: 'table' },
      });
    const same = await make(load);
    const fromFit = predictInterval(quantileIndexFromFit(report, load.table), same.encoded.subarray(0, same.p), 1, 0.9);
    const md = (await same.hoverInterval(0, 0.9))!;
    assert.match(md, /90% prediction interval/);
    assert.ok(md.includes(`${String(Number(fromFit.lower[0].toPrecision(4)))} to`), 'the seed reproduces the fit’s draws');
    await same.dispose();

    // The first 500 rows are not the rows this forest grew on.
    const half = await loadCsvText(text.split('\n').slice(0, 501).join('\n') + '\n');
    const other = await make(half);
    assert.match((await other.hoverInterval(0, 0.9))!, /^No 90% prediction interval: the rows here are not the ones this forest was fitted on \(The forest was fitted on 1000 rows/);
    assert.deepEqual(other.rowVotes([1], 0.9)[0].interval, undefined);
    await other.dispose();
  });
});

describe('extension explanation requests', function () {
  this.timeout(60_000);

  /** An explainer that never answers, recording each request and whether it was withdrawn. */
  function recorder(): { explainer: ExplainerLike; runs: Array<{ signal?: AbortSignal }> } {
    const runs: Array<{ signal?: AbortSignal }> = [];
    const explainer: ExplainerLike = {
      run: (_request, _urgency, signal) =>
        new Promise((_resolve, reject) => {
          runs.push({ signal });
          signal?.addEventListener('abort', () => reject(Object.assign(new Error('withdrawn'), { name: 'AbortError' })));
        }),
      dispose: () => Promise.resolve(),
    };
    return { explainer, runs };
  }

  it('withdraws a row only when everyone who asked for it has gone, and asks afresh after', async () => {
    const f = await fitFixture(path.join(FIXTURES, 'iris.csv'), 'species', { trees: 5, seed: 1 });
    try {
      const { explainer, runs } = recorder();
      const e = new Explanations(f.report.forest, explainer, f.session.encoded, 150, f.session.trainRows, 1);
      const a = new AbortController();
      const b = new AbortController();
      const first = e.rowContributions(7, 'now', a.signal);
      const second = e.rowContributions(7, 'now', b.signal);
      assert.equal(first, second, 'one request for one row');
      assert.equal(runs.length, 1);
      a.abort();
      assert.equal(runs[0].signal!.aborted, false, 'someone still waits');
      b.abort();
      assert.equal(runs[0].signal!.aborted, true);
      await assert.rejects(first, { name: 'AbortError' });
      e.rowContributions(7, 'now', new AbortController().signal).catch(() => undefined);
      assert.equal(runs.length, 2, 'a withdrawn row is asked for again');

      // Asked for without a signal (the panel's global view, a prefetch), a row is never withdrawn.
      const c = new AbortController();
      e.rowContributions(9, 'idle').catch(() => undefined);
      e.rowContributions(9, 'now', c.signal).catch(() => undefined);
      c.abort();
      assert.equal(runs.length, 3);
      assert.equal(runs[2].signal!.aborted, false);
    } finally {
      await f.session.dispose();
    }
  });
});

describe('extension explanation shaping', () => {
  it('ranks contributions by size, keeps forest order on ties, and sums the rest', () => {
    const r = largestContributions(['a', 'b', 'c', 'd', 'e'], [0.1, -0.5, 0.5, 0.02, -0.03], 3);
    assert.deepEqual(r.top, [
      { feature: 'b', contribution: -0.5 },
      { feature: 'c', contribution: 0.5 },
      { feature: 'a', contribution: 0.1 },
    ]);
    assert.equal(r.others, 2);
    assert.ok(close(r.rest, -0.01));
  });

  it('cuts one output out of a multi-class dependence and numbers its rows as data rows', () => {
    // Two grid points, two classes, two sampled rows (training positions 0 and 2).
    const pd = {
      grid: { feature: 0, name: 'f', kind: 'numeric' as const, values: Float64Array.from([1, 2]) },
      outputs: 2,
      average: Float64Array.from([0.2, 0.8, 0.6, 0.4]),
      ice: Float64Array.from([0.1, 0.9, 0.5, 0.5, 0.3, 0.7, 0.7, 0.3]),
      iceRows: Int32Array.from([0, 2]),
      distribution: { counts: Int32Array.from([3, 1]), boundaries: Float64Array.from([1.5]), missing: 1 },
    };
    const d = dependenceMessage(pd, 1, true, (i) => [10, 11, 12][i]);
    assert.deepEqual(d, {
      feature: 'f',
      kind: 'numeric',
      grid: [1, 2],
      labels: null,
      output: 1,
      average: [0.8, 0.4],
      ice: [
        [0.9, 0.5],
        [0.7, 0.3],
      ],
      iceRows: [10, 12],
      counts: [3, 1],
      boundaries: [1.5],
      missing: 1,
    });
  });

  it('computes the global view as core’s mean absolute contribution when the sample holds every training row', async () => {
    // 60 invented rows: fewer than the sample size, so the background sample is the whole training set.
    const lines = ['a,b,c,y'];
    for (let i = 0; i < 60; i++) lines.push(`${i % 7},${(i * 13) % 11},${i % 2 ? 'u' : 'v'},${(i % 7) * 2 + (i % 2) + ((i * 13) % 11) / 10}`);
    const text = lines.join('\n') + '\n';
    const load = await loadCsvText(text);
    const report = await fitForest(load.table, { target: 'y', params: { trees: 10, seed: 4 }, workers: 1 });
    const session = await ForestSession.create({
      forest: report.forest,
      csv: csvOf('/x.csv', load),
      text: () => text,
      oob: { trainRows: report.trainRows, inBag: inBagCounts(report.forest.params, report.forest.trees.length, report.trainRows.length) },
      summary: summaryFor(report, { table: load.table, rowsRead: 60 }, 'x'),
      scorer: new Scorer(report.forest),
      explainer: (setup) => new ExplainClient(setup),
    });
    try {
      const g = await session.globalContributions(() => undefined);
      assert.equal(g.rows, 60);
      const direct = meanAbsoluteContributions(new ContributionExplainer(report.forest).explainRows(session.encoded, 60));
      g.features.forEach((x, j) => assert.ok(close(x.meanAbs, direct.overall[j]), x.feature));
      // Local accuracy holds for every row: a training row's contributions add up to its out-of-bag value.
      const membership = membershipOf(report.trainRows, 60, session.store.trainingIndex(4) >= 0 ? inBagCounts(report.forest.params, report.forest.trees.length, report.trainRows.length) : new Uint8Array(0));
      const pred = predictEncoded(report.forest, session.encoded, 60, membership);
      const c = await session.contributions(5);
      assert.ok(close(c.prediction, pred.oob!.predicted[4]), `${c.prediction} vs ${pred.oob!.predicted[4]}`);
    } finally {
      await session.dispose();
    }
  });
});
