// OOB error against the number of trees: shows whether more trees would still help.
import type { FitSummary } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { PictureText } from '../a11y';
import { append, clear, h } from '../dom';
import { num, percent } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

export class CurveView {
  readonly root: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly note: HTMLElement;
  private readonly text = new PictureText('oob-curve-text');

  constructor() {
    this.canvas = h('canvas', { attrs: { 'aria-label': 'Out-of-bag error by number of trees' } });
    this.note = h('p', { class: 'muted' });
    this.root = h('div', { class: 'curve', testid: 'oob-curve' }, h('div', { class: 'chart-box' }, this.canvas), this.note, this.text.root);
  }

  draw(s: FitSummary, theme: Theme): void {
    applyTheme(theme);
    const classification = s.task === 'classification';
    const fmt = (v: number) => (classification ? percent(v, 1) : num(v));
    replaceChart(this.canvas, {
      type: 'line',
      data: {
        labels: s.curve.map((_, t) => String(t + 1)),
        datasets: [
          {
            label: classification ? 'Out-of-bag error (1 − accuracy)' : `Out-of-bag mean squared error (${s.target}²)`,
            data: s.curve,
            borderColor: css(theme.focus),
            backgroundColor: css(theme.focus),
            borderWidth: 2,
            pointRadius: 0,
            spanGaps: false,
          },
        ],
      },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        interaction: { mode: 'index', intersect: false },
        plugins: {
          legend: { display: false },
          tooltip: { callbacks: { label: (c) => `${c.parsed.y === null ? 'n/a' : fmt(c.parsed.y)} with ${c.label} trees` } },
        },
        scales: {
          x: { title: { display: true, text: 'trees' }, ticks: { maxTicksLimit: 8, maxRotation: 0 } },
          y: {
            title: { display: true, text: classification ? 'out-of-bag error' : `out-of-bag mean squared error (${s.target}²)` },
            beginAtZero: true,
            ticks: { callback: (v) => fmt(Number(v)) },
          },
        },
      },
    });
    clear(this.note);
    const defined = s.curve.map((v, t) => [t + 1, v] as const).filter((p): p is readonly [number, number] => p[1] !== null);
    if (defined.length === 0) {
      append(this.note, 'No tree left any row out of its sample, so there is no out-of-bag error to plot.');
      this.text.set('', null);
      return;
    }
    const last = defined[defined.length - 1];
    const half = defined.find(([t]) => t >= Math.ceil(last[0] / 2));
    append(this.note, `With all ${last[0]} trees: ${fmt(last[1])}.`);
    if (half && half[0] < last[0]) append(this.note, ` With ${half[0]}: ${fmt(half[1])}.`);
    // The table reads the curve at about a dozen tree counts, always including the first and the last.
    const step = Math.max(1, Math.ceil(defined.length / 12));
    const picked = defined.filter((_, i) => i % step === 0 || i === defined.length - 1);
    this.text.set(`Out-of-bag error from ${fmt(defined[0][1])} with ${defined[0][0]} trees to ${fmt(last[1])} with ${last[0]}.`, {
      caption: 'Out-of-bag error by number of trees',
      corner: 'trees',
      columns: [classification ? 'out-of-bag error' : `out-of-bag mean squared error (${s.target}²)`],
      rows: picked.map(([t, v]) => ({ head: String(t), cells: [fmt(v)] })),
    });
    this.text.describe(this.canvas, 'Out-of-bag error by number of trees');
  }
}
