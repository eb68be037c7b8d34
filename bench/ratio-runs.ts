// The ratios, each from several side-by-side runs (min / median / max of the per-run ratio, since a
// shared machine's load drifts between runs), plus the cost table: fit time and peak memory against rows
// and against trees, with the slope of each on log-log axes.
import path from 'node:path';
import { FEATURES, threeClassGenerator } from './data';
import { numberAt, runProcess, type ProcessResult } from './run-process';
import type { Settings } from './sides';

const HOUR = 3600;
const PYTHON = '/usr/bin/python3';
const RSCRIPT = '/usr/bin/Rscript';

export interface RatioOptions {
  readonly repoRoot: string;
  readonly dir: string;
  readonly settings: Settings;
  readonly repeat: number;
  readonly sides: ReadonlySet<string>;
  readonly train: string;
  readonly test: string;
  readonly scoreRows: number;
  readonly costRows: readonly number[];
  readonly costTrees: readonly number[];
  readonly costTreeRows: number;
}

interface Run {
  readonly seconds?: number;
  readonly megabytes?: number;
  readonly accuracy?: number;
}

function spread(values: readonly number[]): string {
  if (values.length === 0) return '-';
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
  return `${s[0].toFixed(2)} / ${mid.toFixed(2)} / ${s[s.length - 1].toFixed(2)}`;
}

function ratios(ours: readonly Run[], theirs: readonly Run[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < Math.min(ours.length, theirs.length); i++) {
    const a = ours[i].seconds;
    const b = theirs[i].seconds;
    if (a !== undefined && b !== undefined && b > 0) out.push(a / b);
  }
  return out;
}

function asRun(r: ProcessResult, secondsAt?: string, accuracyAt?: string): Run {
  if (!r.ok) {
    console.log(`  failed (exit ${r.exitCode}): ${r.stderrTail.split('\n').slice(-2).join(' | ')}`);
    return {};
  }
  return {
    seconds: secondsAt ? numberAt(r.json, secondsAt) : r.wallSeconds,
    megabytes: r.peakMegabytes,
    accuracy: accuracyAt ? numberAt(r.json, accuracyAt) : undefined,
  };
}

