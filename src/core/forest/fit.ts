// Fits a forest on a table: prepares the binned training data, grows the trees in worker threads, and folds
// their results in tree order into out-of-bag predictions, the error curve, importances and margins.
import type { Schema } from '../base/schema';
import { InputError } from '../base/input-error';
import { binColumns, describeFeatures } from '../data/binning';
import { findColumn, type DroppedColumn, type Table } from '../data/table';
import { classificationScores, regressionScores, type Scores } from '../metrics/scores';
import type { TargetData } from '../tree/builder';
import { sampleSize } from './bootstrap';
import type { Doubt } from './doubtful';
import type { Forest, ForestHead } from './forest';
import type { FlatTree } from '../tree/tree';
import { DEFAULT_PERMUTATION_ROWS, type TrainingJob } from './grow-task';
import { OobFold, type RowResults } from './oob';
import { defaultParams, resolveFeaturesPerSplit, validateParams, type ForestParams, type Task } from './params';
import { defaultWorkers, growInWorkers } from './pool';
import { encodeTable, type Prediction } from './predict';
import { Scorer } from './scorer';
import { stream, shuffle } from './rng';
import { codesFor, encodeTarget, inferTask, targetOf } from './target';

export { inferTask } from './target';
export type { RowResults } from './oob';
export type { ClassificationScores, RegressionScores, Scores } from '../metrics/scores';

export interface FitOptions {
  readonly target: string;
  readonly task?: Task;
  readonly params?: Partial<ForestParams>;
  readonly exclude?: readonly string[];
  readonly workers?: number;
  readonly holdout?: number;
  readonly test?: Table;
  readonly signal?: AbortSignal;
  readonly onProgress?: (treesDone: number, treesTotal: number) => void;
  readonly permutationImportance?: boolean;
  readonly fingerprint?: string;
  readonly dropped?: readonly DroppedColumn[];
  /** Each tree as it is grown, in tree order: a caller can write the model out without holding every tree. */
  readonly onTree?: (tree: FlatTree, index: number, head: ForestHead) => void;
  /**
   * false: the report's forest has no trees (they went to onTree). Full-depth trees on millions of rows take
   * gigabytes; a fit that only reports out-of-bag results, or streams its model to a file, need not keep them.
   * A holdout or test set is scored with the trees, so it needs them kept.
   */
  readonly keepTrees?: boolean;
  /**
   * true: rows.inBag keeps every tree's bootstrap draw (a byte per row and tree). For a caller that reads them
   * at once on a thread that must stay responsive (the editor), rather than drawing them again from the seed.
   */
  readonly keepInBag?: boolean;
  /**
   * The rows to train on and the rows to score, as table rows with a target (cross-validation's folds),
   * instead of the seeded `holdout` split.
   */
  readonly split?: { readonly train: Int32Array; readonly holdout: Int32Array };
}

export interface Importance {
  /** Mean decrease in impurity, normalised to sum to 1. */
  readonly impurity: Float64Array;
  /** Mean increase in out-of-bag error when the feature is permuted (Breiman 2001). */
  readonly permutation: Float64Array;
  /** Standard deviation of that increase across trees. */
  readonly permutationSpread: Float64Array;
}

export interface FitReport {
  /** Its trees are empty when the fit was asked not to keep them (FitOptions.keepTrees). */
  readonly forest: Forest;
  readonly trainRows: Int32Array;
  readonly holdoutRows?: Int32Array;
  readonly rows: RowResults;
  readonly oob: Scores;
  readonly test?: Scores;
  readonly testPrediction?: Prediction;
  /** The holdout or test rows' truth, in testPrediction's order: class codes (-1: unknown) or values (NaN). */
  readonly testTruth?: Float64Array;
  readonly curve: Float64Array;
  readonly importance: Importance;
  /** Training rows the forest doubts (index: the training row), most doubtful first. */
  readonly suspects: readonly Doubt[];
  readonly notes: readonly string[];
  readonly seconds: { fit: number };
}

