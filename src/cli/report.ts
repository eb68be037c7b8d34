// The readable report of `copse fit`: what a practitioner checks first, in that order. Regression values are
// rounded for reading here; the JSON keeps every digit.
import { formatFixed, formatNumber, formatShare } from '../core/format';
import { visibleValue } from '../core/visible';
import type { FitSummary, ScoresSummary } from '../core/summary/types';
import { crossValidationLines, evaluationLine, thresholdLines } from './report-evaluation';

export const CAUTION =
  'A quick forest is an exploratory model: validate it before any decision that affects people, and follow local rules and qualified review where health, money or safety are at stake.';

/** Classes shown in the confusion table; a target with more shows its largest ones. */
export const CONFUSION_CLASSES = 12;
/** Doubtful rows listed unless the user asks for more. */
export const LISTED_ROWS = 10;

// Numbers are written by core's one formatter, as the editor writes them.
const pct = (v: number | undefined) => formatShare(v);
const num = (v: number | undefined, d = 3) => formatFixed(v, d);
/** A regression value (a target, a prediction, an error in the target's units) as people read it. */
export const value = (v: number | undefined): string => (v === undefined ? 'n/a' : formatNumber(v));

export function scoreLine(s: ScoresSummary): string {
  if (s.r2 !== undefined) return `R² ${num(s.r2)}  MAE ${value(s.mae)}  RMSE ${value(s.rmse)}  (${s.rows} rows)`;
  return `accuracy ${pct(s.accuracy)}  balanced accuracy ${pct(s.balancedAccuracy)}  log loss ${num(s.logLoss)}  (${s.rows} rows)`;
}

/** The largest of a list of any length (Math.max(...list) passes each entry as an argument and overflows the stack on long ones). */
export function largest(values: Iterable<number>): number {
  let m = -Infinity;
  for (const v of values) if (v > m) m = v;
  return m;
}

