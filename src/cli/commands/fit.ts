import { MAX_CLASSES, ROWS_PER_CLASS, targetDoubt } from '../../core/checks/target';
import { loadCsv } from '../../core/csv/load';
import type { LoadOptions } from '../../core/csv/types';
import { findColumn, type ColumnKind, type Table } from '../../core/data/table';
import { fitForest, type FitOptions } from '../../core/forest/fit';
import { crossValidate } from '../../core/summary/cross-validation';
import { COVERAGE_BUDGET } from '../../core/summary/interval-check';
import type { CrossValidationSummary } from '../../core/summary/types';
import { inferTask } from '../../core/forest/target';
import { parseFeaturesPerSplit, type FeaturesPerSplit, type ForestParams, type Task } from '../../core/forest/params';
import { fitSizeProblem, seedOf } from '../limits';
import { DEFAULT_MAX_COLUMNS, grouped, MAX_FEATURES, MAX_TREES } from '../../core/limits';
import { summarizeFit } from '../../core/summary/fit';
import { ModelWriter } from '../../core/model/file';
import { choice, flag, fraction, list, parse, text, UsageError, wholeNumber, type Options, type Parsed } from '../args';
import { say, sayError } from '../terminal';
import { DEBUG_ENTRY, optionList, type HelpEntry } from '../help';
import { checkReportPath, writeHtmlReport } from '../html-report';
import { version } from '../main';
import { checkOutput, oneStdout, toStdout, writeFailure } from '../output';
import { progressBar } from '../progress';
import { fitReport, LISTED_ROWS } from '../report';

const FIT_ENTRIES: readonly HelpEntry[] = [
  ['--target COLUMN', 'the column to predict (required)'],
  ['--task KIND', 'classification or regression (inferred from the target when absent)'],
  ['--trees N', `number of trees (default 100, at most ${grouped(MAX_TREES)})`],
  ['--features-per-split K', 'features tried at each split: sqrt, third, log2, all, a whole number,\nor a fraction of the features (default sqrt for classification, third for regression)'],
  ['--max-depth N', 'deepest level a tree may grow to (default: no limit)'],
  ['--min-split N', 'fewest rows a node needs to be split (default 2)'],
  ['--min-leaf N', 'fewest rows in a leaf (default 1)'],
  ['--criterion NAME', 'gini or entropy (classification), squared-error (regression)'],
  ['--sample-fraction F', 'rows drawn per tree, as a fraction of the training rows (default 1)'],
  ['--without-replacement', "draw each tree's rows without replacement instead of a bootstrap sample"],
  ['--class-weight MODE', 'none or balanced (default none)'],
  ['--seed N', 'seed for every random choice; the same seed gives the same forest (default 1;\na whole number from -(2^53 - 1) to 2^53 - 1, which a model file keeps exactly)'],
  ['--workers N', 'worker threads (default: one per core)'],
  ['--holdout F', 'hold out this fraction of rows and score the forest on them'],
  ['--test TEST.csv', 'score the forest on a separate file with the same columns'],
  ['--folds K', 'also estimate the scores by K-fold cross-validation: K more forests with the same settings,\neach scored on the rows it left out (stratified by class, shuffled by the seed)'],
  ['--repeats R', 'with --folds: run the K folds R times, each with its own shuffle (default 1)'],
  ['--exclude A,B', 'leave these columns out'],
  ['--type COLUMN=KIND', 'read COLUMN as numeric, categorical or boolean (repeatable)'],
  ['--decimal-mark C', 'the decimal mark of the file\'s numbers, , or . (the other then separates thousands);\nwithout it a dot is the mark and numbers written with a comma are text'],
  ['--missing TOKENS', 'comma-separated cell values that mean missing (default: empty,NA,N/A,NaN,null,?,-)'],
  ['--sample-rows N', 'fit on a uniform random sample of N rows'],
  ['--no-importance', 'skip permutation importance (faster on large files)'],
  ['--max-columns N', `read a file with up to N columns (default ${grouped(DEFAULT_MAX_COLUMNS)}, at most ${grouped(MAX_FEATURES + 1)})`],
  ['--many-classes', `fit a class target even when it has more than ${MAX_CLASSES} classes, or fewer than\n${ROWS_PER_CLASS} rows per class on average (refused otherwise: such a target is rarely meant)`],
  ['--list N', `list N doubtful rows in the report instead of ${LISTED_ROWS} (all: every one)`],
  ['--save MODEL.json', 'save the forest to this file (never the data or test file; - for standard output,\nthe report then goes to standard error)'],
  ['--report REPORT.html', 'also write the fit as one self-contained HTML file to share (never an input file)'],
  ['--json', 'print one JSON object instead of the report'],
  DEBUG_ENTRY,
];

