// One self-contained HTML file from a report's data (types.ts): no script, no request of any kind (the
// Content-Security-Policy says so to the browser too), pictures inline as SVG with PNG data for the region grids.
// Every string from the data passes through esc(). The only line that changes between two runs of the same fit
// is the date line, which stands alone so a diff or a test can set it aside.
import { formatCount, formatFixed, formatNumber } from '../core/format';
import type { FitSummary } from '../core/summary/types';
import { CLASS_HEX } from '../protocol/palette';
import { esc } from './escape';
import { evaluationSection } from './evaluation';
import { mapSvg, rampStrip } from './maps';
import { cautionsSection, fittedSection, scoresSection, section, suspectsSection } from './sections';
import { STYLE } from './style';
import { barChart, classHex, legend, lineChart, type Bar } from './svg';
import type { ReportData, ReportMap } from './types';

export const CAUTION =
  'A quick forest is an exploratory model: validate it before any decision that affects people, and follow local rules and qualified review where health, money or safety are at stake.';

/** Only what the file itself holds: its own style element and attributes, and images written as data. */
export const CSP = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'";

/** Features shown in each importance chart. */
const IMPORTANCE_FEATURES = 15;

/** Marks the date line: `sameReport` in tests sets exactly this line aside. */
export const DATE_LINE = /^<p class="date".*<\/p>$/m;

export function renderReport(d: ReportData): string {
  const s = d.summary;
  const title = `Copse report: ${s.target} from ${d.file.name}`;
  const parts = [
    fittedSection(d),
    cautionsSection(s),
    scoresSection(s),
    evaluationSection(s),
    curveSection(s),
    importanceSection(d),
    mapsSection(d),
    dependenceSection(d),
    suspectsSection(s),
  ];
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${CSP}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    '<meta name="color-scheme" content="light dark">',
    `<title>${esc(title)}</title>`,
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    '<main>',
    `<header><h1>${esc(title)}</h1>`,
    `<p class="date">Written ${esc(d.date)} by Copse ${esc(d.version)}</p>`,
    '</header>',
    `<p class="caution" role="note">${esc(CAUTION)}</p>`,
    ...parts,
    `<p class="caution" role="note" id="closing-caution">${esc(CAUTION)}</p>`,
    `<footer>Written by Copse ${esc(d.version)}. Same data, settings and seed give the same report, apart from the date.</footer>`,
    '</main>',
    '</body>',
    '</html>',
    '',
  ].join('\n');
}

function errorName(s: FitSummary): string {
  return s.task === 'classification' ? 'Out-of-bag error (share misclassified)' : `Out-of-bag mean squared error (${s.target}²)`;
}

function curveSection(s: FitSummary): string {
  const title = 'Out-of-bag error as trees are added';
  if (!s.curve.length) {
    const why = s.oob ? 'Not known for this forest: the curve is worked out while a forest is fitted, and a saved forest does not keep it.' : (s.oobUnavailable ?? 'Not known for this forest.');
    return section('curve', title, `<p class="muted" data-unavailable="curve">${esc(why)}</p>`);
  }
  const at = s.curve.map((_, i) => i + 1);
  const yTitle = s.task === 'classification' ? 'Error' : 'Mean squared error';
  const chart = lineChart([{ name: errorName(s), colour: CLASS_HEX[0], values: [...s.curve] }], { label: title, xTitle: 'Trees', yTitle, at, width: 520, height: 240, fromZero: true });
  const last = s.curve[s.curve.length - 1];
  const text = s.task === 'classification' ? formatFixed(last, 4) : formatNumber(last);
  return section('curve', title, `<figure data-chart="curve"><figcaption>${esc(errorName(s))}</figcaption>${chart}<p class="muted">With all ${s.curve.length} trees: ${esc(text)}. A curve still falling at the right would gain from more trees.</p></figure>`);
}

function importanceSection(d: ReportData): string {
  const s = d.summary;
  const imp = s.importance;
  const hasPerm = Object.keys(imp.permutation).length > 0;
  const score = (f: string) => (hasPerm ? (imp.permutation[f] ?? -Infinity) : (imp.impurity[f] ?? -Infinity));
  const order = [...s.features].sort((a, b) => score(b) - score(a) || s.features.indexOf(a) - s.features.indexOf(b)).slice(0, IMPORTANCE_FEATURES);
  const bars = (get: (f: string) => number | undefined, spread?: (f: string) => number | undefined): Bar[] => order.map((f) => ({ label: f, value: get(f) ?? NaN, spread: spread?.(f) }));
  const figs: string[] = [];
  figs.push(`<figure data-chart="importance-impurity"><figcaption>Impurity decrease (share of total)</figcaption>${barChart(bars((f) => imp.impurity[f]), 'Impurity decrease per feature', (v) => formatFixed(v, 3))}</figure>`);
  if (hasPerm) {
    const on = imp.permutationOn === 'file' ? 'on this file' : 'out-of-bag';
    const caption = s.task === 'classification' ? `Drop in accuracy ${on} when shuffled, in percentage points (± spread)` : `Rise in mean squared error ${on} when shuffled, in ${s.target}² (± spread)`;
    const pp = (v: number) => (s.task === 'classification' ? formatFixed(v * 100, 2) : formatNumber(v));
    figs.push(`<figure data-chart="importance-permutation"><figcaption>${esc(caption)}</figcaption>${barChart(bars((f) => imp.permutation[f], (f) => imp.permutationSpread[f]), 'Permutation drop per feature', pp)}</figure>`);
  } else {
    figs.push(`<figure><figcaption>Permutation drop</figcaption><p class="muted">${esc(imp.permutationMissing ?? 'Not measured for this fit.')}</p></figure>`);
  }
  const c = d.contributions;
  if (c) {
    figs.push(`<figure data-chart="importance-contributions"><figcaption>Mean |contribution| over ${c.rows} sampled rows</figcaption>${barChart(bars((f) => c.byFeature[f]), 'Mean absolute contribution per feature')}</figure>`);
  } else {
    figs.push(`<figure><figcaption>Mean |contribution|</figcaption><p class="muted">${esc(d.contributionsMissing ?? 'Not worked out.')}</p></figure>`);
  }
  const cut = s.features.length > IMPORTANCE_FEATURES ? `<p class="muted">The ${IMPORTANCE_FEATURES} leading features of ${s.features.length}, in one order.</p>` : '';
  const why =
    '<p class="muted">Why the three can disagree: impurity decrease favours features with many distinct values or levels, because they offer more split points and so win splits by chance more often (Strobl, Boulesteix, Zeileis &amp; Hothorn 2007, “Bias in random forest variable importance measures”, BMC Bioinformatics 8:25, cited from memory). Permutation drop asks what is lost when a feature’s values are shuffled on rows the trees did not see. Mean |contribution| measures how far each feature moves this forest’s output, row by row.</p>';
  return section('importance', 'What the forest leans on', `${cut}<div class="figures">${figs.join('\n')}</div>${why}`);
}

