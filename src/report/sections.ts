// The report's text sections: what was fitted, what is worth checking, the scores, the doubtful rows. Headings
// and wording follow the editor's panel, so a reader who knows one knows the other.
import { formatBytes, formatCount, formatFixed, formatHeadline, formatNumber, formatShare } from '../core/format';
import type { FitSummary, ScoresSummary } from '../core/summary/types';
import { esc } from './escape';
import type { ReportData } from './types';

const MODEL_KINDS = { onnx: 'imported ONNX tree ensemble', xgboost: 'imported XGBoost model', copse: 'saved Copse forest' } as const;

/** Classes shown in the confusion table; a target with more shows its largest ones. */
const CONFUSION_CLASSES = 12;
/** Doubtful rows listed; the count of all is always given. */
export const LISTED_ROWS = 25;

export function section(id: string, title: string, body: string): string {
  return `<section id="${id}" aria-labelledby="${id}-h"><h2 id="${id}-h">${esc(title)}</h2>\n${body}\n</section>\n`;
}

const fact = (term: string, value: string) => `<dt>${esc(term)}</dt><dd>${value}</dd>`;

const SETTING_NAMES: Record<string, string> = {
  trees: 'Trees',
  featuresPerSplit: 'Features tried per split',
  featuresTried: 'Features tried per split (resolved)',
  criterion: 'Split criterion',
  maxDepth: 'Deepest level',
  minSplit: 'Fewest rows to split a node',
  minLeaf: 'Fewest rows in a leaf',
  sampleFraction: 'Rows drawn per tree (share)',
  replace: 'Drawn with replacement',
  classWeight: 'Class weight',
  seed: 'Seed',
};

function settingText(v: unknown): string {
  if (v === undefined || v === null) return 'no limit';
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  return esc(typeof v === 'number' ? String(v) : typeof v === 'string' ? v : JSON.stringify(v));
}

export function fittedSection(d: ReportData): string {
  const s = d.summary;
  const taskText = s.task === 'classification' ? `classification into ${s.classes.length} classes` : 'regression';
  const size = d.file.bytes === null ? '' : `, ${esc(formatBytes(d.file.bytes))}`;
  const rows = s.rows ? `${formatCount(s.rows)} training rows` : 'training rows not known in this file';
  const scored = s.scoredRows ? `, ${formatCount(s.scoredRows)} scored ${s.testFrom === 'holdout' ? 'held out' : s.testFrom === 'test' ? 'from the test file' : 'from this file'}` : '';
  let facts = fact('Data file', `<span class="mono">${esc(d.file.name)}</span>${size}`);
  if (s.data.fingerprint) facts += fact('Fingerprint', `<span class="mono">${esc(s.data.fingerprint)}</span>`);
  if (d.model) facts += fact('Model', `<span class="mono">${esc(d.model.file)}</span> (${MODEL_KINDS[d.model.kind]})`);
  facts += fact('Predicting', `<strong>${esc(s.target)}</strong> (${taskText})`);
  facts += fact('Rows', `${rows}${scored}, of ${formatCount(s.data.rowsRead)} read${s.data.sampled ? ' (a random sample of the file)' : ''}`);
  // An import without Copse's record of its fit has no seed of its own; the default one would mislead.
  const seed = d.model && !s.rows && !s.oob ? 'seed not recorded in the model file' : `seed ${esc(String(s.settings.seed))}`;
  facts += fact('Forest', `${formatCount(s.trees)} trees, ${seed}`);
  facts += fact('Copse', esc(d.version));
  const settings = Object.entries(s.settings)
    .filter(([k]) => k !== 'trees' && k !== 'seed')
    .map(([k, v]) => `<tr><th scope="row">${esc(SETTING_NAMES[k] ?? k)}</th><td>${settingText(v)}</td></tr>`)
    .join('');
  const kinds = s.features.map((f, k) => `<li><span class="mono">${esc(f)}</span> <span class="muted">${esc(s.featureKinds[k])}</span></li>`).join('');
  const dropped = s.dropped.map((x) => `<li><span class="mono">${esc(x.name)}</span> <span class="muted">— ${esc(x.reason)}</span></li>`).join('');
  const notes = [...s.notes.map((x) => `Note: ${x}`), ...s.warnings.map((x) => `Warning: ${x}`)].map((x) => `<li>${esc(x)}</li>`).join('');
  return section(
    'fitted',
    'What was fitted',
    `<dl class="facts">${facts}</dl>\n` +
      (settings ? `<h3>Settings</h3><table class="settings">${settings}</table>\n` : '') +
      `<h3>Features used (${s.features.length})</h3><ul class="plain">${kinds}</ul>\n` +
      (s.dropped.length ? `<h3>Left out (${s.dropped.length})</h3><ul class="plain">${dropped}</ul>\n` : '') +
      (notes ? `<ul class="plain">${notes}</ul>` : ''),
  );
}