export const FIT_HELP = `Usage: copse fit DATA.csv --target COLUMN [options]

Fits a random forest on a CSV file and reports out-of-bag scores, importance and doubtful rows.

Options:
${optionList(FIT_ENTRIES)}`;

const OPTIONS: Options = {
  target: { type: 'string' },
  task: { type: 'string' },
  trees: { type: 'string' },
  'features-per-split': { type: 'string' },
  'max-depth': { type: 'string' },
  'min-split': { type: 'string' },
  'min-leaf': { type: 'string' },
  criterion: { type: 'string' },
  'sample-fraction': { type: 'string' },
  'without-replacement': { type: 'boolean' },
  'class-weight': { type: 'string' },
  seed: { type: 'string' },
  workers: { type: 'string' },
  holdout: { type: 'string' },
  test: { type: 'string' },
  exclude: { type: 'string', multiple: true },
  type: { type: 'string', multiple: true },
  missing: { type: 'string' },
  'sample-rows': { type: 'string' },
  'no-importance': { type: 'boolean' },
  folds: { type: 'string' },
  repeats: { type: 'string' },
  save: { type: 'string' },
  report: { type: 'string' },
  json: { type: 'boolean' },
  'many-classes': { type: 'boolean' },
  list: { type: 'string' },
  'max-columns': { type: 'string' },
  'decimal-mark': { type: 'string' },
};

function columnTypes(specs: string[]): Record<string, ColumnKind> {
  const out = Object.create(null) as Record<string, ColumnKind>;
  for (const spec of specs) {
    const at = spec.lastIndexOf('=');
    const kind = spec.slice(at + 1);
    if (at <= 0 || !['numeric', 'categorical', 'boolean'].includes(kind)) {
      throw new UsageError(`--type takes COLUMN=numeric, COLUMN=categorical or COLUMN=boolean; got "${spec}".`);
    }
    out[spec.slice(0, at)] = kind as ColumnKind;
  }
  return out;
}

