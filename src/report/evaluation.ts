// The report's evaluation pictures, after the scores they refine: for classes, how well the probabilities rank
// rows (ROC, precision-recall) and whether they can be read as probabilities (calibration); for a number,
// predicted against actual and how often the prediction interval held the truth. Curves, areas and coverage are
// the summary's own (core/metrics); this file only lays them out.
import { formatCount, formatFixed, formatNumber, formatShare } from '../core/format';
import type { ClassCurves } from '../core/metrics/evaluation';
import type { FitSummary, ScoresSummary } from '../core/summary/types';
import { CLASS_HEX } from '../protocol/palette';
import { esc } from './escape';
import { scatterChart, unitChart, type Curve } from './plots';
import { section } from './sections';
import { classHex, legend } from './svg';

interface Source {
  readonly id: 'oob' | 'test';
  /** As it reads inside a sentence. */
  readonly name: string;
  readonly scores: ScoresSummary;
}

function sources(s: FitSummary): Source[] {
  const out: Source[] = [];
  if (s.oob) out.push({ id: 'oob', name: 'out-of-bag', scores: s.oob });
  if (s.test) out.push({ id: 'test', name: s.testFrom === 'test' ? 'test file' : s.testFrom === 'file' ? 'this file' : 'held-out rows', scores: s.test });
  return out;
}

const area = (v: number) => formatFixed(v, 3);
const DIAGONAL = { points: [[0, 0], [1, 1]] as const };

export function evaluationSection(s: FitSummary): string {
  return s.task === 'classification' ? classSection(s) : regressionSection(s);
}

function classSection(s: FitSummary): string {
  const title = 'Ranking and calibration';
  const withCurves = sources(s).filter((x) => x.scores.curves?.byClass.length);
  if (!withCurves.length) return section('evaluation', title, '<p class="muted" data-unavailable="evaluation">No curves for this forest: they are drawn from out-of-bag or scored rows’ probabilities, and there are none here.</p>');
  const binary = s.classes.length === 2;
  const intro = binary
    ? `<p class="muted">Read for the class ${esc(withCurves[0].scores.positiveClass ?? s.classes[1])} against the other. The dashed lines are what guessing would give.</p>`
    : '<p class="muted">Each class against the rest, one line per class. The dashed lines are what guessing would give.</p>';
  return section('evaluation', title, intro + withCurves.map((x) => sourceFigures(s, x, binary)).join('\n'));
}

function colourOf(s: FitSummary, c: ClassCurves): string {
  return classHex(s.classes.indexOf(c.label));
}

