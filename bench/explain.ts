// Benchmark of the explanation engine (figures, not tests): `node out/bench/explain.js [options]`
//   --trees N        trees per forest (default 100)       --workers N   fit threads (default 2)
//   --brute-rows N   rows the 10-feature brute force is timed on, then scaled to 1,000 (default 10)
//   --json           print one JSON object instead of the lines
//
// On Friedman #1 (test/fixtures/open/friedman1.csv, 1,000 rows, 10 features, full-depth regression trees)
// and iris (150 rows cycled to 1,000, 4 features, three classes):
// - one row's contributions (path-dependent TreeSHAP), median and 95th percentile over single-row calls,
//   the case of a hover;
// - 1,000 rows of contributions beside the brute force that evaluates every feature subset by walking the
//   trees (2^p walks per row and tree), and their ratio;
// - partial dependence (20 points x 200 rows), a 50 x 50 two-feature grid over 200 rows beside scoring every
//   (row, cell) copy through the forest, and 90% intervals of a quantile regression forest for 1,000 rows.
// Timings share the machine with whatever else runs: run it on a quiet machine for figures to quote.
import path from 'node:path';
import { parseArgs } from 'node:util';
import { loadCsv } from '../src/core/csv/load';
import { ContributionExplainer } from '../src/core/explain/contributions';
import { featureGrid, partialDependence, partialDependence2D } from '../src/core/explain/dependence';
import { predictInterval, quantileIndexFromFit } from '../src/core/explain/quantiles';
import { fitForest, type FitReport } from '../src/core/forest/fit';
import { encodeTable, predictEncoded } from '../src/core/forest/predict';
import type { Table } from '../src/core/data/table';
import { bruteShapley } from '../test/core/explain/helpers/brute-force';

const root = path.join(__dirname, '..', '..');
const ROWS = 1000;

interface Figures {
  dataset: string;
  features: number;
  trees: number;
  nodesPerTree: number;
  oneRowMs: { median: number; p95: number };
  contributions1000Ms: number;
  /** CPU time of the same 1,000 rows: steadier than wall time when the machine is shared. */
  contributions1000CpuMs: number;
  bruteForce1000Ms: number;
  bruteForceMeasuredRows: number;
  bruteOverFast: number;
  largestDifference: number;
  partialDependenceMs?: number;
  grid2dMs?: number;
  /** The same grid by scoring every (row, cell) copy, timed on fewer rows and scaled to 200. */
  grid2dRescoringMs?: number;
  intervals1000Ms?: number;
}

function cycled(x: Float64Array, p: number, rows: number): Float64Array {
  const have = x.length / p;
  const out = new Float64Array(rows * p);
  for (let i = 0; i < rows; i++) out.set(x.subarray((i % have) * p, (i % have) * p + p), i * p);
  return out;
}

const quantile = (sorted: number[], q: number) => sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];