export async function runFit(argv: string[]): Promise<void> {
  const args = parse('fit', argv, OPTIONS, 1);
  if (flag(args, 'help')) return void process.stdout.write(FIT_HELP);
  const target = text(args, 'target');
  if (!target) throw new UsageError('needs --target COLUMN, the column to predict.', 'fit');
  const holdout = fraction(args, 'holdout');
  const testPath = text(args, 'test');
  if (holdout !== undefined && testPath) throw new UsageError('Give either --holdout or --test, not both.', 'fit');
  const fps = text(args, 'features-per-split');
  const params: Partial<ForestParams> = {};
  const set = <K extends keyof ForestParams>(k: K, v: ForestParams[K] | undefined) => {
    if (v !== undefined) (params as Record<string, unknown>)[k] = v;
  };
  set('trees', wholeNumber(args, 'trees', 1, MAX_TREES, 'a model file holds at most that many trees'));
  try {
    set('featuresPerSplit', fps === undefined ? undefined : parseFeaturesPerSplit(fps));
  } catch (e) {
    throw new UsageError(`--features-per-split: ${(e as Error).message}`, 'fit');
  }
  set('maxDepth', wholeNumber(args, 'max-depth', 1));
  set('minSplit', wholeNumber(args, 'min-split', 2));
  set('minLeaf', wholeNumber(args, 'min-leaf', 1));
  set('criterion', choice(args, 'criterion', ['gini', 'entropy', 'squared-error'] as const));
  const sf = text(args, 'sample-fraction');
  if (sf !== undefined) {
    const v = Number(sf);
    if (!(v > 0 && v <= 1)) throw new UsageError(`--sample-fraction takes a fraction in (0, 1]; got "${sf}".`, 'fit');
    set('sampleFraction', v);
  }
  if (flag(args, 'without-replacement')) set('replace', false);
  set('classWeight', choice(args, 'class-weight', ['none', 'balanced'] as const));
  set('seed', seedOf(text(args, 'seed')));
  const task = choice(args, 'task', ['classification', 'regression'] as const);
  const missing = text(args, 'missing');
  const loadOptions: LoadOptions = {
    target,
    columnTypes: columnTypes(list(args, 'type')),
    missingTokens: missing === undefined ? undefined : missing.split(',').map((s) => s.trim()),
    sampleRows: wholeNumber(args, 'sample-rows', 1),
    sampleSeed: params.seed,
    decimalMark: choice(args, 'decimal-mark', ['.', ','] as const),
    maxColumns: wholeNumber(args, 'max-columns', 2, MAX_FEATURES + 1, 'a forest reads at most that many features'),
  };
  const json = flag(args, 'json');
  const listed = listCount(args);
  const dataPath = args.positionals[0];
  const savePath = text(args, 'save');
  // Checked before a minute of fitting, not after: a typo in the path, or the data file itself, which would be lost.
  if (savePath) {
    oneStdout(savePath, json, '--save -');
    await checkOutput(savePath, '--save', [
      { file: dataPath, what: 'the data file' },
      ...(testPath ? [{ file: testPath, what: 'the --test file' }] : []),
    ]);
  }
  const reportPath = text(args, 'report');
  if (reportPath) {
    await checkReportPath(reportPath, '--report', [
      { file: dataPath, what: 'the data file' },
      ...(testPath ? [{ file: testPath, what: 'the --test file' }] : []),
      ...(savePath ? [{ file: savePath, what: 'the --save file' }] : []),
    ]);
  }
  const exclude = list(args, 'exclude');
  const folds = wholeNumber(args, 'folds', 2);
  const repeats = wholeNumber(args, 'repeats', 1);
  if (repeats !== undefined && folds === undefined) throw new UsageError('--repeats needs --folds K.', 'fit');

  const t0 = performance.now();
  const loaded = await loadCsv(dataPath, loadOptions);
  checkTarget(loaded.table, target, task, flag(args, 'many-classes'));
  // Before any tree is grown or the model file is opened, so a fit too large to finish leaves nothing behind.
  const tooLarge = fitSizeProblem(loaded.table, target, task, holdout);
  if (tooLarge) throw new UsageError(tooLarge, 'fit');
  if (params.featuresPerSplit !== undefined) checkFeaturesPerSplit(params.featuresPerSplit, loaded.table, target, exclude);
  let test;
  if (testPath) {
    // The test file is read with the training file's column types, so a column cannot change type between them.
    const kinds = Object.create(null) as Record<string, ColumnKind | 'exclude'>;
    for (const c of loaded.table.columns) kinds[c.name] = c.kind;
    for (const d of loaded.dropped) kinds[d.name] = 'exclude';
    test = (await loadCsv(testPath, { ...loadOptions, sampleRows: undefined, columnTypes: kinds })).table;
  }
  const loadSeconds = (performance.now() - t0) / 1000;
  const bar = json ? undefined : progressBar('Growing trees');
  // Trees go to the model file as they are grown; they are kept in memory only to score a holdout or test set.
  let writer: ModelWriter | undefined;
  const report = await fitForest(loaded.table, {
    target,
    task,
    params,
    exclude,
    workers: wholeNumber(args, 'workers', 1),
    holdout,
    test,
    permutationImportance: !flag(args, 'no-importance'),
    onProgress: (d, t) => bar?.update(d, t),
    fingerprint: loaded.fingerprint,
    dropped: loaded.dropped,
    // Small fits keep them too, for the out-of-bag check of regression's prediction interval (core/summary/interval-check.ts);
    // the report draws maps and dependence from the trees, so it keeps them as well.
    keepTrees: holdout !== undefined || test !== undefined || reportPath !== undefined || loaded.table.rowCount * (params.trees ?? 100) <= COVERAGE_BUDGET,
    onTree: savePath
      ? (tree, _, head) => {
          writer ??= new ModelWriter(savePath, head, head.params.trees);
          writer.add(tree);
        }
      : undefined,
  }).catch((e) => {
    writer?.abandon();
    throw savePath ? writeFailure(e, savePath) : e;
  });
  bar?.end();
  // The summary, any cross-validation and the HTML report are made before the model is renamed into place: a fit that fails never
  // leaves a model behind.
  let printed: string;
  try {
    const cv = folds === undefined ? undefined : await crossValidation(loaded.table, { target, task, params, exclude, workers: wholeNumber(args, 'workers', 1) }, folds, repeats, json);
    const suspectLimit = Math.max(SUSPECTS_IN_JSON, listed ?? 0);
    const fitted = summarizeFit(report, loaded.table, { file: dataPath, rowsRead: loaded.rowsRead, sampled: loadOptions.sampleRows !== undefined, notes: loaded.notes, warnings: loaded.warnings, suspectLimit });
    const summary = cv ? { ...fitted, cv } : fitted;
    const seconds = { load: loadSeconds, fit: report.seconds.fit };
    printed = json ? JSON.stringify({ ...summary, seconds, model: savePath ?? null }, null, 2) + '\n' : fitReport(summary, seconds, toStdout(savePath) ? 'standard output' : savePath, { list: listed });
    if (reportPath) {
      await writeHtmlReport(reportPath, { summary, forest: report.forest, table: loaded.table, dataPath, trainRows: report.trainRows, version: version() });
      if (!json) printed += `Wrote the report to ${reportPath}.\n`;
    }
  } catch (e) {
    writer?.abandon();
    throw e;
  }
  await writer?.finish().catch((e) => {
    throw writeFailure(e, savePath!);
  });
  // With the model on standard output, the report goes to standard error.
  if (json) process.stdout.write(printed);
  else if (toStdout(savePath)) sayError(printed);
  else say(printed);
}

