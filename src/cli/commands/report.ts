// `copse report MODEL DATA`: the shareable HTML report (src/report) of a saved or imported forest shown against a
// labelled file. On the forest's own training file, read as the fit read it, the out-of-bag views are the fit's
// own (the draws are recovered from the seed and checked against the trees); on any other file the file's rows
// are scored as test data. An imported forest has no training sample, so its out-of-bag parts say unavailable.
import * as path from 'node:path';
import { median } from '../../core/data/binning';
import { findColumn, type Table } from '../../core/data/table';
import { permutationOnRows, type PermutationImportance } from '../../core/explain/permutation';
import { checkedDraws } from '../../core/forest/checked-draws';
import { withCoverFrom } from '../../core/forest/cover';
import type { Forest } from '../../core/forest/forest';
import { UNAVAILABLE_FOR_IMPORT, type TrainingRows } from '../../core/forest/membership';
import { encodeTable, predictEncoded } from '../../core/forest/predict';
import { loadForScoring } from '../../core/forest/score-file';
import { membershipOf } from '../../core/forest/row-votes';
import { targetCodes } from '../../core/forest/target';
import { knowsTraining } from '../../core/open/open';
import { summarizeOpened } from '../../core/summary/opened';
import { flag, parse, text, UsageError, type Options } from '../args';
import { DEBUG_ENTRY, optionList } from '../help';
import { checkReportPath, writeHtmlReport } from '../html-report';
import { version } from '../main';
import { MODEL_ENTRIES, MODEL_OPTIONS, openForData } from '../model';

export const REPORT_HELP = `Usage: copse report MODEL DATA.csv [--out REPORT.html]

Writes one self-contained HTML file about a saved forest (.json) or an imported ONNX tree ensemble shown
against a labelled CSV file: scores, importance, decision-region maps, partial dependence and doubtful rows.
It opens offline in any browser and makes no network request. On the forest's own training file the
out-of-bag views are the fit's own; on another file its rows are scored as test data.

Options:
${optionList([
  ['--target COLUMN', "the column holding the labels, when the model calls its target otherwise\n(an imported model's target is often called label)"],
  ['--out REPORT.html', 'where to write the report (default: DATA-report.html in the current folder;\nnever the model or the data file)'],
  ...MODEL_ENTRIES,
  DEBUG_ENTRY,
])}`;

const OPTIONS: Options = { out: { type: 'string' }, target: { type: 'string' }, ...MODEL_OPTIONS };

export async function runReport(argv: string[]): Promise<void> {
  const args = parse('report', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(REPORT_HELP);
  const [modelPath, dataPath] = args.positionals;
  const out = text(args, 'out') ?? `${path.basename(dataPath, path.extname(dataPath))}-report.html`;
  await checkReportPath(out, '--out', [
    { file: modelPath, what: 'the model file' },
    { file: dataPath, what: 'the data file' },
  ]);
  const { forest: named, origin, notes } = await openForData(modelPath, dataPath, args, 'report');
  const opened = labelledBy(named, text(args, 'target'));
  const loaded = await loadForScoring(dataPath, opened.schema);
  const table = loaded.table;
  if (!findColumn(table, opened.schema.target.name)) {
    const hint = text(args, 'target') ? '' : ` (the model's target); name the column that holds the labels with --target`;
    throw new UsageError(`${dataPath} has no column "${opened.schema.target.name}"${hint}. A report scores the forest against labelled rows.`, 'report');
  }
  const x = encodeTable(opened.schema, table, dataPath, loaded.header);
  const imported = !knowsTraining(opened);
  const forest = imported ? readyForTable(opened, table, x) : opened;
  const truth = targetCodes(forest, table);
  const draws = imported ? `${UNAVAILABLE_FOR_IMPORT}` : checkedDraws(forest, table, x, loaded.fingerprint, []);
  const training: TrainingRows | { unknown: string } = typeof draws === 'string' ? { unknown: draws.replace(/\.$/, '') } : draws;
  const known = 'trainRows' in training ? training : undefined;
  const prediction = predictEncoded(forest, x, table.rowCount, known ? membershipOf(known.trainRows, table.rowCount, known.inBag) : undefined);
  const sameFile = forest.training.fingerprint !== '' && forest.training.fingerprint === loaded.fingerprint;
  const labelled = truth.some((v) => !Number.isNaN(v));
  let permutation: PermutationImportance | undefined;
  let permutationMissing: string | undefined;
  // On the training file shuffled columns would be scored on rows the trees fitted; that figure would flatter.
  if (sameFile) permutationMissing = 'not measured: this is the file the forest was trained on; fit again for out-of-bag permutation importance.';
  else if (!labelled) permutationMissing = `not measured: the file has no "${forest.schema.target.name}" values to score against.`;
  else {
    const p = forest.schema.features.length;
    const imp = await permutationOnRows({ x, rows: table.rowCount, features: p, truth, task: forest.schema.target.task, seed: forest.params.seed }, (rows, n) => Promise.resolve(predictEncoded(forest, rows, n)));
    if (imp.rows > 0) permutation = imp;
  }
  const summary = summarizeOpened({
    forest,
    table,
    prediction,
    truth,
    file: dataPath,
    fingerprint: loaded.fingerprint,
    rowsRead: loaded.rowsRead,
    sampled: false,
    training,
    permutation,
    permutationMissing,
    notes,
    warnings: loaded.warnings,
  });
  const model = { file: path.basename(modelPath), kind: origin.kind } as const;
  const bytes = await writeHtmlReport(out, { summary, forest, table, dataPath, trainRows: known?.trainRows ?? null, model, version: version() });
  process.stdout.write(`Wrote the report of ${modelPath} on ${dataPath} to ${out} (${Math.round(bytes / 1024)} KB).\n`);
}

/** The forest with its target named as the file names it, so the file's labels are read against it. */
function labelledBy(forest: Forest, column: string | undefined): Forest {
  if (!column || column === forest.schema.target.name) return forest;
  return { ...forest, schema: { ...forest.schema, target: { ...forest.schema.target, name: column } } };
}

/**
 * An imported forest knows no covers and no typical values: covers are counted from this table's rows, and each
 * numeric feature's typical value (what maps hold the other features at) is its median here, as the editor does.
 */
function readyForTable(forest: Forest, table: Table, x: Float64Array): Forest {
  const features = forest.schema.features.map((f) => {
    const column = findColumn(table, f.name);
    return f.kind === 'numeric' && Number.isNaN(f.reference) && column?.kind === 'numeric' ? { ...f, reference: median(column.values) } : f;
  });
  return withCoverFrom({ ...forest, schema: { ...forest.schema, features } }, x, table.rowCount);
}