export function table(cells: string[][]): string {
  // One value per cell: a line break or tab from the data would break the columns.
  const rows = cells.map((r) => r.map(visibleValue));
  const widths = rows[0].map((_, j) => largest(rows.map((r) => r[j].length)));
  return rows.map((r) => '  ' + r.map((c, j) => (j === 0 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ')).join('\n') + '\n';
}

/** "10 of 261" when a list is cut, the count alone when it is not. */
export function shownOf(shown: number, total: number): string {
  return shown < total ? `${shown} of ${total}` : `${total}`;
}

export interface ReportOptions {
  /** Doubtful rows to list (default LISTED_ROWS). */
  readonly list?: number;
}

export function fitReport(s: FitSummary, seconds: { load: number; fit: number }, savedTo?: string, options: ReportOptions = {}): string {
  let out = `Fitted ${s.trees} trees on ${s.rows} rows: ${s.task} of "${s.target}" from ${s.features.length} features ` +
    `(load ${seconds.load.toFixed(2)} s, fit ${seconds.fit.toFixed(2)} s, seed ${s.settings.seed}).\n`;
  if (s.dropped.length) out += `Left out:\n${s.dropped.map((d) => `  ${d.name}: ${d.reason}`).join('\n')}\n`;
  for (const n of s.notes) out += `Note: ${n}\n`;
  for (const w of s.warnings) out += `Warning: ${w}\n`;
  if (s.cautions.length) out += `\nCautions:\n${s.cautions.map((c) => `  ${c.message}`).join('\n')}\n`;
  out += s.oob ? `\nOut-of-bag  ${scoreLine(s.oob)}\n${evaluationLine(s.oob)}` : `\nOut-of-bag  n/a: ${s.oobUnavailable ?? 'not computed'}\n`;
  if (s.test) out += `Held out    ${scoreLine(s.test)}\n${evaluationLine(s.test)}`;
  out += crossValidationLines(s.cv, s.task);
  const c = s.oob?.confusion;
  if (c) out += confusionTable(c.labels, c.counts);
  out += thresholdLines(s);
  const regression = s.task === 'regression';
  const imp = Object.keys(s.importance.impurity).sort((a, b) => (s.importance.permutation[b] ?? 0) - (s.importance.permutation[a] ?? 0));
  const rise = (v: number | undefined) => (regression ? value(v) : num(v, 4));
  out += `\nImportance (permutation: rise in out-of-bag ${regression ? `mean squared error, in ${s.target}²,` : 'error (share of rows misclassified)'} when the column is shuffled)\n`;
  out += table([
    ['feature', 'impurity', 'permutation', '± spread'],
    ...imp.map((f) => [f, num(s.importance.impurity[f]), rise(s.importance.permutation[f]), rise(s.importance.permutationSpread[f])]),
  ]);
  const marks = [1, 10, 25, 50, 100, 200, 500, 1000].filter((t) => t < s.curve.length).concat([s.curve.length]);
  if (s.curve.length) out += `\nOut-of-bag ${regression ? 'mean squared error' : 'error'} as trees are added: ${marks.map((t) => `${t}: ${rise(s.curve[t - 1])}`).join('  ')}\n`;
  out += suspectLines(s, options.list ?? LISTED_ROWS);
  if (savedTo) out += `\nSaved the forest to ${savedTo}.\n`;
  out += `\n${CAUTION}\n`;
  return out;
}

/** The confusion table over the largest classes; predictions of the classes left out go to an "other" column. */
export function confusionTable(labels: readonly string[], counts: readonly (readonly number[])[], limit = CONFUSION_CLASSES): string {
  const K = labels.length;
  const support = counts.map((r) => r.reduce((a, b) => a + b, 0));
  const kept = K <= limit ? labels.map((_, k) => k) : labels.map((_, k) => k).sort((a, b) => support[b] - support[a] || a - b).slice(0, limit).sort((a, b) => a - b);
  const capped = kept.length < K;
  const keptSet = new Set(kept);
  let out = `\nOut-of-bag confusion (rows: true class, columns: predicted)`;
  if (capped) {
    const leftRows = support.reduce((a, n, k) => a + (keptSet.has(k) ? 0 : n), 0);
    out += `: the ${shownOf(limit, K)} classes with the most rows; the other ${K - limit} (${leftRows} rows) are left out, and "other" counts predictions of them`;
  }
  out += '\n';
  const head = ['', ...kept.map((k) => labels[k]), ...(capped ? ['other'] : [])];
  const body = kept.map((i) => {
    const row = counts[i];
    const other = row.reduce((a, n, k) => a + (keptSet.has(k) ? 0 : n), 0);
    return [labels[i], ...kept.map((k) => String(row[k])), ...(capped ? [String(other)] : [])];
  });
  return out + table([head, ...body]);
}

function suspectLines(s: FitSummary, limit: number): string {
  if (s.suspectCount === null) return '';
  const classification = s.task === 'classification';
  if (!s.suspectCount) {
    return classification ? '\nNo row has a negative out-of-bag margin.\n' : '\nNo row is far from what the trees that never saw it predict.\n';
  }
  const what = classification ? 'negative out-of-bag margin' : 'out-of-bag residual beyond 3.5 robust standard deviations';
  const shown = s.suspects.slice(0, limit);
  const line = (r: FitSummary['suspects'][number]): string =>
    classification
      ? `  row ${r.row} (line ${r.line}): labelled "${r.label}", out-of-bag vote "${r.oobPredicted}", margin ${num(r.margin, 2)}`
      : `  row ${r.row} (line ${r.line}): labelled ${value(Number(r.label))}, out-of-bag prediction ${value(Number(r.oobPredicted))}, z ${num(r.zScore, 1)}`;
  const more = shown.length < s.suspectCount ? ` (--list N shows more)` : '';
  const howMany = shown.length < s.suspectCount ? shownOf(shown.length, s.suspectCount) : `all ${s.suspectCount}`;
  return `\nRows the forest doubts (${what}): ${howMany}${more}:\n${shown.map(line).join('\n')}\n`;
}
