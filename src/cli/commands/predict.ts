import { isOneWayInput } from '../../core/csv/pipe-source';
import { secondPass } from '../limits';
import { csvLine } from '../../core/csv/write';
import { predictInterval, quantileIndexFromTrainingFile } from '../../core/explain/quantiles';
import type { Forest } from '../../core/forest/forest';
import { predictInWorkers } from '../../core/forest/parallel-predict';
import { encodeTable, predictEncoded, type Prediction } from '../../core/forest/predict';
import { targetCodes } from '../../core/forest/target';
import { loadForScoring, predictionColumns, type AddedColumns, type IntervalCells } from '../../core/forest/score-file';
import { writeScored } from '../../core/forest/score-formats';
import { classificationScores, regressionScores } from '../../core/metrics/scores';
import { dataRowOf, scoresSummary } from '../../core/summary/fit';
import type { ScoresSummary } from '../../core/summary/types';
import { knowsTraining } from '../../core/open/open';
import { withThreshold } from '../../core/forest/threshold-prediction';
import { flag, fraction, parse, text, UsageError, type Options, type Parsed } from '../args';
import { say, sayError } from '../terminal';
import { DEBUG_ENTRY, optionList } from '../help';
import { MODEL_ENTRIES, MODEL_OPTIONS, openForData } from '../model';
import { checkOutput, oneStdout, toStdout, writeFailure } from '../output';
import { value } from '../report';
import { trainingOf, type TrainingView } from '../training';

export const PREDICT_HELP = `Usage: copse predict MODEL DATA.csv [--out OUT.csv] [--json]

Scores every row of DATA.csv with a saved forest: a Copse model file (.json) or an ONNX tree ensemble (.onnx).
An XGBoost JSON model (.json, told apart by its content) is scored as XGBoost scores it; boosted trees do
not vote, so no tree_agreement or tree_spread column is written for them.

When DATA.csv is the file the forest was fitted on, columns starting oob_ give each training row the answer of
the trees that never drew it (out-of-bag), and row_role says which rows were training or held out. Read those:
the all-trees columns look better than the forest is on rows the trees were fitted on.

Options:
${optionList([
  ['--out OUT.csv', "write the input columns plus the prediction, each class's probability (or the value)\nand the share of trees that agree (or the spread of the trees' values); never the input file;\nOUT.parquet writes Parquet, any other name CSV (DATA may be CSV, .csv.gz or Parquet); - for standard output"],
  ['--interval LEVEL', 'regression: add a prediction interval at this level, such as 0.9 (quantile regression\nforest, Meinshausen 2006); needs --training'],
  ['--threshold P', "two classes: give the second class when its probability exceeds P (default: the larger\nprobability, as P = 0.5); copse fit's report suggests thresholds chosen on out-of-bag rows"],
  ['--training TRAIN.csv', "the file the forest was fitted on (checked against the model's fingerprint)"],
  ['--json', 'print one JSON object: rows, columns, timings, and the predictions unless --out is given'],
  ...MODEL_ENTRIES,
  DEBUG_ENTRY,
])}
Without --out or --json, the predictions are printed as CSV, one line per data row.
`;

const OPTIONS: Options = { out: { type: 'string' }, json: { type: 'boolean' }, interval: { type: 'string' }, threshold: { type: 'string' }, training: { type: 'string' }, ...MODEL_OPTIONS };

