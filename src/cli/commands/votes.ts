import { argmaxAt } from '../../core/metrics/scores';
import { predictEncoded } from '../../core/forest/predict';
import { flag, parse, type Options } from '../args';
import { MODEL_HELP, MODEL_OPTIONS, openForData } from '../model';
import { chooseRows, wantedRows } from '../rows';

export const VOTES_HELP = `Usage: copse votes MODEL DATA.csv --rows 1,7,12 [--json]

Shows how every tree of a saved forest (.json or .onnx) votes on chosen rows of DATA.csv.
Rows are counted from 1: the first row after the header is row 1.

Options:
  --rows LIST   comma-separated data row numbers (required)
  --json        print one JSON object
${MODEL_HELP}  --debug       show stack traces on errors
`;

const OPTIONS: Options = { rows: { type: 'string' }, json: { type: 'boolean' }, ...MODEL_OPTIONS };

interface VoteRow {
  row: number;
  line: number;
  prediction: string | number;
  probabilities?: Record<string, number>;
  counts?: Record<string, number>;
  agreement?: number;
  spread?: number;
  trees: Array<string | number>;
}

export async function runVotes(argv: string[]): Promise<void> {
  const args = parse('votes', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(VOTES_HELP);
  const wanted = wantedRows(args, 'votes');
  const [modelPath, dataPath] = args.positionals;
  const { forest, notes } = await openForData(modelPath, dataPath, args, 'votes');
  const { loaded, tableRows, x } = await chooseRows(forest, dataPath, wanted, 'votes');
  const table = loaded.table;
  const pred = predictEncoded(forest, x, wanted.length);
  const target = forest.schema.target;
  const T = forest.trees.length;
  const rows = wanted.map((r, j): VoteRow => {
    const treeVotes = Array.from({ length: T }, (_, t) => pred.votes[t * wanted.length + j]);
    const line = table.lineOfRow[tableRows[j]];
    if (target.task === 'classification') {
      const classes = target.classes!;
      const counts: Record<string, number> = Object.create(null);
      for (const c of classes) counts[c] = 0;
      for (const v of treeVotes) counts[classes[v]]++;
      const K = classes.length;
      return {
        row: r,
        line,
        prediction: classes[argmaxAt(pred.proba!, j * K, K)],
        probabilities: Object.fromEntries(classes.map((c, k) => [c, pred.proba![j * K + k]])),
        counts,
        agreement: pred.agreement![j],
        trees: treeVotes.map((v) => classes[v]),
      };
    }
    return { row: r, line, prediction: pred.predicted[j], spread: pred.spread![j], trees: treeVotes };
  });
  if (flag(args, 'json')) {
    process.stdout.write(JSON.stringify({ task: target.task, target: target.name, trees: T, warnings: notes, rows }, null, 2) + '\n');
    return;
  }
  for (const w of notes) process.stderr.write(`Warning: ${w}\n`);
  let out = '';
  for (const r of rows) {
    if (r.counts && r.agreement !== undefined) {
      const counts = Object.entries(r.counts).map(([c, n]) => `${c} ${n}`).join(', ');
      out += `Row ${r.row} (line ${r.line}): predicted "${r.prediction}"; ${T} trees voted ${counts}; agreement ${(r.agreement * 100).toFixed(0)}%\n`;
    } else {
      out += `Row ${r.row} (line ${r.line}): predicted ${Number(r.prediction).toPrecision(6)}; spread across ${T} trees ${Number(r.spread).toPrecision(4)}\n`;
    }
  }
  process.stdout.write(out);
}
