// Measures what the extension host does after a fit, on a generated table (Friedman #1 function, plus a
// categorical column and a quoted multi-line field so the line map works for its living): hover latency,
// map scoring, whole-table scoring, explanations on their thread, and how long the host's own event loop
// is held up meanwhile. A measurement, not a test: nothing here asserts a time.
//
//   npx tsc -p tsconfig.json && node out/test/extension/measure-host.js [--rows 20000] [--trees 100] [--classes 1] [--sweep 1]
//
// --classes 1 turns y into two classes (above or below 14) with 5% of labels flipped, so suspects exist.
// --sweep 1 also times the features-per-split sweep (it refits several forests, so it is off by default).

import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { loadCsv } from '../../src/core/csv/load';
import { fitForest } from '../../src/core/forest/fit';
import { Scorer } from '../../src/core/forest/scorer';
import { sweepFeaturesPerSplit } from '../../src/core/explain/index';
import { ExplainClient } from '../../src/extension/workers/explainClient';
import { sweepOptions } from '../../src/extension/fit/sweep';
import { choicesFrom } from '../../src/extension/fit/choices';
import { ForestSession } from '../../src/extension/session/session';
import { csvOf, summaryFor } from './helpers';
import { readSettings } from '../../src/extension/settings';
import { readFileSync } from 'node:fs';
import { inBagCounts } from '../../src/core/forest/bootstrap';

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? Number(process.argv[i + 1]) : fallback;
}

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s ^ (s >>> 15), 0x2c1b3c6d) + 0x9e3779b9) >>> 0;
    s ^= s >>> 13;
    return (s >>> 0) / 4294967296;
  };
}

const ms = (a: number) => `${a.toFixed(1)} ms`;
function stats(xs: number[]): string {
  const s = [...xs].sort((a, b) => a - b);
  const q = (p: number) => s[Math.min(s.length - 1, Math.floor(p * s.length))];
  return `median ${ms(q(0.5))}, p99 ${ms(q(0.99))}, max ${ms(s[s.length - 1])}`;
}

async function timed<T>(label: string, body: () => Promise<T>): Promise<T> {
  const lag = monitorEventLoopDelay({ resolution: 5 });
  lag.enable();
  const t = performance.now();
  const out = await body();
  const took = performance.now() - t;
  lag.disable();
  console.log(`${label.padEnd(44)} ${ms(took).padStart(11)}   host event loop held up at most ${ms(lag.max / 1e6)}`);
  return out;
}