export async function runPredict(argv: string[]): Promise<void> {
  const args = parse('predict', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(PREDICT_HELP);
  const [modelPath, dataPath] = args.positionals;
  const level = fraction(args, 'interval');
  const threshold = thresholdOf(args);
  const training = text(args, 'training');
  const out = text(args, 'out');
  if (level !== undefined && !training) throw new UsageError('--interval needs --training TRAIN.csv, the file the forest was fitted on.', 'predict');
  if (out && isOneWayInput(dataPath)) throw new UsageError(secondPass('--out copies each row of the data beside its answers'), 'predict');
  if (out) {
    oneStdout(out, flag(args, 'json'), '--out -');
    await checkOutput(out, '--out', [
      { file: dataPath, what: 'the input file', refusal: `Refusing to write predictions over the input file ${dataPath}; choose another --out.` },
      ...(training ? [{ file: training, what: 'the --training file' }] : []),
      { file: modelPath, what: 'the model' },
    ]);
  }
  const { forest, notes } = await openForData(modelPath, dataPath, args, 'predict');
  if (threshold !== undefined && forest.schema.target.classes?.length !== 2) {
    throw new UsageError(`--threshold is for forests of two classes; this one ${forest.schema.target.task === 'regression' ? 'predicts a number' : `has ${forest.schema.target.classes!.length} classes`}.`, 'predict');
  }
  if (level !== undefined && forest.schema.target.task !== 'regression') throw new UsageError('--interval is for regression forests; this one classifies.', 'predict');
  if (level !== undefined && !knowsTraining(forest)) {
    throw new UsageError('--interval needs the rows the forest was trained on and how each tree drew them; an imported forest does not carry them.', 'predict');
  }
  const t0 = performance.now();
  const loaded = await loadForScoring(dataPath, forest.schema);
  const table = loaded.table;
  const warnings = [...notes, ...loaded.warnings];
  const x = encodeTable(forest.schema, table, dataPath, loaded.header);
  const own = trainingOf(forest, loaded, x);
  const t1 = performance.now();
  // On its own training file one walk gives both answers (on this thread); elsewhere every core scores.
  const scored = own.view ? predictEncoded(forest, x, table.rowCount, own.view.membership) : await predictInWorkers(forest, x, table.rowCount);
  const prediction = threshold === undefined ? scored : withThreshold(scored, threshold);
  let interval: IntervalCells | undefined;
  if (level !== undefined) {
    const index = await quantileIndexFromTrainingFile(forest, training!);
    const { lower, upper } = predictInterval(index, x, table.rowCount, level);
    interval = { level, lower, upper };
  }
  const t2 = performance.now();
  let added = predictionColumns(forest, prediction, loaded.header, interval);
  let textColumns = forest.schema.target.task === 'classification' ? [0] : [];
  let outOfBag: ScoresSummary | null = null;
  if (own.view) {
    outOfBag = outOfBagScores(forest, prediction, targetCodes(forest, table), threshold !== undefined);
    ({ added, textColumns } = withOutOfBag(forest, prediction, own.view, added, textColumns, loaded.header));
    const all = added.names.filter((n) => !n.startsWith('oob_') && n !== 'row_role').join(', ');
    warnings.push(
      `${dataPath} is the file this forest was fitted on. The all-trees columns (${all}) look better than the forest is: most trees ` +
        `were fitted on each training row and remember it. Read the oob_ columns instead, the answers of the trees that never drew the row` +
        `${outOfBag ? ` (${headlineScore(outOfBag)})` : ''}.`,
    );
  } else if (own.unknown) {
    warnings.push(`${dataPath} is the file this forest was fitted on, but which trees drew each row cannot be told for certain: ${own.unknown} No out-of-bag columns are added.`);
  }
  if (out) {
    const rowOf = new Map<number, number>();
    for (let i = 0; i < table.rowCount; i++) rowOf.set(dataRowOf(table, i), i);
    await writeScored(dataPath, out, loaded.delimiter, added, textColumns, (k) => rowOf.get(k + 1) ?? -1).catch((e) => {
      throw writeFailure(e, out);
    });
  }
  if (flag(args, 'json')) {
    const texts = new Set(textColumns);
    const rows = out
      ? undefined
      : Array.from({ length: prediction.rows }, (_, i) => {
          const entry: Record<string, unknown> = { row: dataRowOf(table, i) };
          added.cells(i).forEach((c, j) => (entry[added.names[j]] = c === '' ? null : texts.has(j) ? c : Number(c)));
          return entry;
        });
    const seconds = { load: (t1 - t0) / 1000, predict: (t2 - t1) / 1000 };
    process.stdout.write(JSON.stringify({ rows: prediction.rows, columns: added.names, output: out ?? null, threshold: threshold ?? null, warnings, outOfBag, seconds, predictions: rows }, null, 2) + '\n');
    return;
  }
  for (const w of warnings) sayError(`Warning: ${w}\n`);
  if (out) {
    if (toStdout(out)) sayError(`Scored ${prediction.rows} rows.\n`);
    else say(`Scored ${prediction.rows} rows into ${out}.\n`);
    return;
  }
  let csv = csvLine(['row', ...added.names]);
  for (let i = 0; i < prediction.rows; i++) csv += csvLine([String(dataRowOf(table, i)), ...added.cells(i)]);
  process.stdout.write(csv);
}

/** --threshold P: a probability strictly between 0 and 1, or 0 or 1 themselves (flag every row with any chance, or none). */
function thresholdOf(args: Parsed): number | undefined {
  const v = text(args, 'threshold');
  if (v === undefined) return undefined;
  const n = Number(v);
  if (v.trim() === '' || !(n >= 0 && n <= 1)) throw new UsageError(`--threshold takes a probability between 0 and 1, such as 0.3; got "${v}".`, 'predict');
  return n;
}

function headlineScore(s: ScoresSummary): string {
  const what = s.accuracy !== undefined ? `accuracy ${(s.accuracy * 100).toFixed(1)}%` : `R² ${value(s.r2)}`;
  return `out-of-bag ${what} over ${s.rows} rows`;
}

/** The out-of-bag score over the training rows, as the fit reported it: the same trees and the same rows. */
function outOfBagScores(forest: Forest, p: Prediction, truth: Float64Array, thresholded: boolean): ScoresSummary | null {
  const oob = p.oob!;
  const has = (i: number) => oob.trees[i] > 0 && !Number.isNaN(truth[i]);
  const classes = forest.schema.target.classes;
  if (classes) return scoresSummary(classificationScores(truth, oob.proba!, classes, has, thresholded ? oob.predicted : undefined), classes);
  return scoresSummary(regressionScores(truth, oob.predicted, has));
}

/** The columns predictionColumns adds, then the out-of-bag ones and each row's part in the fit. */
function withOutOfBag(forest: Forest, p: Prediction, training: TrainingView, added: AddedColumns, textColumns: number[], header: readonly string[]): { added: AddedColumns; textColumns: number[] } {
  const t = forest.schema.target;
  const classes = t.classes;
  const oob = p.oob!;
  const wanted = [`oob_predicted_${t.name}`, ...(classes ?? []).map((c) => `oob_probability_${c}`), 'oob_trees', 'row_role'];
  const taken = new Set([...header, ...added.names]);
  const names = wanted.map((name) => {
    let n = name;
    for (let k = 2; taken.has(n); k++) n = `${name}_${k}`;
    taken.add(n);
    return n;
  });
  const K = classes?.length ?? 0;
  const cells = (i: number): string[] => {
    const role = training.membership.trainPos[i] >= 0 ? 'training' : training.holdout.has(i) ? 'holdout' : 'other';
    if (oob.trees[i] === 0) return [...names.slice(0, -2).map(() => ''), '0', role];
    const predicted = classes ? classes[oob.predicted[i]] : String(oob.predicted[i]);
    const probabilities = Array.from({ length: K }, (_, k) => String(Number(oob.proba![i * K + k].toFixed(6))));
    return [predicted, ...probabilities, String(oob.trees[i]), role];
  };
  const first = added.names.length;
  return {
    added: { names: [...added.names, ...names], cells: (i) => [...added.cells(i), ...cells(i)] },
    textColumns: [...textColumns, ...(classes ? [first] : []), first + names.length - 1],
  };
}
