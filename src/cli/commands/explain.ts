import { cellText, findColumn } from '../../core/data/table';
import { ContributionExplainer } from '../../core/explain/contributions';
import { predictEncoded } from '../../core/forest/predict';
import { argmaxAt } from '../../core/metrics/scores';
import { rawScoreName } from '../../core/forest/boosting';
import { withCoverFrom } from '../../core/forest/cover';
import type { Forest } from '../../core/forest/forest';
import { checkedDraws } from '../../core/forest/checked-draws';
import { knowsTraining } from '../../core/open/open';
import { flag, parse, text, UsageError, wholeNumber, type Options } from '../args';
import { visibleValue } from '../../core/visible';
import { say, sayError } from '../terminal';
import { largest } from '../report';
import { MODEL_HELP, MODEL_OPTIONS, openForData } from '../model';
import { chooseRows, wantedRows } from '../rows';

export const EXPLAIN_HELP = `Usage: copse explain MODEL DATA.csv --rows 1,7,12 [--json]

Shows how much each feature moved a saved forest's prediction on chosen rows of DATA.csv, away from the
forest's average prediction. For a boosted ensemble (XGBoost, or a summed ONNX ensemble) contributions are in
its raw-score space (log-odds for classes, the value for regression), with the probability beside. The contributions are exact Shapley values of the trees (Lundberg et al. 2020)
and add up to the prediction. Rows are counted from 1: the first row after the header is row 1.

When DATA.csv is the file the forest was fitted on, each training row is explained over the trees that
did not train on it (its out-of-bag trees), since the others have seen its answer: the prediction shown
is then the out-of-bag one. Rows the fit held out are explained over all trees, none of which saw them.

Options:
  --rows LIST     comma-separated data row numbers (required)
  --all-trees     explain every row over all trees, as for new data, even in the training file
  --class LABEL   classification: explain the probability of this class (default: the predicted class)
  --top N         show the N largest contributions per row (default 10; all with --json)
  --json          print one JSON object: per row its prediction, the average prediction ("base"),
                  every feature's contribution (per class for classification), and which trees
                  were used ("trees": "out-of-bag" or "all", and "treeCount")
${MODEL_HELP}  --debug         show stack traces on errors
`;

const OPTIONS: Options = {
  rows: { type: 'string' },
  class: { type: 'string' },
  top: { type: 'string' },
  json: { type: 'boolean' },
  'all-trees': { type: 'boolean' },
  ...MODEL_OPTIONS,
};

interface ExplainedRow {
  row: number;
  line: number;
  prediction: string | number;
  probabilities?: Record<string, number>;
  base: number | Record<string, number>;
  contributions: Record<string, number> | Record<string, Record<string, number>>;
  values: Record<string, string>;
  /** 'out-of-bag': only trees that never drew the row (every tree, for a row the fit did not train on). */
  trees: 'out-of-bag' | 'all';
  treeCount: number;
  /** Boosted: the raw score (base plus contributions) the link turns into the prediction, per class or the value. */
  rawScore?: number | Record<string, number>;
}

