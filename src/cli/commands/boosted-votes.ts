// `copse votes` on a boosted ensemble (an XGBoost model, a summed ONNX ensemble with a link): its trees do not
// vote; each adds a raw score to the margin of one output. So each chosen row shows every tree's own raw score
// and the running total from the base score, which the link turns into the prediction.
import { rawScoreName } from '../../core/forest/boosting';
import type { Forest } from '../../core/forest/forest';
import { predictEncoded } from '../../core/forest/predict';
import { treeOutputs } from '../../core/forest/tree-outputs';
import { findColumn } from '../../core/data/table';
import { sayError } from '../terminal';
import { labelOf } from '../training';
import type { ChosenRows } from '../rows';

interface TreeJson {
  tree: number;
  /** Classification: the class whose raw score the tree adds to. */
  class?: string;
  raw: number;
  /** The raw score of that output after this tree and every earlier one, base score included. */
  cumulative: number;
}

interface BoostedRow {
  row: number;
  line: number;
  label?: string | number;
  prediction: string | number;
  probabilities?: Record<string, number>;
  /** Raw score before any tree, and after all of them: per class, or the value. */
  base: number | Record<string, number>;
  rawScore: number | Record<string, number>;
  trees: TreeJson[];
}

export function boostedVotes(forest: Forest, chosen: ChosenRows, warnings: string[], json: boolean): string {
  const { wanted, tableRows, x, loaded } = chosen;
  const table = loaded.table;
  const target = forest.schema.target;
  const classes = target.classes;
  const K = classes?.length ?? 1;
  const p = forest.schema.features.length;
  const link = forest.boosting!.link;
  const scale = rawScoreName(link);
  const prediction = predictEncoded(forest, x, wanted.length);
  const column = findColumn(table, target.name);
  const perOutput = (a: Float64Array) => (classes ? Object.fromEntries(classes.map((c, k) => [c, a[k]])) : a[0]);
  const rows = wanted.map((row, j): BoostedRow => {
    const o = treeOutputs(forest, x, j * p);
    return {
      row,
      line: table.lineOfRow[tableRows[j]],
      label: labelOf(forest, column, tableRows[j]),
      prediction: classes ? classes[prediction.predicted[j]] : prediction.predicted[j],
      probabilities: classes ? Object.fromEntries(classes.map((c, k) => [c, prediction.proba![j * K + k]])) : undefined,
      base: perOutput(o.base),
      rawScore: perOutput(o.total),
      trees: Array.from(o.raw, (raw, t) => ({ tree: t + 1, class: classes && link === 'softmax' ? classes[o.output[t]] : undefined, raw, cumulative: o.cumulative[t] })),
    };
  });
  const notes = [
    ...warnings,
    `Boosted trees do not vote: each adds its raw score (${scale}) to a running total; agreement between trees and out-of-bag answers do not apply.`,
  ];
  if (json) {
    return JSON.stringify({ task: target.task, target: target.name, kind: 'boosted', link, scale, trees: forest.trees.length, warnings: notes, rows }, null, 2) + '\n';
  }
  for (const w of notes) sayError(`Warning: ${w}\n`);
  return rows.map((r) => rowText(r, scale, link === 'logistic' ? classes?.[1] : undefined)).join('\n');
}

const signed = (v: number) => (v >= 0 ? '+' : '') + v.toFixed(4);

function rowText(r: BoostedRow, scale: string, positive: string | undefined): string {
  const label = r.label === undefined ? '' : `, labelled ${typeof r.label === 'number' ? r.label : `"${r.label}"`}`;
  const head = r.probabilities
    ? `predicted "${r.prediction}" (probability ${r.probabilities[r.prediction as string].toFixed(3)})`
    : `predicted ${(r.prediction as number).toPrecision(6)}`;
  let out = `Row ${r.row} (line ${r.line})${label}: ${head}\n`;
  const of = positive ? ` of "${positive}"` : '';
  const base = typeof r.base === 'number' ? r.base : positive ? r.base[positive] : undefined;
  const total = typeof r.rawScore === 'number' ? r.rawScore : positive ? r.rawScore[positive] : undefined;
  if (base !== undefined && total !== undefined) out += `  ${r.trees.length} trees add raw scores (${scale}${of}): base ${signed(base)}, total ${signed(total)}\n`;
  else out += `  ${r.trees.length} trees each add a raw score (${scale}) to one class; totals ${Object.entries(r.rawScore as Record<string, number>).map(([c, v]) => `"${c}" ${signed(v)}`).join(', ')}\n`;
  const cells = [['tree', ...(r.trees.some((t) => t.class !== undefined) ? ['class'] : []), 'adds', 'running total']];
  for (const t of r.trees) cells.push([String(t.tree), ...(t.class !== undefined ? [t.class] : []), signed(t.raw), signed(t.cumulative)]);
  const widths = cells[0].map((_, c) => Math.max(...cells.map((row) => row[c].length)));
  out += cells.map((row) => '  ' + row.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ')).join('\n') + '\n';
  return out;
}