export async function fitForest(table: Table, options: FitOptions): Promise<FitReport> {
  const started = performance.now();
  const targetColumn = findColumn(table, options.target);
  if (!targetColumn) throw new InputError(`There is no column "${options.target}" to predict.`);
  const task = options.task ?? inferTask(targetColumn);
  const params = defaultParams(task, options.params);
  validateParams(params);
  if (options.holdout !== undefined && !(options.holdout > 0 && options.holdout < 1)) {
    throw new InputError(`holdout must be a fraction between 0 and 1; got ${options.holdout}`);
  }
  const encoded = encodeTarget(targetColumn, task);
  const exclude = new Set(options.exclude ?? []);
  const featureColumns = table.columns.filter((c) => c.name !== options.target && !exclude.has(c.name));
  if (featureColumns.length === 0) throw new InputError('No feature columns are left to fit on.');
  if (encoded.classes && encoded.classes.length < 2) {
    throw new InputError(`The target "${options.target}" has a single value ("${encoded.classes[0] ?? ''}"), so there is nothing to predict.`);
  }

  const holdoutCount = options.holdout ? Math.max(1, Math.floor(encoded.rows.length * options.holdout)) : 0;
  const { train, holdout } = options.split ?? splitRows(encoded.rows, holdoutCount, params.seed);
  const trainY = targetOf(encoded, train);
  const { infos, notes } = describeFeatures(featureColumns, train);
  const schema: Schema = { features: infos, target: { name: options.target, task, classes: encoded.classes } };
  const data = binColumns(featureColumns, infos, train);
  const n = train.length;
  const K = encoded.classes?.length ?? 1;
  const target = sharedTarget(trainY, encoded.classes?.length);
  const job: TrainingJob = {
    data,
    edges: infos.map((f) => f.edges ?? []),
    target,
    rowWeight: rowWeights(target, params.classWeight),
    settings: {
      criterion: params.criterion,
      featuresPerSplit: resolveFeaturesPerSplit(params.featuresPerSplit, infos.length),
      maxDepth: params.maxDepth ?? Number.POSITIVE_INFINITY,
      minSplit: params.minSplit,
      minLeaf: params.minLeaf,
    },
    seed: params.seed,
    sampleSize: sampleSize(n, params.sampleFraction),
    replace: params.replace,
    permutation: options.permutationImportance ?? true,
    permutationRows: DEFAULT_PERMUTATION_ROWS,
  };

  const head: ForestHead = { schema, params, training: { rows: n, fingerprint: options.fingerprint ?? '', dropped: [...(options.dropped ?? [])], heldOut: holdout?.length ?? 0 } };
  const keepTrees = options.keepTrees ?? true;
  if (!keepTrees && (holdout || options.test)) throw new RangeError('Scoring a holdout or test set needs the trees kept.');
  const fold = new OobFold(task, n, K, params.trees, trainY, infos.length, options.keepInBag);
  const trees: FlatTree[] = [];
  let grown = 0;
  await growInWorkers(
    job,
    params.trees,
    options.workers ?? defaultWorkers(),
    (r) => {
      if (keepTrees) trees.push(r.tree);
      fold.add(r);
      options.onTree?.(r.tree, r.index, head);
      options.onProgress?.(++grown, params.trees);
    },
    options.signal,
  );

  const forest: Forest = { ...head, trees };
  const rows = fold.rows();
  const oob = fold.scores(encoded.classes ?? []);
  let test: Scores | undefined;
  let testPrediction: Prediction | undefined;
  let testTruth: Float64Array | undefined;
  if (holdout) {
    testTruth = targetOf(encoded, holdout);
    ({ scores: test, prediction: testPrediction } = await scoreRows(forest, table, holdout, testTruth));
  } else if (options.test) {
    const testTarget = findColumn(options.test, options.target);
    if (!testTarget) throw new InputError(`The test data has no column "${options.target}".`);
    const truth = task === 'classification' ? codesFor(testTarget, encoded.classes!) : Float64Array.from(testTarget.kind === 'numeric' ? testTarget.values : []);
    const all = Int32Array.from({ length: options.test.rowCount }, (_, i) => i);
    testTruth = truth;
    ({ scores: test, prediction: testPrediction } = await scoreRows(forest, options.test, all, truth));
  }
  const fitNotes = [...notes];
  if (holdout) fitNotes.push(`${holdout.length} rows were held out for scoring and not used in training.`);
  return {
    forest,
    trainRows: train,
    holdoutRows: holdout,
    rows,
    oob,
    test,
    testPrediction,
    testTruth,
    curve: fold.curve,
    importance: fold.importance(),
    suspects: fold.suspects(),
    notes: fitNotes,
    seconds: { fit: (performance.now() - started) / 1000 },
  };
}

