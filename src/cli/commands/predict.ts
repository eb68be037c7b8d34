import { csvLine } from '../../core/csv/write';
import { predictInterval, quantileIndexFromTrainingFile } from '../../core/explain/quantiles';
import { predictInWorkers } from '../../core/forest/parallel-predict';
import { encodeTable } from '../../core/forest/predict';
import { loadForScoring, predictionColumns, writePredictions, type IntervalCells } from '../../core/forest/score-file';
import { dataRowOf } from '../../core/summary/fit';
import { knowsTraining } from '../../core/model/open';
import { flag, fraction, parse, text, UsageError, type Options } from '../args';
import { MODEL_HELP, MODEL_OPTIONS, openForData } from '../model';

export const PREDICT_HELP = `Usage: copse predict MODEL DATA.csv [--out OUT.csv] [--json]

Scores every row of DATA.csv with a saved forest: a Copse model file (.json) or an ONNX tree ensemble (.onnx).

Options:
  --out OUT.csv        write the input columns plus the prediction, each class's probability (or the value)
                       and the share of trees that agree (or the spread of the trees' values); never the input file
  --interval LEVEL     regression: add a prediction interval at this level, such as 0.9 (quantile regression
                       forest, Meinshausen 2006); needs --training
  --training TRAIN.csv the file the forest was fitted on (checked against the model's fingerprint)
  --json               print one JSON object: rows, columns, timings, and the predictions unless --out is given
${MODEL_HELP}  --debug              show stack traces on errors
Without --out or --json, the predictions are printed as CSV, one line per data row.
`;

const OPTIONS: Options = { out: { type: 'string' }, json: { type: 'boolean' }, interval: { type: 'string' }, training: { type: 'string' }, ...MODEL_OPTIONS };

export async function runPredict(argv: string[]): Promise<void> {
  const args = parse('predict', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(PREDICT_HELP);
  const [modelPath, dataPath] = args.positionals;
  const level = fraction(args, 'interval');
  const training = text(args, 'training');
  if (level !== undefined && !training) throw new UsageError('--interval needs --training TRAIN.csv, the file the forest was fitted on.', 'predict');
  const { forest, notes } = await openForData(modelPath, dataPath, args, 'predict');
  if (level !== undefined && forest.schema.target.task !== 'regression') throw new UsageError('--interval is for regression forests; this one classifies.', 'predict');
  if (level !== undefined && !knowsTraining(forest)) {
    throw new UsageError('--interval needs the rows the forest was trained on and how each tree drew them; an imported forest does not carry them.', 'predict');
  }
  const t0 = performance.now();
  const loaded = await loadForScoring(dataPath, forest.schema);
  const table = loaded.table;
  const warnings = [...notes, ...loaded.warnings];
  const x = encodeTable(forest.schema, table, dataPath, loaded.header);
  const t1 = performance.now();
  const prediction = await predictInWorkers(forest, x, table.rowCount);
  let interval: IntervalCells | undefined;
  if (level !== undefined) {
    const index = await quantileIndexFromTrainingFile(forest, training!);
    const { lower, upper } = predictInterval(index, x, table.rowCount, level);
    interval = { level, lower, upper };
  }
  const t2 = performance.now();
  const added = predictionColumns(forest, prediction, loaded.header, interval);
  const out = text(args, 'out');
  if (out) {
    const rowOf = new Map<number, number>();
    for (let i = 0; i < table.rowCount; i++) rowOf.set(dataRowOf(table, i), i);
    await writePredictions(dataPath, out, loaded.delimiter, added, (k) => rowOf.get(k + 1) ?? -1);
  }
  if (flag(args, 'json')) {
    const numeric = forest.schema.target.task === 'regression';
    const rows = out
      ? undefined
      : Array.from({ length: prediction.rows }, (_, i) => {
          const entry: Record<string, unknown> = { row: dataRowOf(table, i) };
          added.cells(i).forEach((c, j) => (entry[added.names[j]] = j === 0 && !numeric ? c : Number(c)));
          return entry;
        });
    const seconds = { load: (t1 - t0) / 1000, predict: (t2 - t1) / 1000 };
    process.stdout.write(JSON.stringify({ rows: prediction.rows, columns: added.names, output: out ?? null, warnings, seconds, predictions: rows }, null, 2) + '\n');
    return;
  }
  for (const w of warnings) process.stderr.write(`Warning: ${w}\n`);
  if (out) {
    process.stdout.write(`Scored ${prediction.rows} rows into ${out}.\n`);
    return;
  }
  let csv = csvLine(['row', ...added.names]);
  for (let i = 0; i < prediction.rows; i++) csv += csvLine([String(dataRowOf(table, i)), ...added.cells(i)]);
  process.stdout.write(csv);
}