export async function ratioRuns(o: RatioOptions): Promise<void> {
  const s = o.settings;
  const cli = path.join(o.repoRoot, 'bin', 'copse.js');
  const bench = path.join(o.repoRoot, 'bench');
  const copseFit = (file: string, trees: number, extra: string[] = []) =>
    runProcess(process.execPath, [cli, 'fit', file, '--target', s.target, '--task', 'classification', '--trees', String(trees),
      '--features-per-split', String(s.featuresPerSplit), '--seed', String(s.seed), '--workers', String(s.workers), '--json', '--no-importance', ...extra], { timeoutSeconds: 3 * HOUR });
  const scriptArgs = (file: string, trees: number) => ['--train', file, '--target', s.target, '--trees', String(trees),
    '--features-per-split', String(s.featuresPerSplit), '--workers', String(s.workers), '--seed', String(s.seed)];
  const sklearnFit = (file: string, trees: number, extra: string[] = []) =>
    runProcess(PYTHON, [path.join(bench, 'sklearn_side.py'), ...scriptArgs(file, trees), ...extra], { timeoutSeconds: 3 * HOUR });
  const rangerFit = (file: string, trees: number, extra: string[] = []) =>
    runProcess(RSCRIPT, [path.join(bench, 'ranger_side.R'), ...scriptArgs(file, trees), ...extra], { timeoutSeconds: 3 * HOUR });
  const useSklearn = o.sides.has('sklearn');
  const useRanger = o.sides.has('ranger');

  // Fit of case (a), repeated: each repeat runs every side once, one after another.
  const fits: Record<string, Run[]> = { copse: [], sklearn: [], ranger: [] };
  const copseModel = path.join(o.dir, 'ratio-copse.json');
  const sklearnModel = path.join(o.dir, 'ratio-sklearn.pkl');
  for (let i = 0; i < o.repeat; i++) {
    console.log(`ratios: fit run ${i + 1} of ${o.repeat} ...`);
    fits.copse.push(asRun(await copseFit(o.train, s.trees, ['--test', o.test, ...(i === 0 ? ['--save', copseModel] : [])]), 'seconds.fit', 'test.accuracy'));
    if (useSklearn) fits.sklearn.push(asRun(await sklearnFit(o.train, s.trees, ['--test', o.test, ...(i === 0 ? ['--save-model', sklearnModel] : [])]), 'seconds.fit', 'test.accuracy'));
    if (useRanger) fits.ranger.push(asRun(await rangerFit(o.train, s.trees, ['--test', o.test]), 'seconds.fit', 'test.accuracy'));
    console.log(`  fit s: Copse ${fmt(fits.copse[i]?.seconds)}, scikit-learn ${fmt(fits.sklearn[i]?.seconds)}, ranger ${fmt(fits.ranger[i]?.seconds)}`);
  }

  // Scoring as a whole process: start-up, reading the model and the CSV, scoring, writing the CSV.
  const scoreFile = path.join(o.dir, 'score.csv');
  await threeClassGenerator('copse-bench-score').write(scoreFile, o.scoreRows);
  const scores: Record<string, Run[]> = { copse: [], sklearn: [] };
  for (let i = 0; i < o.repeat; i++) {
    console.log(`ratios: scoring run ${i + 1} of ${o.repeat} ...`);
    scores.copse.push(asRun(await runProcess(process.execPath, [cli, 'predict', copseModel, scoreFile, '--out', path.join(o.dir, 'score-copse.csv'), '--json'], { timeoutSeconds: HOUR })));
    if (useSklearn) {
      scores.sklearn.push(asRun(await runProcess(PYTHON, [path.join(bench, 'sklearn_score.py'), '--model', sklearnModel, '--data', scoreFile, '--target', s.target, '--out', path.join(o.dir, 'score-sklearn.csv')], { timeoutSeconds: HOUR })));
    }
    console.log(`  scoring s: Copse ${fmt(scores.copse[i]?.seconds)}, scikit-learn ${fmt(scores.sklearn[i]?.seconds)}`);
  }

  // Cost as work grows: one run per point (the slope, not a single time, is the point of this table).
  const cost: { label: string; x: number; copse: Run; sklearn?: Run }[] = [];
  const costFile = (rows: number) => path.join(o.dir, `cost-${rows}.csv`);
  const written = new Set<number>();
  const ensure = async (rows: number) => {
    if (!written.has(rows)) await threeClassGenerator('copse-bench-cost').write(costFile(rows), rows);
    written.add(rows);
  };
  const point = async (label: string, x: number, rows: number, trees: number) => {
    console.log(`cost: ${label} ...`);
    await ensure(rows);
    const copse = asRun(await copseFit(costFile(rows), trees), 'seconds.fit');
    const sklearn = useSklearn ? asRun(await sklearnFit(costFile(rows), trees), 'seconds.fit') : undefined;
    cost.push({ label, x, copse, sklearn });
    console.log(`  Copse ${fmt(copse.seconds)} s ${fmt(copse.megabytes, 0)} MB; scikit-learn ${fmt(sklearn?.seconds)} s ${fmt(sklearn?.megabytes, 0)} MB`);
  };
  for (const rows of o.costRows) await point(`rows ${rows.toLocaleString('en-US')}, ${s.trees} trees`, rows, rows, s.trees);
  for (const trees of o.costTrees) await point(`trees ${trees}, ${o.costTreeRows.toLocaleString('en-US')} rows`, trees, o.costTreeRows, trees);

  const acc = (runs: Run[]) => runs.map((r) => r.accuracy).filter((v): v is number => v !== undefined);
  const mean = (v: number[]) => (v.length ? v.reduce((a, b) => a + b, 0) / v.length : NaN);
  console.log(`\nRatios over ${o.repeat} runs (Copse / other; min / median / max of the per-run ratio; below 1 means Copse is faster):`);
  if (useSklearn) {
    console.log(`  fit, case (a), vs scikit-learn:        ${spread(ratios(fits.copse, fits.sklearn))}   (target at most 0.33)`);
    console.log(`  holdout accuracy, Copse - scikit-learn: ${((mean(acc(fits.copse)) - mean(acc(fits.sklearn))) * 100).toFixed(2)} pt (mean over runs; target no more than 1 pt below)`);
  }
  if (useRanger) console.log(`  fit, case (a), vs ranger:              ${spread(ratios(fits.copse, fits.ranger))}   (target at most 0.33)`);
  if (useSklearn) {
    console.log(`  scoring ${o.scoreRows.toLocaleString('en-US')} rows, whole process, vs scikit-learn + pandas: ${spread(ratios(scores.copse, scores.sklearn))}   (target at most 0.5)`);
  }
  const secs = (runs: Run[]) => spread(runs.map((r) => r.seconds).filter((v): v is number => v !== undefined));
  console.log(`  seconds (min / median / max): Copse fit ${secs(fits.copse)}, scikit-learn fit ${secs(fits.sklearn)}, ranger fit ${secs(fits.ranger)}`);
  console.log(`  seconds (min / median / max): Copse scoring ${secs(scores.copse)}, scikit-learn scoring ${secs(scores.sklearn)}`);

  if (cost.length > 0) {
    console.log(`\nCost as work grows (${FEATURES} features, three classes, full depth, ${s.workers} workers; fit seconds, peak MB of the whole process):`);
    const head = ['', 'Copse s', 'Copse MB', 'sklearn s', 'sklearn MB'];
    const lines = cost.map((c) => [c.label, fmt(c.copse.seconds), fmt(c.copse.megabytes, 0), fmt(c.sklearn?.seconds), fmt(c.sklearn?.megabytes, 0)]);
    const widths = head.map((_, j) => Math.max(...[head, ...lines].map((l) => l[j].length)));
    for (const l of [head, ...lines]) console.log('  ' + l.map((t, j) => (j === 0 ? t.padEnd(widths[j]) : t.padStart(widths[j]))).join('  '));
    for (const prefix of ['rows', 'trees']) {
      const part = cost.filter((c) => c.label.startsWith(prefix));
      if (part.length < 2) continue;
      const a = part[0];
      const b = part[part.length - 1];
      const slope = (r0?: number, r1?: number) => (r0 && r1 ? (Math.log(r1 / r0) / Math.log(b.x / a.x)).toFixed(2) : '-');
      console.log(`  slope of log time against log ${prefix} (${a.x} to ${b.x}): Copse ${slope(a.copse.seconds, b.copse.seconds)}, scikit-learn ${slope(a.sklearn?.seconds, b.sklearn?.seconds)}`);
    }
  }
}

function fmt(v: number | undefined, digits = 2): string {
  return v === undefined ? '-' : v.toFixed(digits);
}
