// Benchmark: Copse's CLI beside scikit-learn and R's ranger, same data and forest settings, one run.
// `npm run bench` (builds first), or `node out/bench/run.js [options]`:
//   --large-rows N   rows for case (c), default 1000000
//   --skip-large     cases (a) and (b) only
//   --trees N        default 100      --workers N  default 2      --seed N  default 1
//   --sides LIST     comma list of copse, sklearn, ranger (default all that are installed)
//   --keep           keep the generated data and models (printed path)
//   --repeat N       side-by-side runs behind each min / median / max ratio, default 3
//   --score-rows N   rows of the whole-process scoring case, default 100000
//   --cost-rows LIST rows of the cost table, default 10000,100000,1000000 ("" leaves the rows sweep out)
//   --cost-trees LIST trees of the cost table, default 50,100,500, at --cost-tree-rows rows (default 20000)
//   --skip-ratios    the first table only
// Prints a table; also writes the raw figures as JSON next to the data and to out/bench/last-run.json.
import { mkdirSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { FEATURES, TARGET, threeClassGenerator } from './data';
import { copseSide, rangerSide, sklearnSide, type LargeResult, type Settings, type Side, type SmallResult } from './sides';
import { ratioRuns } from './ratio-runs';
import { renderTable, type Row } from './table';

const SMALL_ROWS = 20_000;
const HOLDOUT_FRACTION = 0.25;
const PREDICT_ROWS = 40_000;

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: {
      'large-rows': { type: 'string', default: '1000000' },
      'skip-large': { type: 'boolean', default: false },
      trees: { type: 'string', default: '100' },
      workers: { type: 'string', default: '2' },
      seed: { type: 'string', default: '1' },
      sides: { type: 'string', default: 'copse,sklearn,ranger' },
      keep: { type: 'boolean', default: false },
      repeat: { type: 'string', default: '3' },
      'score-rows': { type: 'string', default: '100000' },
      'cost-rows': { type: 'string', default: '10000,100000,1000000' },
      'cost-trees': { type: 'string', default: '50,100,500' },
      'cost-tree-rows': { type: 'string', default: '20000' },
      'skip-ratios': { type: 'boolean', default: false },
    },
  });
  const largeRows = Number(values['large-rows']);
  const settings: Settings = {
    trees: Number(values.trees),
    // floor(sqrt(20)) = 4, passed to every side as a count so no side's own default rule is involved.
    featuresPerSplit: Math.floor(Math.sqrt(FEATURES)),
    workers: Number(values.workers),
    seed: Number(values.seed),
    target: TARGET,
  };
  // out/bench/run.js -> repository root two levels up; bench scripts live in the source tree.
  const repoRoot = path.resolve(__dirname, '..', '..');
  const benchDir = path.join(repoRoot, 'bench');
  const wanted = new Set(String(values.sides).split(',').map((s) => s.trim()));
  const candidates: Side[] = [];
  if (wanted.has('copse')) candidates.push(copseSide(repoRoot));
  if (wanted.has('sklearn')) candidates.push(sklearnSide(benchDir));
  if (wanted.has('ranger')) candidates.push(rangerSide(benchDir));

  const sides: Side[] = [];
  for (const side of candidates) {
    const ok = await side.available();
    if (ok === true) sides.push(side);
    else console.log(`${side.name}: skipped, ${ok}`);
  }
  if (sides.length === 0) throw new Error('nothing to benchmark');

  const loadAtStart = os.loadavg().map((v) => v.toFixed(1)).join(' ');
  const dir = mkdtempSync(path.join(os.tmpdir(), 'copse-bench-'));
  const files = {
    train: path.join(dir, 'train.csv'),
    test: path.join(dir, 'test.csv'),
    predict: path.join(dir, 'predict.csv'),
    large: path.join(dir, 'large.csv'),
    modelDir: dir,
  };
  try {
    console.log(`data in ${dir}`);
    // One stream for train and test: the holdout is simply the last 25% of the 20,000 rows drawn,
    // identical for every side because every side reads the same two files.
    const small = threeClassGenerator('copse-bench-small');
    const testRows = Math.round(SMALL_ROWS * HOLDOUT_FRACTION);
    const trainCounts = await small.write(files.train, SMALL_ROWS - testRows);
    await small.write(files.test, testRows);
    await threeClassGenerator('copse-bench-predict').write(files.predict, PREDICT_ROWS);
    console.log(`(a) train ${SMALL_ROWS - testRows} rows ${JSON.stringify(trainCounts)}, holdout ${testRows}; (b) predict ${PREDICT_ROWS} rows`);
    if (!values['skip-large']) {
      const started = performance.now();
      await threeClassGenerator('copse-bench-large').write(files.large, largeRows);
      const mb = statSync(files.large).size / 2 ** 20;
      console.log(`(c) ${largeRows} rows, ${mb.toFixed(0)} MB, written in ${((performance.now() - started) / 1000).toFixed(1)} s`);
    }

    const smallResults = new Map<Side, SmallResult>();
    const largeResults = new Map<Side, LargeResult>();
    for (const side of sides) {
      console.log(`${side.name}: cases (a), (b) ...`);
      smallResults.set(side, await side.small(files, settings));
    }
    if (!values['skip-large']) {
      for (const side of sides) {
        console.log(`${side.name}: case (c) ...`);
        largeResults.set(side, await side.large(files.large, settings));
      }
    }

    const s = (side: Side) => smallResults.get(side);
    const l = (side: Side) => largeResults.get(side);
    const fmtRows = (n: number) => n.toLocaleString('en-US');
    const rows: Row[] = [
      { label: `(a) fit ${fmtRows(SMALL_ROWS - testRows)} x ${FEATURES}, ${settings.trees} trees (s)`, kind: 'seconds', values: sides.map((x) => s(x)?.fit) },
      { label: `(a) holdout accuracy (${fmtRows(testRows)} rows)`, kind: 'accuracy', values: sides.map((x) => s(x)?.testAccuracy) },
      { label: '(a) out-of-bag accuracy', kind: 'accuracy', values: sides.map((x) => s(x)?.oobAccuracy) },
      { label: '(a) fit with permutation importance (s)', kind: 'seconds', values: sides.map((x) => s(x)?.fitWithImportance) },
      { label: '(a) peak memory, fit (MB)', kind: 'megabytes', values: sides.map((x) => s(x)?.peakMegabytes) },
      { label: `(b) predict ${fmtRows(PREDICT_ROWS)} rows (s)`, kind: 'seconds', values: sides.map((x) => s(x)?.predict) },
      { label: '(b) accuracy on those rows', kind: 'accuracy', values: sides.map((x) => s(x)?.predictAccuracy) },
    ];
    if (!values['skip-large']) {
      rows.push(
        { label: `(c) load ${fmtRows(largeRows)} x ${FEATURES} CSV (s)`, kind: 'seconds', values: sides.map((x) => l(x)?.load) },
        { label: `(c) fit ${fmtRows(largeRows)} x ${FEATURES}, ${settings.trees} trees (s)`, kind: 'seconds', values: sides.map((x) => l(x)?.fit) },
        { label: '(c) out-of-bag accuracy', kind: 'accuracy', values: sides.map((x) => l(x)?.oobAccuracy) },
        { label: '(c) peak memory, load + fit (MB)', kind: 'megabytes', values: sides.map((x) => l(x)?.peakMegabytes) },
        { label: '(c) wall time, whole command (s)', kind: 'seconds', values: sides.map((x) => l(x)?.wallSeconds) },
      );
    }

    console.log('');
    console.log(`trees ${settings.trees}, features per split ${settings.featuresPerSplit}, workers ${settings.workers}, seed ${settings.seed}, full depth, bootstrap`);
    console.log(sides.map((x) => `${x.name}${x.version ? ' ' + x.version : ''}`).join(', ') + `; node ${process.version}; ${os.cpus().length} CPUs`);
    // Other work on the machine slows every side; the load average says how much to trust the times.
    console.log(`load average at start ${loadAtStart}, at end ${os.loadavg().map((v) => v.toFixed(1)).join(' ')}`);
    console.log('');
    console.log(renderTable(sides.map((x) => x.name), rows));
    const notes = sides.flatMap((x) => [...(s(x)?.notes ?? []), ...(l(x)?.notes ?? [])].map((n) => `${x.name}: ${n}`));
    if (notes.length > 0) console.log('\n' + notes.join('\n'));
    console.log('\nLoad times: Copse seconds.load (parse and type the CSV), scikit-learn pandas.read_csv, ranger data.table::fread.');

    if (!values['skip-ratios']) {
      const list = (text: string | undefined) => String(text ?? '').split(',').filter((t) => t.trim() !== '').map(Number);
      await ratioRuns({
        repoRoot,
        dir,
        settings,
        repeat: Number(values.repeat),
        sides: new Set(sides.map((x) => (x.name === 'Copse' ? 'copse' : x.name === 'scikit-learn' ? 'sklearn' : 'ranger'))),
        train: files.train,
        test: files.test,
        scoreRows: Number(values['score-rows']),
        costRows: list(values['cost-rows']),
        costTrees: list(values['cost-trees']),
        costTreeRows: Number(values['cost-tree-rows']),
      });
    }

    const raw = {
      settings,
      loadAverage: { start: loadAtStart, end: os.loadavg() },
      rows: { train: SMALL_ROWS - testRows, holdout: testRows, predict: PREDICT_ROWS, large: values['skip-large'] ? 0 : largeRows },
      sides: sides.map((x) => ({ name: x.name, version: x.version, small: s(x), large: l(x) })),
    };
    writeFileSync(path.join(dir, 'results.json'), JSON.stringify(raw, null, 2));
    const outDir = path.join(repoRoot, 'out', 'bench');
    mkdirSync(outDir, { recursive: true });
    writeFileSync(path.join(outDir, 'last-run.json'), JSON.stringify(raw, null, 2));
  } finally {
    if (values.keep) console.log(`kept ${dir}`);
    else rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((e: unknown) => {
  console.error(e instanceof Error ? e.message : e);
  process.exitCode = 1;
});