function mapLegend(d: ReportData, range?: { lo: number; hi: number }): string {
  const s = d.summary;
  if (s.task === 'classification') return legend(s.classes.map((name, k) => ({ name, colour: classHex(k) })));
  if (!range) return '';
  return `<p class="legend-ramp">${esc(s.target)}: ${esc(formatNumber(range.lo))}<img class="ramp" alt="colour scale" src="${rampStrip()}">${esc(formatNumber(range.hi))}</p>`;
}

function mapsSection(d: ReportData): string {
  if (!d.chosen) return section('maps', 'Decision regions', `<p class="muted">${esc(d.mapNote ?? 'No map.')}</p>`);
  const big = mapSvg(d.chosen, d.summary.classes, 380);
  const pts = d.chosen.points;
  const sample = pts ? `Dots: ${pts.x.length === pts.total ? `all ${formatCount(pts.total)}` : `a random sample of ${formatCount(pts.x.length)} of ${formatCount(pts.total)}`} training rows, coloured by their label.` : '';
  const strength = d.summary.task === 'classification' ? ' Deeper tint: a larger share of the vote.' : '';
  const main = `<figure data-chart="region-map">${big.svg}${mapLegend(d, big.range)}<p class="muted">Each cell is the forest’s answer with ${esc(d.chosen.x.feature)} and ${esc(d.chosen.y.feature)} set to the cell’s values and ${heldText(d.chosen)}.${strength} ${sample}</p></figure>`;
  const small = d.pairs
    .map((m) => `<figure data-chart="pair-map">${mapSvg(m, d.summary.classes, 150, true).svg}<figcaption>${esc(m.x.feature)} (across) × ${esc(m.y.feature)} (up)</figcaption></figure>`)
    .join('\n');
  const pairs = small ? section('pairs', 'Leading feature pairs', `<p class="muted">Pairs among the ${Math.min(4, d.summary.features.length)} features the forest leans on most, the others held as above; colours as in the large map${d.summary.task === 'regression' ? ', each map on its own scale' : ''}.</p><div class="small-maps">${small}</div>`) : '';
  return section('maps', 'Decision regions', main) + pairs;
}

function heldText(m: ReportMap): string {
  if (!m.heldAt.length) return 'no other feature';
  const shown = m.heldAt.slice(0, 8).map((h) => `${esc(h.feature)} = ${esc(h.value)}`).join(', ');
  const more = m.heldAt.length > 8 ? ` and ${m.heldAt.length - 8} more at their median or most frequent level` : '';
  return `the other features held at a typical row (medians, most frequent levels): ${shown}${more}`;
}

function dependenceSection(d: ReportData): string {
  const title = 'How the prediction moves with one feature';
  if (!d.dependence.length) return section('dependence', title, '<p class="muted">No feature to show.</p>');
  const s = d.summary;
  const figs = d.dependence.map((p) => {
    const lines = p.lines.map((l) => ({ name: l.name, colour: s.task === 'classification' ? classHex(l.colour) : CLASS_HEX[0], values: l.values }));
    const yTitle = s.task === 'classification' ? (p.lines.length === 1 ? `P(${p.lines[0].name})` : 'Mean probability') : `Mean prediction of ${s.target}`;
    const chart = lineChart(lines, { label: `Partial dependence on ${p.feature}`, xTitle: p.feature, yTitle, at: p.at });
    const key = s.task === 'classification' && p.lines.length > 1 ? legend(p.lines.map((l) => ({ name: l.name, colour: classHex(l.colour) }))) : '';
    return `<figure data-chart="dependence"><figcaption>${esc(p.feature)}</figcaption>${chart}${key}</figure>`;
  });
  const rows = d.dependence[0].rows;
  return section(
    'dependence',
    title,
    `<p class="muted">Partial dependence: the forest’s mean answer over ${rows} sampled rows, each with the feature set to the value on the axis and its other values kept. For the features the forest leans on most.</p><div class="figures">${figs.join('\n')}</div>`,
  );
}