/**
 * The fit's holdout split: rows shuffled under the seed, the first `holdoutCount` held out, both parts back
 * in file order. Exported so a saved forest (which keeps its seed and row count) can find its rows again.
 */
export function splitRows(rows: Int32Array, holdoutCount: number, seed: number): { train: Int32Array; holdout?: Int32Array } {
  if (holdoutCount <= 0) return { train: rows };
  if (holdoutCount >= rows.length) throw new InputError('The holdout leaves no rows to train on.');
  const order = rows.slice();
  shuffle(order, stream(seed, 'holdout'));
  return { train: order.subarray(holdoutCount).slice().sort(), holdout: order.subarray(0, holdoutCount).slice().sort() };
}

function sharedTarget(y: Float64Array, classes?: number): TargetData {
  if (classes !== undefined) {
    const codes = new Int32Array(new SharedArrayBuffer(Math.max(4, y.length * 4)), 0, y.length);
    codes.set(y);
    return { kind: 'classes', y: codes, classes };
  }
  const values = new Float64Array(new SharedArrayBuffer(Math.max(8, y.length * 8)), 0, y.length);
  values.set(y);
  return { kind: 'values', y: values };
}

/** Balanced class weights n / (K * n_k), as is common practice. */
export function rowWeights(target: TargetData, mode: ForestParams['classWeight']): Float64Array {
  const n = target.y.length;
  const w = new Float64Array(new SharedArrayBuffer(Math.max(8, n * 8)), 0, n).fill(1);
  if (mode === 'balanced' && target.kind === 'classes') {
    const counts = new Float64Array(target.classes);
    for (let i = 0; i < n; i++) counts[target.y[i]]++;
    const present = counts.filter((c) => c > 0).length;
    for (let i = 0; i < n; i++) w[i] = n / (present * counts[target.y[i]]);
  }
  return w;
}

/** Scores the given table rows, whose truth (class code, -1 for unknown labels, or value) is given. */
async function scoreRows(forest: Forest, table: Table, rows: Int32Array, truth: Float64Array): Promise<{ scores: Scores; prediction: Prediction }> {
  const all = encodeTable(forest.schema, table);
  const p = forest.schema.features.length;
  const x = new Float64Array(rows.length * p);
  rows.forEach((r, i) => x.set(all.subarray(r * p, (r + 1) * p), i * p));
  // On a scoring thread, like the trees: the caller's thread may be an editor's.
  const scorer = new Scorer(forest);
  let prediction: Prediction;
  try {
    prediction = await scorer.predict(x, rows.length);
  } finally {
    await scorer.dispose();
  }
  const target = forest.schema.target;
  if (target.task === 'classification') {
    return { scores: classificationScores(truth, prediction.proba!, target.classes!, (i) => truth[i] >= 0), prediction };
  }
  return { scores: regressionScores(truth, prediction.predicted, (i) => !Number.isNaN(truth[i])), prediction };
}

