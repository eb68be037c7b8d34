// How well the forest ranks rows and how far its probabilities can be read as probabilities: ROC and
// precision-recall curves with their areas, and the calibration curve against the diagonal with a histogram
// of the probabilities under it. Every number is core's (protocol/evaluation.ts); this only draws them.
// Two classes: the positive class's curves in the focus colour. More: one curve per class, in its class colour.
import type { ClassCurvesView, EvaluationView, FitSummary } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { append, clear, custom, h } from '../dom';
import { count, fixed, percent } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';
import { ThresholdView } from './threshold';

type SelectEl = HTMLElement & { value: string };
type Rows = 'oob' | 'held';

export class RankingView {
  readonly root: HTMLElement;
  private readonly rowsSel: SelectEl;
  private readonly binsSel: SelectEl;
  private readonly classSel: SelectEl;
  private readonly classField: HTMLElement;
  private readonly roc: HTMLCanvasElement;
  private readonly pr: HTMLCanvasElement;
  private readonly calibration: HTMLCanvasElement;
  private readonly histogram: HTMLCanvasElement;
  private readonly rocCaption: HTMLElement;
  private readonly prCaption: HTMLElement;
  private readonly note: HTMLElement;
  readonly threshold = new ThresholdView();
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;

  constructor() {
    const select = (testid: string, label: string) => custom('vscode-single-select', { testid, attrs: { 'aria-label': label } }) as SelectEl;
    this.rowsSel = select('evaluation-rows', 'Rows');
    this.binsSel = select('evaluation-bins', 'Bins');
    this.classSel = select('evaluation-class', 'Class');
    for (const [v, t] of [['equal-width', 'equal width'], ['equal-count', 'equal count']]) this.binsSel.appendChild(custom('vscode-option', { attrs: { value: v } }, t));
    for (const s of [this.rowsSel, this.binsSel, this.classSel]) s.addEventListener('change', () => this.draw());
    this.classField = h('label', { class: 'field' }, h('span', {}, 'Calibration of'), this.classSel);
    const canvas = (label: string) => h('canvas', { attrs: { role: 'img', 'aria-label': label } });
    this.roc = canvas('ROC curve');
    this.pr = canvas('Precision against recall');
    this.calibration = canvas('Calibration curve');
    this.histogram = canvas('Histogram of predicted probabilities');
    this.rocCaption = h('figcaption', { testid: 'roc-caption' });
    this.prCaption = h('figcaption', { testid: 'pr-caption' });
    this.note = h('p', { class: 'muted', testid: 'evaluation-note' });
    this.root = h(
      'div',
      { class: 'evaluation', testid: 'evaluation' },
      h('div', { class: 'controls' }, h('label', { class: 'field' }, h('span', {}, 'Rows'), this.rowsSel), h('label', { class: 'field' }, h('span', {}, 'Bins'), this.binsSel), this.classField),
      h(
        'div',
        { class: 'pair' },
        h('figure', { testid: 'roc' }, this.rocCaption, h('div', { class: 'chart-box' }, this.roc)),
        h('figure', { testid: 'precision-recall' }, this.prCaption, h('div', { class: 'chart-box' }, this.pr)),
        h(
          'figure',
          { testid: 'calibration' },
          h('figcaption', {}, 'Calibration: share of rows of the class against the mean probability, per bin'),
          h('div', { class: 'chart-box' }, this.calibration),
          h('div', { class: 'chart-box short' }, this.histogram),
        ),
      ),
      this.note,
      this.threshold.root,
    );
  }

  /** Whether this summary has anything to show here. */
  static shows(s: FitSummary): boolean {
    return s.oob?.kind === 'classification' ? s.oob.evaluation !== undefined : s.heldOut?.scores.kind === 'classification' && s.heldOut.scores.evaluation !== undefined;
  }

  setSummary(s: FitSummary): void {
    this.summary = s;
    clear(this.rowsSel);
    if (oobOf(s)) this.rowsSel.appendChild(custom('vscode-option', { attrs: { value: 'oob' } }, 'out-of-bag'));
    if (heldOf(s)) this.rowsSel.appendChild(custom('vscode-option', { attrs: { value: 'held' } }, s.heldOut!.from === 'test' ? 'test file' : 'held out'));
    this.rowsSel.value = oobOf(s) ? 'oob' : 'held';
    clear(this.classSel);
    s.classes.forEach((c, k) => this.classSel.appendChild(custom('vscode-option', { attrs: { value: String(k) } }, c)));
    this.classField.classList.toggle('hidden', s.classes.length <= 2);
    this.threshold.setSummary(s, oobOf(s)?.thresholds ?? null, heldOf(s)?.thresholds ?? null);
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.threshold.setTheme();
    this.draw();
  }

