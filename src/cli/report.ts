// The readable report of `copse fit`: what a practitioner checks first, in that order.
import type { FitSummary, ScoresSummary } from '../core/summary/types';

export const CAUTION =
  'A quick forest is an exploratory model: validate it before any decision that affects people, and follow local rules and qualified review where health, money or safety are at stake.';

const pct = (v: number | undefined) => (v === undefined || Number.isNaN(v) ? 'n/a' : `${(v * 100).toFixed(1)}%`);
const num = (v: number | undefined, d = 3) => (v === undefined || Number.isNaN(v) ? 'n/a' : v.toFixed(d));

export function scoreLine(s: ScoresSummary): string {
  if (s.r2 !== undefined) return `R² ${num(s.r2)}  MAE ${num(s.mae, 4)}  RMSE ${num(s.rmse, 4)}  (${s.rows} rows)`;
  return `accuracy ${pct(s.accuracy)}  balanced accuracy ${pct(s.balancedAccuracy)}  log loss ${num(s.logLoss)}  (${s.rows} rows)`;
}

function table(rows: string[][]): string {
  const widths = rows[0].map((_, j) => Math.max(...rows.map((r) => r[j].length)));
  return rows.map((r) => '  ' + r.map((c, j) => (j === 0 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ')).join('\n') + '\n';
}

export function fitReport(s: FitSummary, seconds: { load: number; fit: number }, savedTo?: string): string {
  let out = `Fitted ${s.trees} trees on ${s.rows} rows: ${s.task} of "${s.target}" from ${s.features.length} features ` +
    `(load ${seconds.load.toFixed(2)} s, fit ${seconds.fit.toFixed(2)} s, seed ${s.settings.seed}).\n`;
  if (s.dropped.length) out += `Left out:\n${s.dropped.map((d) => `  ${d.name}: ${d.reason}`).join('\n')}\n`;
  for (const n of s.notes) out += `Note: ${n}\n`;
  for (const w of s.warnings) out += `Warning: ${w}\n`;
  if (s.cautions.length) out += `\nCautions:\n${s.cautions.map((c) => `  ${c.message}`).join('\n')}\n`;
  out += s.oob ? `\nOut-of-bag  ${scoreLine(s.oob)}\n` : `\nOut-of-bag  n/a: ${s.oobUnavailable ?? 'not computed'}\n`;
  if (s.test) out += `Held out    ${scoreLine(s.test)}\n`;
  const c = s.oob?.confusion;
  if (c) {
    out += '\nOut-of-bag confusion (rows: true class, columns: predicted)\n';
    out += table([['', ...c.labels], ...c.counts.map((r, i) => [c.labels[i], ...r.map(String)])]);
  }
  const imp = Object.keys(s.importance.impurity).sort((a, b) => (s.importance.permutation[b] ?? 0) - (s.importance.permutation[a] ?? 0));
  out += '\nImportance (permutation: rise in out-of-bag error when the column is shuffled)\n';
  out += table([
    ['feature', 'impurity', 'permutation', '± spread'],
    ...imp.map((f) => [f, num(s.importance.impurity[f]), num(s.importance.permutation[f], 4), num(s.importance.permutationSpread[f], 4)]),
  ]);
  const marks = [1, 10, 25, 50, 100, 200, 500, 1000].filter((t) => t < s.curve.length).concat([s.curve.length]);
  out += `\nOut-of-bag error as trees are added: ${marks.map((t) => `${t}: ${num(s.curve[t - 1], 4)}`).join('  ')}\n`;
  out += suspectLines(s);
  if (savedTo) out += `\nSaved the forest to ${savedTo}.\n`;
  out += `\n${CAUTION}\n`;
  return out;
}

function suspectLines(s: FitSummary): string {
  if (s.suspectCount === null) return '';
  const classification = s.task === 'classification';
  if (!s.suspectCount) {
    return classification ? '\nNo row has a negative out-of-bag margin.\n' : '\nNo row is far from what the trees that never saw it predict.\n';
  }
  const what = classification ? 'negative out-of-bag margin' : 'out-of-bag residual beyond 3.5 robust standard deviations';
  const shown = s.suspects.slice(0, 10);
  const line = (r: FitSummary['suspects'][number]): string =>
    classification
      ? `  row ${r.row} (line ${r.line}): labelled "${r.label}", out-of-bag vote "${r.oobPredicted}", margin ${num(r.margin, 2)}`
      : `  row ${r.row} (line ${r.line}): labelled ${num(Number(r.label), 4)}, out-of-bag prediction ${num(Number(r.oobPredicted), 4)}, z ${num(r.zScore, 1)}`;
  return `\nRows the forest doubts (${what}): ${shown.length} of ${s.suspectCount}:\n${shown.map(line).join('\n')}\n`;
}
