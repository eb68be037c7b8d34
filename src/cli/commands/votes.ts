import { formatNumber } from '../../core/format';
import type { Forest } from '../../core/forest/forest';
import { predictEncoded } from '../../core/forest/predict';
import { targetCodes } from '../../core/forest/target';
import { findColumn } from '../../core/data/table';
import { RowVotes, type GroupAnswer } from '../../core/forest/row-votes';
import { flag, parse, UsageError, type Options } from '../args';
import { votesSizeProblem } from '../limits';
import { say, sayError } from '../terminal';
import { DEBUG_ENTRY, optionList } from '../help';
import { MODEL_ENTRIES, MODEL_OPTIONS, openForData } from '../model';
import { chooseRows, wantedRows } from '../rows';
import { boostedVotes } from './boosted-votes';
import { labelOf, membershipOfRows, roleName, trainingOf, type Role } from '../training';

export const VOTES_HELP = `Usage: copse votes MODEL DATA.csv --rows 1,7,12 [--json]

Shows how the trees of a saved forest (.json or .onnx) vote on chosen rows of DATA.csv.
Rows are counted from 1: the first row after the header is row 1.

For a boosted ensemble (an XGBoost .json model, or an ONNX ensemble that sums trees through a link) the trees
do not vote: each tree's own raw score on the row is shown with the running total from the base score
(log-odds for two classes, each class's raw score for several, the value for regression).

When DATA.csv is the file the forest was fitted on, a row it trained on is answered first by the trees that
never drew it (out-of-bag): the honest answer, since the other trees fitted that very row. The answer of all
the trees comes second.

Options:
${optionList([
  ['--rows LIST', 'comma-separated data row numbers (required)'],
  ['--json', 'print one JSON object'],
  ...MODEL_ENTRIES,
  DEBUG_ENTRY,
])}`;

const OPTIONS: Options = { rows: { type: 'string' }, json: { type: 'boolean' }, ...MODEL_OPTIONS };

/** One group of trees' answer, as the JSON gives it. */
interface GroupJson {
  prediction: string | number;
  probabilities?: Record<string, number>;
  counts?: Record<string, number>;
  agreement?: number;
  /** Regression: the standard deviation of the group's trees' values. */
  spread?: number;
  trees: number;
}

interface VoteRow {
  row: number;
  line: number;
  role: Role;
  label?: string | number;
  /** Which answer to read first: the out-of-bag trees' for a training row some tree left out, all trees' otherwise. */
  lead: 'out-of-bag' | 'all-trees';
  prediction: string | number;
  probabilities?: Record<string, number>;
  counts?: Record<string, number>;
  agreement?: number;
  spread?: number;
  /** Training rows: Breiman's margin over the out-of-bag votes. */
  margin?: number;
  outOfBag?: GroupJson;
  allTrees: GroupJson;
  /** Every tree's own vote (class or value), in tree order. */
  trees: Array<string | number>;
}