  draw(): void {
    const s = this.summary;
    const theme = this.theme;
    if (!s || !theme) return;
    const rows: Rows = this.rowsSel.value === 'held' ? 'held' : 'oob';
    const e = rows === 'held' ? heldOf(s) : oobOf(s);
    if (!e) return;
    applyTheme(theme);
    const two = s.classes.length === 2;
    const colour = (c: ClassCurvesView) => css(two ? theme.focus : theme.classColour(c.code));
    const which = rows === 'oob' ? 'out-of-bag' : s.heldOut?.from === 'test' ? 'test-file' : 'held-out';
    clear(this.rocCaption);
    append(this.rocCaption, two ? `ROC curve for “${e.curves[0]?.label}”: AUC ${fixed(e.auc, 3)}` : `ROC curves, each class against the rest: mean AUC ${fixed(e.auc, 3)}`);
    clear(this.prCaption);
    append(this.prCaption, two ? `Precision against recall: average precision ${fixed(e.curves[0]?.averagePrecision, 3)}` : 'Precision against recall, each class against the rest');
    const line = (c: ClassCurvesView, pts: Array<{ x: number; y: number }>, label: string) => ({
      label,
      data: pts,
      borderColor: colour(c),
      backgroundColor: colour(c),
      borderWidth: 2,
      pointRadius: 0,
      stepped: false as const,
    });
    const dashed = (pts: Array<{ x: number; y: number }>, label: string) => ({ label, data: pts, borderColor: css(theme.muted), borderDash: [4, 4], borderWidth: 1, pointRadius: 0 });
    const axes = (x: string, y: string) => ({
      x: { type: 'linear' as const, min: 0, max: 1, title: { display: true, text: x } },
      y: { type: 'linear' as const, min: 0, max: 1, title: { display: true, text: y } },
    });
    const legend = { display: !two, labels: { boxWidth: 10, filter: (item: { text: string }) => !item.text.startsWith('chance') && !item.text.startsWith('perfect') } };
    replaceChart(this.roc, {
      type: 'line',
      data: { datasets: [...e.curves.map((c) => line(c, c.roc, `${c.label} (AUC ${fixed(c.auc, 3)})`)), dashed([{ x: 0, y: 0 }, { x: 1, y: 1 }], 'chance')] },
      options: { responsive: true, maintainAspectRatio: false, parsing: false, plugins: { legend, tooltip: { enabled: false } }, scales: axes('false positive rate', 'true positive rate') },
    });
    replaceChart(this.pr, {
      type: 'line',
      data: {
        datasets: [
          ...e.curves.map((c) => ({ ...line(c, c.precisionRecall, `${c.label} (AP ${fixed(c.averagePrecision, 3)})`), stepped: 'after' as const })),
          ...(two && e.curves[0]?.baseRate !== null ? [dashed([{ x: 0, y: e.curves[0].baseRate }, { x: 1, y: e.curves[0].baseRate }], 'chance: the share of the class')] : []),
        ],
      },
      options: { responsive: true, maintainAspectRatio: false, parsing: false, plugins: { legend, tooltip: { enabled: false } }, scales: axes('recall', 'precision') },
    });
    const k = two ? 0 : Math.max(0, e.curves.findIndex((c) => String(c.code) === this.classSel.value));
    const c = e.curves[k];
    const bins = this.binsSel.value === 'equal-count' ? c.calibration.equalCount : c.calibration.equalWidth;
    const filled = bins.filter((b) => b.rows > 0 && b.meanPredicted !== null && b.observed !== null);
    replaceChart(this.calibration, {
      type: 'line',
      data: {
        datasets: [
          { label: c.label, data: filled.map((b) => ({ x: b.meanPredicted!, y: b.observed! })), borderColor: colour(c), backgroundColor: colour(c), borderWidth: 2, pointRadius: 3 },
          dashed([{ x: 0, y: 0 }, { x: 1, y: 1 }], 'perfect calibration'),
        ],
      },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        parsing: false,
        plugins: { legend: { display: false }, tooltip: { callbacks: { label: (ctx) => (ctx.datasetIndex === 0 ? `${count(filled[ctx.dataIndex].rows)} rows: mean probability ${percent(filled[ctx.dataIndex].meanPredicted)}, share of “${c.label}” ${percent(filled[ctx.dataIndex].observed)}` : '') } } },
        scales: axes(`mean probability of “${c.label}”`, 'share of rows of the class'),
      },
    });
    replaceChart(this.histogram, {
      type: 'bar',
      data: { labels: bins.map((b) => `${fixed(b.lower, 2)}–${fixed(b.upper, 2)}`), datasets: [{ label: 'rows', data: bins.map((b) => b.rows), backgroundColor: css(theme.muted, 0.5), borderColor: css(theme.muted), borderWidth: 1 }] },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        plugins: { legend: { display: false } },
        scales: { x: { title: { display: true, text: 'probability bin' }, ticks: { maxRotation: 0, autoSkip: true, maxTicksLimit: 6 } }, y: { title: { display: true, text: 'rows' }, beginAtZero: true } },
      },
    });
    clear(this.note);
    append(
      this.note,
      `On ${which} rows. ROC and precision-recall read the ${two ? `probability of “${c.label}”` : 'probability of each class against the rest'}; a curve near the dashed line ranks no better than chance. ` +
        `Brier score ${fixed(e.brier, 3)} (${two ? `squared error of the probability of “${c.label}”` : 'squared error summed over classes'}; 0 is perfect). ` +
        'A calibrated forest keeps its points near the diagonal: below it, the class turns up less often than the probability says; above it, more often.',
    );
  }
}

function oobOf(s: FitSummary): EvaluationView | undefined {
  return s.oob?.kind === 'classification' ? s.oob.evaluation : undefined;
}

function heldOf(s: FitSummary): EvaluationView | undefined {
  return s.heldOut?.scores.kind === 'classification' ? s.heldOut.scores.evaluation : undefined;
}