export function cautionsSection(s: FitSummary): string {
  const items = s.cautions.map((c) => `<li>${esc(c.message)}</li>`).join('');
  return section('cautions', 'Worth checking', items ? `<ul class="plain" data-cautions="${s.cautions.length}">${items}</ul>` : '<p class="muted">Nothing found to check about the data this fit learned from.</p>');
}

type Value = number | Readonly<Record<string, number>> | undefined;

/** A score per row of the table: its key in the scores (and in cv.mean / cv.sd) and how one number reads. */
function scoreRows(s: FitSummary): Array<[string, keyof ScoresSummary, (v: number) => string]> {
  if (s.task === 'classification') {
    return [
      ['Accuracy', 'accuracy', (v) => formatShare(v)],
      ['Balanced accuracy', 'balancedAccuracy', (v) => formatShare(v)],
      ['Log loss', 'logLoss', (v) => formatFixed(v, 3)],
      [s.classes.length > 2 ? 'ROC area (AUC, mean over classes)' : 'ROC area (AUC)', 'auc', (v) => formatFixed(v, 3)],
      ['Average precision', 'averagePrecision', (v) => formatFixed(v, 3)],
      ['Brier score', 'brier', (v) => formatFixed(v, 4)],
      ['Rows scored', 'rows', (v) => formatCount(v)],
    ];
  }
  return [
    ['R²', 'r2', (v) => formatFixed(v, 3)],
    ['Mean absolute error', 'mae', (v) => formatNumber(v)],
    ['Root mean squared error', 'rmse', (v) => formatNumber(v)],
    ['Rows scored', 'rows', (v) => formatCount(v)],
  ];
}

/** One number as it reads, or one per class (average precision of three or more classes), with an optional spread. */
function valueText(v: Value, format: (v: number) => string, sd?: Value): string {
  if (v === undefined) return 'n/a';
  const spread = (x: Value) => (typeof x === 'number' ? ` ± ${esc(format(x))}` : '');
  if (typeof v === 'number') return `${esc(format(v))}${spread(sd)}`;
  const by = (x: Value, k: string) => (x && typeof x === 'object' ? x[k] : undefined);
  return Object.keys(v)
    .map((k) => `<span class="per-class">${esc(k)} ${esc(format(v[k]))}${spread(by(sd, k))}</span>`)
    .join(' ');
}

interface Column {
  readonly title: string;
  readonly id: string;
  readonly get: (key: keyof ScoresSummary) => Value;
  readonly sd?: (key: keyof ScoresSummary) => Value;
}

export function scoresSection(s: FitSummary): string {
  const of = (x: ScoresSummary | null | undefined) => (key: keyof ScoresSummary) => (x ? (x[key] as Value) : undefined);
  const cols: Column[] = [{ title: 'Out-of-bag', id: 'oob', get: of(s.oob) }];
  if (s.test) cols.push({ title: s.testFrom === 'test' ? 'Test file' : s.testFrom === 'file' ? 'This file' : 'Held-out rows', id: 'test', get: of(s.test) });
  const cv = s.cv;
  if (cv) {
    const times = cv.repeats > 1 ? ` × ${cv.repeats}` : '';
    cols.push({ title: `Cross-validation (${cv.foldCount} folds${times}, mean ± sd)`, id: 'cv', get: (k) => cv.mean[k], sd: (k) => cv.sd[k] });
  }
  const head = `<tr><th></th>${cols.map((c) => `<th scope="col" class="num">${esc(c.title)}</th>`).join('')}</tr>`;
  const body = scoreRows(s)
    .filter(([, key]) => key === 'rows' || cols.some((c) => c.get(key) !== undefined))
    .map(([name, key, format], i) => {
      const cells = cols.map((c) => {
        if (key === 'rows' && c.id === 'cv' && cv) return `<td class="num">${cv.folds.length} folds</td>`;
        const v = c.get(key);
        // The exact figure rides along, so a test can hold the report to the summary's own number.
        const exact = typeof v === 'number' ? ` data-of="${c.id}" data-key="${key}" data-value="${esc(String(v))}"` : '';
        if (i > 0 || typeof v !== 'number') return `<td class="num"${exact}>${valueText(v, format, c.sd?.(key))}</td>`;
        const sd = c.sd?.(key);
        const spread = typeof sd === 'number' ? ` ± ${esc(format(sd))}` : '';
        return `<td class="num"><span class="headline" data-score="${c.id}" data-value="${esc(String(v))}">${esc(formatHeadline(s.task, v))}</span>${spread}</td>`;
      });
      return `<tr><th scope="row">${name}</th>${cells.join('')}</tr>`;
    })
    .join('');
  let out = `<table class="scores"><thead>${head}</thead><tbody>${body}</tbody></table>\n`;
  if (!s.oob) out += `<p class="muted" data-unavailable="oob">${esc(s.oobUnavailable ?? 'No out-of-bag score: every row was in every tree’s sample.')}</p>\n`;
  if (cv) out += `<p class="muted" data-cv="${cv.foldCount}">Cross-validation: ${cv.foldCount} forests, each fitted with the same settings on all but one ${cv.stratified ? 'class-balanced ' : ''}fold and scored on that fold${cv.repeats > 1 ? `, repeated ${cv.repeats} times with other folds` : ''}; the spread is the standard deviation over the ${cv.folds.length} folds.</p>\n`;
  if (s.task === 'classification' && s.classes.length === 2 && (s.oob ?? s.test)?.positiveClass) out += `<p class="muted">ROC area, average precision and Brier score are read for the class ${esc((s.oob ?? s.test)!.positiveClass!)}.</p>\n`;
  const which = s.oob ?? s.test;
  const whichName = s.oob ? 'out-of-bag' : s.testFrom === 'test' ? 'test file' : 'held-out';
  if (which?.confusion) out += confusion(which.confusion, whichName);
  if (which?.residuals) out += residuals(which.residuals, whichName, s.target);
  return section('scores', 'Fit at a glance', out);
}