function sourceFigures(s: FitSummary, x: Source, binary: boolean): string {
  const byClass = x.scores.curves!.byClass;
  const roc: Curve[] = byClass.map((c) => ({ name: c.label, colour: colourOf(s, c), points: c.roc.map((p) => [p.falsePositiveRate, p.truePositiveRate] as const) }));
  const pr: Curve[] = byClass.map((c) => ({ name: c.label, colour: colourOf(s, c), points: c.precisionRecall.map((p) => [p.recall, p.precision] as const) }));
  const key = (what: (c: ClassCurves) => number, short: string) => legend(byClass.map((c) => ({ name: `${c.label} (${short} ${area(what(c))})`, colour: colourOf(s, c) })));
  const rocCaption = binary ? `ROC curve, ${x.name}: area ${area(byClass[0].auc)}` : `ROC curves, ${x.name}: mean area ${area(x.scores.auc ?? NaN)}`;
  const prCaption = binary ? `Precision against recall, ${x.name}: average precision ${area(byClass[0].averagePrecision)}` : `Precision against recall, ${x.name}`;
  const baseRates = byClass.map((c) => ({ points: [[0, c.baseRate], [1, c.baseRate]] as const, colour: binary ? undefined : colourOf(s, c) }));
  const figs = [
    `<figure data-chart="roc" data-source="${x.id}"><figcaption>${esc(rocCaption)}</figcaption>${unitChart(roc, { label: rocCaption, xTitle: 'False positive rate', yTitle: 'True positive rate', references: [DIAGONAL], size: 240 })}${key((c) => c.auc, 'area')}<p class="muted">Higher and further left is better; the diagonal is a coin toss.</p></figure>`,
    `<figure data-chart="precision-recall" data-source="${x.id}"><figcaption>${esc(prCaption)}</figcaption>${unitChart(pr, { label: prCaption, xTitle: 'Recall', yTitle: 'Precision', references: baseRates, size: 240 })}${key((c) => c.averagePrecision, 'AP')}<p class="muted">The dashed line${binary ? ' is the class’s share of rows' : 's, in each class’s colour, are each class’s share of rows'}: what guessing would reach.</p></figure>`,
  ];
  const calibration = byClass
    .filter((c) => c.calibration.equalWidth.length)
    .map((c) => {
      const bins = c.calibration.equalWidth;
      const points = bins.filter((b) => b.rows > 0).map((b) => [b.meanPredicted, b.observed] as const);
      const caption = `Calibration of ${c.label}, ${x.name}`;
      const chart = unitChart([{ name: c.label, colour: colourOf(s, c), points }], { label: caption, xTitle: `Predicted P(${c.label})`, yTitle: 'Observed share', references: [DIAGONAL], histogram: bins, size: binary ? 240 : 200 });
      return `<figure data-chart="calibration" data-source="${x.id}"><figcaption>${esc(caption)}</figcaption>${chart}</figure>`;
    });
  const brier = x.scores.brier === undefined ? '' : ` Brier score ${formatFixed(x.scores.brier, 4)} (0 is best, ${binary ? 1 : 2} the worst).`;
  const calText = `<p class="muted">Calibration: rows grouped in ${calibration.length ? byClass[0].calibration.equalWidth.length : 0} equal bins of predicted probability; each dot is a bin’s mean prediction against the share of its rows that are of the class, and the bars under it count the rows per bin. Dots on the diagonal mean the probabilities can be read as they stand.${brier}</p>`;
  // Two classes fit one row of three pictures; more put their calibration pictures, one per class, on a row of their own.
  const rows = binary ? [[...figs, ...calibration]] : [figs, calibration];
  const heading = `<h3>${esc(x.name[0].toUpperCase() + x.name.slice(1))}</h3>`;
  return heading + rows.filter((r) => r.length).map((r) => `<div class="figures">${r.join('\n')}</div>`).join('\n') + (calibration.length ? calText : '');
}

function regressionSection(s: FitSummary): string {
  const title = 'Predicted against actual';
  const withPairs = sources(s).filter((x) => x.scores.diagnostics?.pairs.length);
  if (!withPairs.length) return section('evaluation', title, '<p class="muted" data-unavailable="evaluation">No predictions to set against the truth here: they come from out-of-bag or scored rows.</p>');
  const figs = withPairs.map((x) => {
    const d = x.scores.diagnostics!;
    const caption = `${x.name[0].toUpperCase() + x.name.slice(1)}: predicted against actual ${s.target}`;
    const chart = scatterChart(d.pairs, { label: caption, xTitle: `Actual ${s.target}`, yTitle: `Predicted ${s.target}`, colour: CLASS_HEX[0] });
    const shown = d.pairs.length < d.rows ? `${formatCount(d.pairs.length)} of ${formatCount(d.rows)} rows, evenly spaced in file order` : `all ${formatCount(d.rows)} rows`;
    const iv = d.interval;
    const coverage =
      iv && Number.isFinite(iv.coverage)
        ? ` <span data-coverage="${x.id}">The ${formatShare(iv.level, 0)} prediction interval held the true value for ${formatShare(iv.coverage)} of ${formatCount(iv.rows)} ${esc(x.name)} rows (mean width ${esc(formatNumber(iv.meanWidth))}); close to ${formatShare(iv.level, 0)} means the interval can be trusted at its word.</span>`
        : '';
    return `<figure data-chart="predicted-actual" data-source="${x.id}"><figcaption>${esc(caption)}</figcaption>${chart}<p class="muted">Dots: ${shown}. On the dashed diagonal the prediction equals the truth; dots above it are predicted too high.${coverage}</p></figure>`;
  });
  return section('evaluation', title, `<div class="figures">${figs.join('\n')}</div>`);
}