export async function runExplain(argv: string[]): Promise<void> {
  const args = parse('explain', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(EXPLAIN_HELP);
  const wanted = wantedRows(args, 'explain');
  const top = wholeNumber(args, 'top', 1) ?? 10;
  const [modelPath, dataPath] = args.positionals;
  const opened = await openForData(modelPath, dataPath, args, 'explain');
  let forest = opened.forest;
  const notes = opened.notes;
  const target = forest.schema.target;
  const classes = target.classes ?? [];
  const chosen = text(args, 'class');
  if (chosen !== undefined) {
    if (target.task !== 'classification') throw new UsageError('--class applies to classification forests; this one is a regression.', 'explain');
    if (!classes.includes(chosen)) throw new UsageError(`--class: the forest has no class "${chosen}"; its classes are ${classes.map((c) => `"${c}"`).join(', ')}.`, 'explain');
  }
  const { loaded, tableRows, x, encoded } = await chooseRows(forest, dataPath, wanted, 'explain');
  const table = loaded.table;
  // Per row: its out-of-bag trees; null for a row of the training file no tree drew; absent for all trees.
  let ownTrees: Array<Int32Array | null> | undefined;
  if (!flag(args, 'all-trees') && knowsTraining(forest) && forest.training.fingerprint !== '' && loaded.fingerprint === forest.training.fingerprint) {
    const draws = checkedDraws(forest, table, encoded, loaded.fingerprint, tableRows);
    if (typeof draws === 'string') notes.push(`${dataPath} is the file the forest was fitted on, but which trees drew each row cannot be told for certain: ${draws} Every row is explained over all trees.`);
    else ownTrees = draws.outOfBag;
  }
  // An XGBoost file carries its own covers (each node's hessian sum), the weights XGBoost's TreeSHAP uses.
  if (!knowsTraining(forest) && forest.boosting?.source !== 'xgboost') {
    // Explanations weigh a split's sides by the rows that reached them; an import has no training counts.
    forest = withCoverFrom(forest, encoded, table.rowCount);
    notes.push(`The model carries no training row counts, so each split's sides are weighed by the ${table.rowCount} rows of ${dataPath}.`);
  }
  const names = forest.schema.features.map((f) => f.name);
  const p = names.length;
  const whole = predictEncoded(forest, x, wanted.length);
  const explainer = new ContributionExplainer(forest);
  const K = explainer.outputs;
  const T = forest.trees.length;
  const columns = forest.schema.features.map((f) => findColumn(table, f.name)!);

  const rows = wanted.map((r, j): ExplainedRow => {
    const own = ownTrees?.[j];
    let trees = own ?? undefined;
    if (trees && trees.length === 0) {
      notes.push(`Every one of the ${T} trees drew row ${r}, so it is explained over all trees.`);
      trees = undefined;
    }
    // A row of the training file that the fit did not train on (held out, or without a target): no tree drew it.
    const used = { trees: trees !== undefined || own === null ? ('out-of-bag' as const) : ('all' as const), treeCount: trees?.length ?? T };
    const phi = explainer.explainRow(x, j * p, undefined, trees);
    const base = trees ? explainer.baseOver(trees) : explainer.base;
    // The prediction of the same trees, by the scoring walk, so it is what base plus the contributions explain.
    const pred = trees ? predictEncoded(subForest(forest, trees), x.subarray(j * p, (j + 1) * p), 1) : whole;
    const at = trees ? 0 : j;
    const tableRow = tableRows[j];
    const values = Object.fromEntries(names.map((n, f) => [n, cellText(columns[f], tableRow)]));
    const line = table.lineOfRow[tableRow];
    if (target.task === 'classification') {
      const perClass = (k: number) => Object.fromEntries(names.map((n, f) => [n, phi[f * K + k]]));
      return {
        row: r,
        line,
        prediction: classes[argmaxAt(pred.proba!, at * K, K)],
        probabilities: Object.fromEntries(classes.map((c, k) => [c, pred.proba![at * K + k]])),
        base: Object.fromEntries(classes.map((c, k) => [c, base[k]])),
        contributions: Object.fromEntries(classes.map((c, k) => [c, perClass(k)])),
        values,
        ...used,
        ...(forest.boosting ? { rawScore: Object.fromEntries(classes.map((c, k) => [c, rawOf(phi, base, k, K, p)])) } : {}),
      };
    }
    if (forest.boosting) return { row: r, line, prediction: pred.predicted[at], base: base[0], contributions: Object.fromEntries(names.map((n, f) => [n, phi[f]])), values, ...used, rawScore: rawOf(phi, base, 0, 1, p) };
    return { row: r, line, prediction: pred.predicted[at], base: base[0], contributions: Object.fromEntries(names.map((n, f) => [n, phi[f]])), values, ...used };
  });

  const scale = forest.boosting ? rawScoreName(forest.boosting.link) : target.task === 'classification' ? 'probability' : 'value';
  if (forest.boosting) notes.push(`Boosted trees: contributions and "base" are in the raw-score space (${scale}), the standard for boosted models; they add up to "rawScore"${target.task === 'classification' ? ', which the link turns into the probabilities' : ', the prediction'}.`);
  if (flag(args, 'json')) {
    process.stdout.write(JSON.stringify({ task: target.task, target: target.name, trees: forest.trees.length, contributionsIn: scale, features: names, warnings: [...notes, ...loaded.warnings], rows }, null, 2) + '\n');
    return;
  }
  for (const w of [...notes, ...loaded.warnings]) sayError(`Warning: ${w}\n`);
  // Two classes: the log-odds explained are class 1's (class 0's raw score stays 0), whatever is predicted.
  const shownClass = chosen ?? (forest.boosting?.link === 'logistic' ? classes[1] : undefined);
  say(rows.map((row) => readable(row, shownClass, top, T, forest.boosting ? scale : undefined)).join('\n'));
}

function rawOf(phi: Float64Array, base: Float64Array, k: number, K: number, p: number): number {
  let s = base[k];
  for (let f = 0; f < p; f++) s += phi[f * K + k];
  return s;
}

/** The forest with only the listed trees, for scoring a row with its out-of-bag trees. */
function subForest(forest: Forest, trees: ArrayLike<number>): Forest {
  return { ...forest, trees: Array.from(trees, (t) => forest.trees[t]) };
}

/** Signed, with one number of decimals per row, so the column lines up and the largest shows four digits. */
function signer(values: number[]): (v: number) => string {
  const most = largest(values.map(Math.abs));
  const decimals = most > 0 ? Math.min(6, Math.max(0, 3 - Math.floor(Math.log10(most)))) : 2;
  return (v) => (v >= 0 ? '+' : '') + v.toFixed(decimals);
}

function readable(row: ExplainedRow, chosen: string | undefined, top: number, forestTrees: number, raw?: string): string {
  let over = '';
  if (row.trees === 'out-of-bag') {
    over = row.treeCount === forestTrees ? `, over all ${row.treeCount} trees, none of which trained on this row` : `, over the ${row.treeCount} trees that did not train on this row`;
  }
  const who = `Row ${row.row} (line ${row.line})${over}`;
  let head: string;
  let base: number;
  let output: number;
  let phi: Record<string, number>;
  if (row.probabilities) {
    const cls = chosen ?? String(row.prediction);
    base = (row.base as Record<string, number>)[cls];
    output = row.probabilities[cls];
    phi = (row.contributions as Record<string, Record<string, number>>)[cls];
    head = `${who}: predicted "${row.prediction}"; probability of "${cls}" ${output.toFixed(3)}, against ${base.toFixed(3)} on average`;
    if (raw) {
      const p = output;
      output = (row.rawScore as Record<string, number>)[cls];
      head = `${who}: predicted "${row.prediction}"; ${raw} of "${cls}" ${output.toFixed(3)} (probability ${p.toFixed(3)}), against ${base.toFixed(3)} on average`;
    }
  } else {
    base = row.base as number;
    output = row.prediction as number;
    phi = row.contributions as Record<string, number>;
    head = `${who}: predicted ${output.toPrecision(6)}, against ${base.toPrecision(6)} on average`;
  }
  const signed = signer([...Object.values(phi), output - base]);
  const order = Object.keys(phi).sort((a, b) => Math.abs(phi[b]) - Math.abs(phi[a]) || (a < b ? -1 : 1));
  const shown = order.slice(0, top);
  const cells = [['feature', 'value', 'contribution'], ...shown.map((f) => [f, row.values[f] === '' ? '(missing)' : row.values[f], signed(phi[f])])].map((r) => r.map(visibleValue));
  const widths = cells[0].map((_, c) => largest(cells.map((r) => r[c].length)));
  let out = `${head}\n`;
  out += cells.map((r) => '  ' + r.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ')).join('\n') + '\n';
  const rest = order.slice(top);
  if (rest.length) out += `  (${rest.length} more feature${rest.length > 1 ? 's' : ''}, together ${signed(rest.reduce((s, f) => s + phi[f], 0))})\n`;
  out += `  The contributions add up to ${signed(output - base)}, the distance from the average to this prediction.\n`;
  return out;
}