async function main(): Promise<void> {
  const rows = arg('rows', 20000);
  const trees = arg('trees', 100);
  const classes = arg('classes', 0) === 1;
  const r = rng(7);
  const lines = ['x1,x2,x3,x4,x5,x6,x7,x8,x9,x10,colour,note,y'];
  for (let i = 0; i < rows; i++) {
    const x = Array.from({ length: 10 }, () => r());
    const y = 10 * Math.sin(Math.PI * x[0] * x[1]) + 20 * (x[2] - 0.5) ** 2 + 10 * x[3] + 5 * x[4] + (r() + r() + r() - 1.5);
    const note = i % 500 === 7 ? '"spans\ntwo lines"' : `n${i % 3}`;
    const target = classes ? ((y > 14) !== r() < 0.05 ? 'high' : 'low') : y.toFixed(4);
    lines.push(`${x.map((v) => v.toFixed(4)).join(',')},${['red', 'green', 'blue'][i % 3]},${note},${target}`);
  }
  const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'copse-measure-'));
  const file = path.join(dir, 'measure.csv');
  await fs.writeFile(file, lines.join('\n') + '\n');
  console.log(`${rows} rows x 12 features, ${classes ? 'two classes' : 'regression'}, ${trees} trees, ${os.availableParallelism()} cores\n`);
  try {
    const load = await timed('read CSV (core loadCsv)', () => loadCsv(file));
    const report = await timed('fit (core, worker threads)', () => fitForest(load.table, { target: 'y', params: { trees, seed: 1 } }));
    const summary = summaryFor(report, { table: load.table, rowsRead: rows }, 'measure.csv');
    const session = await timed('score all rows once for hovers (Scorer)', () =>
      ForestSession.create({
        forest: report.forest,
        csv: csvOf(file, load),
        text: () => readFileSync(file, 'utf8'),
        oob: { trainRows: report.trainRows, inBag: inBagCounts(report.forest.params, report.forest.trees.length, report.trainRows.length) },
        summary,
        scorer: new Scorer(report.forest),
        explainer: (setup) => new ExplainClient(setup),
        quantiles: { from: 'fit', report },
      }),
    );
    console.log(`${'suspect rows found'.padEnd(44)} ${String(session.suspects(1e9).length).padStart(11)}`);
    const text = readFileSync(file, 'utf8').split('\n');
    const read = (l: number) => text[l - 1];
    const hover: number[] = [];
    for (let k = 0; k < 2000; k++) {
      const line = 2 + Math.floor(r() * (text.length - 2));
      const t = performance.now();
      const row = session.rowAtLine(line, read);
      if (row !== undefined) session.hover(row, (d) => `command:copse.showRowVotes?${d}`);
      hover.push(performance.now() - t);
    }
    console.log(`${'hover: line → row → Markdown (2000 lines)'.padEnd(44)} ${stats(hover)}`);
    const sel: number[] = [];
    for (let k = 0; k < 200; k++) {
      const from = 2 + Math.floor(r() * (text.length - 30));
      const t = performance.now();
      const tr = session.lines.rowsBetween(from, from + 19, read).slice(0, 20);
      session.rowVotes(tr.map((x) => session.numbering.dataRow(x)));
      sel.push(performance.now() - t);
    }
    console.log(`${'selection: 20 rows → tree votes (200 times)'.padEnd(44)} ${stats(sel)}`);
    const panel = readSettings({ get: () => undefined }).settings.panel;
    await timed(`map ${panel.gridResolution}x${panel.gridResolution}, typical row`, () => session.regionMap('x1', 'x2', { mode: 'typical' }, panel));
    await timed(`map ${panel.gridResolution}x${panel.gridResolution}, averaged over ${panel.dependenceRows} rows`, () => session.regionMap('x1', 'x2', { mode: 'averaged' }, panel));
    await timed(`map ${panel.gridResolution} x 3 levels (x4 by colour), typical`, () => session.regionMap('x4', 'colour', { mode: 'typical' }, panel));
    await timed(`small maps (pairs of top ${panel.pairFeatures})`, () => session.mapMatrix(panel, 10));

    // Explanations, on their own thread.
    const level = 0.9;
    if (session.explanations?.regression) {
      session.explanations.prepareIntervals(level);
      await timed(`intervals at ${level} for all ${rows} rows (background)`, async () => {
        for (let r = 0; r < rows; r += 997) await session.hoverInterval(r, level, 'idle');
        await session.hoverInterval(rows - 1, level, 'idle');
      });
      const iv: number[] = [];
      for (let k = 0; k < 200; k++) {
        const t = performance.now();
        await session.hoverInterval(Math.floor(r() * rows), level);
        iv.push(performance.now() - t);
      }
      console.log(`${'hover interval part (200 rows, all computed)'.padEnd(44)} ${stats(iv)}`);
    }
    const lag = monitorEventLoopDelay({ resolution: 5 });
    lag.enable();
    const cold: number[] = [];
    const hoverRows = Array.from({ length: 30 }, () => Math.floor(r() * rows));
    for (const row of hoverRows) {
      const t = performance.now();
      await session.hoverContributions(row);
      cold.push(performance.now() - t);
    }
    lag.disable();
    console.log(`${'hover contributions part, first time (30)'.padEnd(44)} ${stats(cold)}   host event loop held up at most ${ms(lag.max / 1e6)}`);
    const warm: number[] = [];
    for (const row of hoverRows) {
      const t = performance.now();
      await session.hoverContributions(row);
      warm.push(performance.now() - t);
    }
    console.log(`${'hover contributions part, hovered again (30)'.padEnd(44)} ${stats(warm)}`);
    // A hover arriving while the global view works in the background waits for at most one row.
    const busy: number[] = [];
    const global = session.globalContributions(() => undefined);
    for (let k = 0; k < 10; k++) {
      await new Promise((res) => setTimeout(res, 200));
      const t = performance.now();
      await session.hoverContributions(Math.floor(r() * rows));
      busy.push(performance.now() - t);
    }
    console.log(`${'hover contributions during the global view (10)'.padEnd(44)} ${stats(busy)}`);
    const g = await timed('global view (rest of the background sample)', () => global);
    console.log(`${'global view rows'.padEnd(44)} ${String(g.rows).padStart(11)} of ${g.planned}`);
    await timed('dependence on x1 (200 rows x 40 points)', () => session.dependence('x1', null));
    await timed('dependence on colour (levels)', () => session.dependence('colour', null));
    if (arg('sweep', 0) === 1) {
      const training = readSettings({ get: () => undefined }).settings.training;
      const choices = { ...choicesFrom(training, 'y', report.forest.schema.target.task), trees };
      const sweep = await timed(`features-per-split sweep (${trees} trees a forest)`, () => sweepFeaturesPerSplit(load.table, sweepOptions(choices, training)));
      console.log(`${'sweep forests'.padEnd(44)} ${sweep.points.map((q) => `${q.featuresPerSplit}: ${q.oobError.toPrecision(4)} (${q.seconds.toFixed(1)} s)`).join(', ')}; best ${sweep.best}`);
    }
    await session.dispose();
  } finally {
    await fs.rm(dir, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