async function crossValidation(table: Table, fit: FitOptions, folds: number, repeats: number | undefined, quiet: boolean): Promise<CrossValidationSummary> {
  const bar = quiet ? undefined : progressBar(`Cross-validating (${folds} folds${repeats && repeats > 1 ? ` × ${repeats}` : ''})`);
  try {
    return await crossValidate(table, fit, { folds, repeats, onProgress: (d, t) => bar?.update(d, t) });
  } catch (e) {
    // Too few rows for the folds asked for is a usage error, not a failure.
    if (e instanceof RangeError && /folds/.test(e.message)) throw new UsageError(`--folds: ${e.message}`, 'fit');
    throw e;
  } finally {
    bar?.end();
  }
}

/** Doubtful rows the JSON lists unless --list asks for more (all are counted). */
const SUSPECTS_IN_JSON = 50;

/** --list N or --list all; undefined when absent. */
function listCount(args: Parsed): number | undefined {
  if (text(args, 'list') === 'all') return Number.MAX_SAFE_INTEGER;
  return wholeNumber(args, 'list', 1);
}

/** Refuses a target no one can mean (see core/checks/target.ts), unless --many-classes insists on many classes. */
function checkTarget(table: Table, target: string, task: Task | undefined, manyClasses: boolean): void {
  const column = findColumn(table, target);
  if (!column) return; // the loader has already said the file lacks it
  const doubt = targetDoubt(column, task ?? inferTask(column));
  if (!doubt || (doubt.kind === 'many-classes' && manyClasses)) return;
  if (doubt.kind === 'identifier') throw new UsageError(`${doubt.message}, so there is nothing to learn; choose another --target.`, 'fit');
  const regression = column.kind === 'numeric' ? ', use --task regression for a numeric target' : '';
  throw new UsageError(`${doubt.message}; choose another --target${regression}, or add --many-classes if you mean it.`, 'fit');
}

/** A whole number of features per split above the feature count would be cut down silently; say so instead. */
function checkFeaturesPerSplit(spec: FeaturesPerSplit, table: Table, target: string, exclude: readonly string[]): void {
  if (typeof spec !== 'number' || !Number.isInteger(spec)) return;
  const left = new Set(exclude);
  const features = table.columns.filter((c) => c.name !== target && !left.has(c.name)).length;
  if (spec > features) {
    throw new UsageError(`--features-per-split ${spec} is more than the ${features} feature${features === 1 ? '' : 's'} there are; give at most ${features}, or all.`, 'fit');
  }
}
