import { predictInWorkers } from '../../core/forest/parallel-predict';
import { encodeTable } from '../../core/forest/predict';
import { loadForScoring, predictionCells, predictionColumns, writePredictions } from '../../core/forest/score-file';
import { dataRowOf } from '../../core/forest/summary';
import { loadModel } from '../../core/model/file';
import { csvLine } from '../../core/csv/write';
import { flag, parse, text, type Options } from '../args';

export const PREDICT_HELP = `Usage: copse predict MODEL.json DATA.csv [--out OUT.csv] [--json]

Scores every row of DATA.csv with a saved forest.

Options:
  --out OUT.csv   write the input columns plus the prediction, each class's probability (or the value)
                  and the share of trees that agree (or the spread of the trees' values); never the input file
  --json          print one JSON object: rows, timings, and the predictions unless --out is given
  --debug         show stack traces on errors
Without --out or --json, the predictions are printed as CSV, one line per data row.
`;

const OPTIONS: Options = { out: { type: 'string' }, json: { type: 'boolean' } };

export async function runPredict(argv: string[]): Promise<void> {
  const args = parse('predict', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(PREDICT_HELP);
  const [modelPath, dataPath] = args.positionals;
  const forest = await loadModel(modelPath);
  const t0 = performance.now();
  const loaded = await loadForScoring(dataPath, forest.schema);
  const x = encodeTable(forest.schema, loaded.table, dataPath, loaded.header);
  const t1 = performance.now();
  const prediction = await predictInWorkers(forest, x, loaded.table.rowCount);
  const t2 = performance.now();
  const out = text(args, 'out');
  if (out) await writePredictions(dataPath, out, loaded.delimiter, forest, prediction);
  const columns = predictionColumns(forest, []);
  if (flag(args, 'json')) {
    const rows = out
      ? undefined
      : Array.from({ length: prediction.rows }, (_, i) => {
          const cells = predictionCells(forest, prediction, i);
          const entry: Record<string, unknown> = { row: dataRowOf(loaded.table, i) };
          columns.forEach((c, j) => (entry[c] = j === 0 && forest.schema.target.task === 'classification' ? cells[j] : Number(cells[j])));
          return entry;
        });
    const seconds = { load: (t1 - t0) / 1000, predict: (t2 - t1) / 1000 };
    process.stdout.write(JSON.stringify({ rows: prediction.rows, columns, output: out ?? null, warnings: loaded.warnings, seconds, predictions: rows }, null, 2) + '\n');
    return;
  }
  for (const w of loaded.warnings) process.stderr.write(`Warning: ${w}\n`);
  if (out) {
    process.stdout.write(`Scored ${prediction.rows} rows into ${out}.\n`);
    return;
  }
  let text_ = csvLine(['row', ...columns]);
  for (let i = 0; i < prediction.rows; i++) text_ += csvLine([String(dataRowOf(loaded.table, i)), ...predictionCells(forest, prediction, i)]);
  process.stdout.write(text_);
}