export async function runVotes(argv: string[]): Promise<void> {
  const args = parse('votes', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(VOTES_HELP);
  const wanted = wantedRows(args, 'votes');
  const [modelPath, dataPath] = args.positionals;
  const { forest, notes } = await openForData(modelPath, dataPath, args, 'votes');
  const tooMany = votesSizeProblem(wanted.length, forest.trees.length);
  if (tooMany) throw new UsageError(tooMany, 'votes');
  const chosen = await chooseRows(forest, dataPath, wanted, 'votes');
  if (forest.boosting) {
    // JSON keeps the data as it is; text for people goes through the terminal-safe printer.
    const text = boostedVotes(forest, chosen, [...notes, ...chosen.loaded.warnings], flag(args, 'json'));
    return void (flag(args, 'json') ? process.stdout.write(text) : say(text));
  }
  const { loaded, tableRows, x, encoded } = chosen;
  const table = loaded.table;
  const training = trainingOf(forest, loaded, encoded);
  // Membership is known over the whole table; the chosen rows look theirs up, and one walk over the trees
  // gives both the all-trees and the out-of-bag answers.
  const membership = training.view ? membershipOfRows(training.view.membership, tableRows) : undefined;
  const prediction = predictEncoded(forest, x, wanted.length, membership);
  const targetColumn = findColumn(table, forest.schema.target.name);
  const allTruth = targetCodes(forest, table);
  const truth = Float64Array.from(tableRows, (r) => allTruth[r]);
  const holdout = new Set(tableRows.flatMap((r, j) => (training.view?.holdout.has(r) ? [j] : [])));
  const votes = new RowVotes(forest.schema.target.task, forest.schema.target.classes ?? [], prediction, truth, membership, holdout);
  const rows = wanted.map((row, j): VoteRow => {
    const a = votes.answer(j);
    // The top-level keys keep their meaning for scripts written before out-of-bag answers: all the trees.
    // `lead` says which group to read first, and `outOfBag` is that group for a training row.
    const { trees: _allTrees, ...all } = group(forest, a.all);
    const trees = Array.from({ length: votes.trees }, (_, t) => votes.vote(t, j));
    const classes = forest.schema.target.classes;
    return {
      row,
      line: table.lineOfRow[tableRows[j]],
      role: roleName(a.role),
      label: labelOf(forest, targetColumn, tableRows[j]),
      lead: a.lead,
      ...all,
      margin: a.margin,
      outOfBag: a.oob ? group(forest, a.oob) : undefined,
      allTrees: group(forest, a.all),
      trees: classes ? trees.map((v) => classes[v]) : trees,
    };
  });
  const warnings = [...notes, ...loaded.warnings];
  if (training.unknown) warnings.push(`${dataPath} is the file the forest was fitted on, but which trees drew each row cannot be told for certain: ${training.unknown} Every row is answered by all trees.`);
  if (flag(args, 'json')) {
    const target = forest.schema.target;
    process.stdout.write(JSON.stringify({ task: target.task, target: target.name, trees: votes.trees, warnings, rows }, null, 2) + '\n');
    return;
  }
  for (const w of warnings) sayError(`Warning: ${w}\n`);
  say(rows.map((r) => rowText(r)).join(''));
}

function group(forest: Forest, g: GroupAnswer): GroupJson {
  const classes = forest.schema.target.classes;
  if (g.tally.kind === 'classification' && classes) {
    const counts = g.tally.counts;
    return {
      prediction: classes[g.predicted],
      probabilities: Object.fromEntries(classes.map((c, k) => [c, g.proba![k]])),
      counts: Object.fromEntries(classes.map((c, k) => [c, counts[k]])),
      agreement: g.agreement,
      trees: g.tally.trees,
    };
  }
  const tally = g.tally as Extract<GroupAnswer['tally'], { kind: 'regression' }>;
  return { prediction: g.predicted, spread: tally.sd, trees: tally.trees };
}

const shown = (v: string | number) => (typeof v === 'number' ? formatNumber(v) : `"${v}"`);

function groupText(g: GroupJson): string {
  if (g.counts && g.probabilities) {
    const p = g.probabilities[g.prediction as string];
    const counts = Object.entries(g.counts).map(([c, n]) => `${c} ${n}`).join(', ');
    return `${shown(g.prediction)} (probability ${p.toFixed(2)}); votes ${counts}; agreement ${((g.agreement ?? NaN) * 100).toFixed(0)}%`;
  }
  return `${shown(g.prediction)} (spread across the trees ${formatNumber(g.spread ?? NaN)})`;
}

function rowText(r: VoteRow): string {
  const role = r.role === 'training' ? ', a training row' : r.role === 'holdout' ? ', held out of training' : '';
  const label = r.label === undefined ? '' : `, labelled ${shown(r.label)}`;
  let out = `Row ${r.row} (line ${r.line})${role}${label}:\n`;
  const all = r.allTrees;
  if (r.outOfBag) {
    const fitted = all.trees - r.outOfBag.trees;
    out += `  out-of-bag, the ${r.outOfBag.trees} trees that never drew this row: ${groupText(r.outOfBag)}\n`;
    out += `  all ${all.trees} trees, including the ${fitted} fitted on this row: ${groupText(all)}\n`;
  } else {
    if (r.role === 'training') out += `  every tree drew this row, so no tree gives an out-of-bag answer\n`;
    out += `  all ${all.trees} trees: ${groupText(all)}\n`;
  }
  return out;
}