function measure(name: string, table: Table, report: FitReport, bruteRows: number, extras: boolean): Figures {
  const forest = report.forest;
  const p = forest.schema.features.length;
  const x = cycled(encodeTable(forest.schema, table), p, ROWS);
  const explainer = new ContributionExplainer(forest);
  const out = new Float64Array(p * explainer.outputs);
  // Warm up the compiled code before timing, as a long-lived editor host would be.
  for (let i = 0; i < 50; i++) explainer.explainRow(x, (i % ROWS) * p, out);
  const single: number[] = [];
  for (let i = 0; i < 200; i++) {
    const t0 = performance.now();
    explainer.explainRow(x, i * p, out);
    single.push(performance.now() - t0);
  }
  single.sort((a, b) => a - b);
  let t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const fast = explainer.explainRows(x, ROWS);
  const fastCpu = process.cpuUsage(cpu0).user / 1000;
  const fastMs = performance.now() - t0;
  const measured = Math.min(ROWS, bruteRows);
  let worst = 0;
  t0 = performance.now();
  for (let i = 0; i < measured; i++) {
    const slow = bruteShapley(forest, x, i * p);
    for (let j = 0; j < slow.phi.length; j++) worst = Math.max(worst, Math.abs(slow.phi[j] - fast.contributions[i * slow.phi.length + j]));
  }
  const bruteMs = ((performance.now() - t0) * ROWS) / measured;
  const nodes = forest.trees.reduce((s, t) => s + t.nodeCount, 0) / forest.trees.length;
  const figures: Figures = {
    dataset: name,
    features: p,
    trees: forest.trees.length,
    nodesPerTree: Math.round(nodes),
    oneRowMs: { median: quantile(single, 0.5), p95: quantile(single, 0.95) },
    contributions1000Ms: fastMs,
    contributions1000CpuMs: fastCpu,
    bruteForce1000Ms: bruteMs,
    bruteForceMeasuredRows: measured,
    bruteOverFast: bruteMs / fastMs,
    largestDifference: worst,
  };
  if (extras) {
    const n = table.rowCount;
    const enc = encodeTable(forest.schema, table);
    t0 = performance.now();
    partialDependence(forest, enc, n, 0, { gridSize: 20, sampleRows: 200 });
    figures.partialDependenceMs = performance.now() - t0;
    const gx = featureGrid(forest, enc, n, 0, { gridSize: 50, spacing: 'even' }).values;
    const gy = featureGrid(forest, enc, n, 1, { gridSize: 50, spacing: 'even' }).values;
    t0 = performance.now();
    partialDependence2D(forest, enc, n, 0, 1, { xGrid: gx, yGrid: gy, sampleRows: 200 });
    figures.grid2dMs = performance.now() - t0;
    const sample = 20;
    t0 = performance.now();
    const copies = new Float64Array(gx.length * gy.length * p);
    for (let r = 0; r < sample; r++) {
      for (let j = 0; j < gy.length; j++) {
        for (let i = 0; i < gx.length; i++) {
          const o = (j * gx.length + i) * p;
          copies.set(enc.subarray(r * p, r * p + p), o);
          copies[o] = gx[i];
          copies[o + 1] = gy[j];
        }
      }
      predictEncoded(forest, copies, gx.length * gy.length);
    }
    figures.grid2dRescoringMs = ((performance.now() - t0) * 200) / sample;
    if (forest.schema.target.task === 'regression') {
      const index = quantileIndexFromFit(report, table);
      t0 = performance.now();
      predictInterval(index, x, ROWS, 0.9);
      figures.intervals1000Ms = performance.now() - t0;
    }
  }
  return figures;
}

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: {
      trees: { type: 'string', default: '100' },
      workers: { type: 'string', default: '2' },
      'brute-rows': { type: 'string', default: '10' },
      json: { type: 'boolean', default: false },
    },
  });
  const trees = Number(values.trees);
  const workers = Number(values.workers);
  const bruteRows = Number(values['brute-rows']);
  const results: Figures[] = [];
  for (const [name, file, target, brute] of [
    ['friedman1', 'friedman1.csv', 'y', bruteRows],
    ['iris', 'iris.csv', 'species', ROWS],
  ] as const) {
    const { table } = await loadCsv(path.join(root, 'test/fixtures/open', file), { target });
    const report = await fitForest(table, { target, params: { trees, seed: 1 }, workers, permutationImportance: false });
    results.push(measure(name, table, report, brute, name === 'friedman1'));
  }
  if (values.json) {
    process.stdout.write(JSON.stringify({ rows: ROWS, results }, null, 2) + '\n');
    return;
  }
  const ms = (v: number) => (v < 10 ? v.toFixed(2) : v.toFixed(0)) + ' ms';
  for (const r of results) {
    process.stdout.write(`${r.dataset}: ${r.trees} trees, ${r.nodesPerTree} nodes a tree, ${r.features} features\n`);
    process.stdout.write(`  one row's contributions         median ${ms(r.oneRowMs.median)}, 95th percentile ${ms(r.oneRowMs.p95)}\n`);
    process.stdout.write(`  1,000 rows                      ${ms(r.contributions1000Ms)} (CPU ${ms(r.contributions1000CpuMs)})\n`);
    const scaled = r.bruteForceMeasuredRows < ROWS ? ` (timed on ${r.bruteForceMeasuredRows} rows, scaled to 1,000)` : '';
    process.stdout.write(`  1,000 rows by brute force       ${ms(r.bruteForce1000Ms)}${scaled}: ${r.bruteOverFast.toFixed(0)} times slower\n`);
    process.stdout.write(`  largest difference from brute force ${r.largestDifference.toExponential(1)}\n`);
    if (r.partialDependenceMs !== undefined) process.stdout.write(`  partial dependence, 20 points x 200 rows   ${ms(r.partialDependenceMs)}\n`);
    if (r.grid2dMs !== undefined) process.stdout.write(`  two-feature grid, 50 x 50 x 200 rows       ${ms(r.grid2dMs)}; by rescoring every copy ${ms(r.grid2dRescoringMs!)} (timed on 20 rows, scaled)\n`);
    if (r.intervals1000Ms !== undefined) process.stdout.write(`  90% intervals for 1,000 rows               ${ms(r.intervals1000Ms)}\n`);
  }
}

main().catch((e) => {
  process.stderr.write(`${(e as Error).stack ?? String(e)}\n`);
  process.exitCode = 1;
});