function confusion(c: NonNullable<ScoresSummary['confusion']>, which: string): string {
  const K = c.labels.length;
  const support = c.counts.map((r) => r.reduce((a, b) => a + b, 0));
  const all = c.labels.map((_, k) => k);
  const kept = K <= CONFUSION_CLASSES ? all : [...all].sort((a, b) => support[b] - support[a] || a - b).slice(0, CONFUSION_CLASSES).sort((a, b) => a - b);
  const capped = kept.length < K;
  const keep = new Set(kept);
  const most = Math.max(1, ...c.counts.flat());
  const cell = (v: number, diagonal: boolean) => `<td class="num" style="background:rgba(${diagonal ? '42,93,176' : '200,90,40'},${(0.08 + 0.45 * (v / most)).toFixed(3)})">${v}</td>`;
  const head = `<tr><th>true \\ predicted</th>${kept.map((k) => `<th class="num">${esc(c.labels[k])}</th>`).join('')}${capped ? '<th class="num">other</th>' : ''}</tr>`;
  const rows = kept
    .map((i) => {
      const other = c.counts[i].reduce((a, v, k) => a + (keep.has(k) ? 0 : v), 0);
      return `<tr><th scope="row">${esc(c.labels[i])}</th>${kept.map((k) => cell(c.counts[i][k], i === k)).join('')}${capped ? `<td class="num">${other}</td>` : ''}</tr>`;
    })
    .join('');
  const note = capped ? ` The ${CONFUSION_CLASSES} classes with the most rows of ${K}; “other” counts predictions of the rest.` : '';
  return `<h3>Confusion (${which}: rows are the true class, columns the prediction)</h3><p class="muted">${note}</p><table class="confusion">${head}${rows}</table>\n`;
}

function residuals(r: NonNullable<ScoresSummary['residuals']>, which: string, target: string): string {
  const cells = [r.min, r.q1, r.median, r.q3, r.max].map((v) => `<td class="num">${esc(formatNumber(v))}</td>`).join('');
  return `<h3>Residuals (${which}: ${esc(target)} minus the prediction)</h3><table class="residuals"><tr><th>smallest</th><th>lower quartile</th><th>median</th><th>upper quartile</th><th>largest</th></tr><tr>${cells}</tr></table>\n`;
}

export function suspectsSection(s: FitSummary): string {
  const classification = s.task === 'classification';
  if (s.suspectCount === null) return section('suspects', 'Rows the forest doubts', '<p class="muted">Not known for this forest: it takes the votes of the trees that never saw each row.</p>');
  if (s.suspectCount === 0) {
    const text = classification
      ? 'None: for every training row, the trees that did not see it voted mostly for its own label.'
      : 'None: every training row lies within 3.5 robust standard deviations of what the trees that never saw it predict.';
    return section('suspects', 'Rows the forest doubts', `<p class="muted" data-suspects="0">${text}</p>`);
  }
  const shown = s.suspects.slice(0, LISTED_ROWS);
  const what = classification ? 'a negative out-of-bag margin: the trees that never saw the row voted more for another class than for its label' : 'an out-of-bag residual beyond 3.5 robust standard deviations';
  const head = `<tr><th class="num">Row</th><th class="num">Line</th><th>Labelled</th><th>${classification ? 'Out-of-bag vote' : 'Out-of-bag prediction'}</th><th class="num">${classification ? 'Margin' : 'z'}</th></tr>`;
  const cell = (v: string | number) => esc(classification ? String(v) : formatNumber(Number(v)));
  const rows = shown
    .map((r) => `<tr><td class="num">${r.row}</td><td class="num">${r.line}</td><td>${cell(r.label)}</td><td>${cell(r.oobPredicted)}</td><td class="num">${esc(formatFixed(classification ? r.margin : r.zScore, classification ? 2 : 1))}</td></tr>`)
    .join('');
  const count = shown.length < s.suspectCount ? `the first ${shown.length} of ${formatCount(s.suspectCount)} in all` : `all ${formatCount(s.suspectCount)}`;
  return section(
    'suspects',
    'Rows the forest doubts',
    `<p data-suspects="${s.suspectCount}">Rows with ${what}: ${count}, most doubtful first. Line numbers count the file’s lines, header included.</p><table class="suspects">${head}${rows}</table>`,
  );
}
