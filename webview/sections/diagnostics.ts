// Regression: out-of-bag predictions against the truth, with the diagonal where they would agree, and the
// residuals against the prediction, with the zero line; a pattern in either (a bend, a funnel) is what a
// single R² hides. The pairs are core's sample of rows (protocol/evaluation.ts); this only draws them.
import type { FitSummary, RegressionDiagnosticsView } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { append, clear, h } from '../dom';
import { count, num, percent } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

export class DiagnosticsView {
  readonly root: HTMLElement;
  private readonly scatter: HTMLCanvasElement;
  private readonly residuals: HTMLCanvasElement;
  private readonly note: HTMLElement;

  constructor() {
    this.scatter = h('canvas', { attrs: { role: 'img', 'aria-label': 'Out-of-bag prediction against the actual value' } });
    this.residuals = h('canvas', { attrs: { role: 'img', 'aria-label': 'Residual against the out-of-bag prediction' } });
    this.note = h('p', { class: 'muted', testid: 'diagnostics-note' });
    this.root = h(
      'div',
      { class: 'diagnostics', testid: 'diagnostics' },
      h(
        'div',
        { class: 'pair' },
        h('figure', { testid: 'predicted-actual' }, h('figcaption', {}, 'Out-of-bag prediction against the actual value'), h('div', { class: 'chart-box' }, this.scatter)),
        h('figure', { testid: 'residual-plot' }, h('figcaption', {}, 'Residual (actual − prediction) against the prediction'), h('div', { class: 'chart-box' }, this.residuals)),
      ),
      this.note,
    );
  }

  static of(s: FitSummary): RegressionDiagnosticsView | undefined {
    return s.oob?.kind === 'regression' ? s.oob.diagnostics : undefined;
  }

  draw(s: FitSummary, theme: Theme): void {
    const d = DiagnosticsView.of(s);
    if (!d) return;
    applyTheme(theme);
    const dots = d.pairs.map((p) => ({ x: p.actual, y: p.predicted }));
    const lo = Math.min(...d.pairs.map((p) => Math.min(p.actual, p.predicted)));
    const hi = Math.max(...d.pairs.map((p) => Math.max(p.actual, p.predicted)));
    const point = { borderColor: css(theme.focus, 0.8), backgroundColor: css(theme.focus, 0.35), pointRadius: 2.5, showLine: false };
    const guide = (pts: Array<{ x: number; y: number }>) => ({ data: pts, borderColor: css(theme.muted), borderDash: [4, 4], borderWidth: 1, pointRadius: 0 });
    const axis = (text: string) => ({ type: 'linear' as const, title: { display: true, text } });
    replaceChart(this.scatter, {
      type: 'line',
      data: { datasets: [{ ...point, data: dots }, guide([{ x: lo, y: lo }, { x: hi, y: hi }])] },
      options: { responsive: true, maintainAspectRatio: false, parsing: false, plugins: { legend: { display: false }, tooltip: { enabled: false } }, scales: { x: axis(`actual ${s.target}`), y: axis(`out-of-bag prediction`) } },
    });
    const res = d.pairs.map((p) => ({ x: p.predicted, y: p.actual - p.predicted }));
    const plo = Math.min(...res.map((p) => p.x));
    const phi = Math.max(...res.map((p) => p.x));
    replaceChart(this.residuals, {
      type: 'line',
      data: { datasets: [{ ...point, data: res }, guide([{ x: plo, y: 0 }, { x: phi, y: 0 }])] },
      options: { responsive: true, maintainAspectRatio: false, parsing: false, plugins: { legend: { display: false }, tooltip: { enabled: false } }, scales: { x: axis('out-of-bag prediction'), y: axis(`residual (${s.target})`) } },
    });
    clear(this.note);
    const sample = d.pairs.length < d.rows ? `${count(d.pairs.length)} of ${count(d.rows)} out-of-bag rows, evenly spaced in file order` : `all ${count(d.rows)} out-of-bag rows`;
    append(this.note, `Showing ${sample}. Points far from the dashed lines are rows the trees that never saw them got wrong.`);
    if (d.interval) {
      append(this.note, ` The ${percent(d.interval.level, 0)} prediction interval held the actual value for ${percent(d.interval.coverage)} of ${count(d.interval.rows)} out-of-bag rows (mean width ${num(d.interval.meanWidth)}).`);
    }
  }
}
