// Two views of what the forest leans on, side by side in one feature order: impurity decrease
// (cheap, but favours features with many split points) and permutation drop (costlier, measured on
// out-of-bag rows) with its spread drawn as whiskers. Different units, so two axes, not one.
// Theme colours, not class colours: a bar here is not about any class.
import type { FeatureImportance, FitSummary } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { append, clear, h } from '../dom';
import { num, percent, truncate } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';
import type { Chart, Plugin } from 'chart.js';

const MAX_FEATURES = 15;

export class ImportanceView {
  readonly root: HTMLElement;
  private readonly impurity: HTMLCanvasElement;
  private readonly permutation: HTMLCanvasElement;
  private readonly note: HTMLElement;
  private readonly boxes: HTMLElement[];

  constructor() {
    this.impurity = h('canvas', { attrs: { 'aria-label': 'Impurity decrease per feature' } });
    this.permutation = h('canvas', { attrs: { 'aria-label': 'Permutation drop per feature' } });
    this.boxes = [h('div', { class: 'chart-box' }, this.impurity), h('div', { class: 'chart-box' }, this.permutation)];
    this.note = h('p', { class: 'muted' });
    this.root = h(
      'div',
      { class: 'importance', testid: 'importance' },
      h(
        'div',
        { class: 'pair' },
        h('figure', {}, h('figcaption', {}, 'Impurity decrease (share of total)'), this.boxes[0]),
        h('figure', {}, h('figcaption', {}, 'Drop in OOB score when shuffled (± spread)'), this.boxes[1]),
      ),
      this.note,
    );
  }

  draw(s: FitSummary, theme: Theme): void {
    applyTheme(theme);
    const hasPerm = s.importance.some((m) => m.permutation !== null);
    const order = [...s.importance].sort((a, b) => key(b, hasPerm) - key(a, hasPerm));
    const shown = order.slice(0, MAX_FEATURES);
    const labels = shown.map((m) => truncate(m.feature, 16));
    const height = `${Math.max(90, 22 * shown.length + 40)}px`;
    for (const b of this.boxes) b.style.height = height;
    const tooltipTitle = (items: Array<{ dataIndex: number }>) => shown[items[0]?.dataIndex ?? 0]?.feature ?? '';

    replaceChart(this.impurity, {
      type: 'bar',
      data: { labels, datasets: [{ data: shown.map((m) => m.impurity), backgroundColor: css(theme.muted, 0.8), barPercentage: 0.8 }] },
      options: {
        indexAxis: 'y',
        responsive: true,
        maintainAspectRatio: false,
        plugins: { legend: { display: false }, tooltip: { callbacks: { title: tooltipTitle, label: (c) => percent(c.parsed.x, 1) } } },
        scales: { x: { beginAtZero: true, ticks: { callback: (v) => percent(Number(v), 0) } }, y: { ticks: { autoSkip: false } } },
      },
    });

    const perm = shown.map((m) => m.permutation);
    const spread = shown.map((m) => m.permutationSpread);
    replaceChart(this.permutation, {
      type: 'bar',
      data: { labels, datasets: [{ data: perm, backgroundColor: css(theme.focus, 0.85), barPercentage: 0.8 }] },
      options: {
        indexAxis: 'y',
        responsive: true,
        maintainAspectRatio: false,
        plugins: {
          legend: { display: false },
          tooltip: {
            callbacks: {
              title: tooltipTitle,
              label: (c) => `${num(c.parsed.x)} ± ${num(spread[c.dataIndex])}`,
            },
          },
        },
        scales: { x: { ticks: { callback: (v) => num(Number(v)) } }, y: { ticks: { autoSkip: false } } },
      },
      plugins: [whiskers(spread, css(theme.foreground))],
    });

    clear(this.note);
    if (!hasPerm) append(this.note, 'Permutation importance was not computed for this fit. ');
    if (order.length > shown.length) append(this.note, `${order.length - shown.length} less important features not shown. `);
    append(this.note, 'A negative drop means shuffling the feature did not hurt: treat it as no evidence of use.');
  }
}

function key(m: FeatureImportance, byPerm: boolean): number {
  return byPerm ? (m.permutation ?? -Infinity) : m.impurity;
}

/** Draws mean ± spread whiskers over horizontal bars. */
function whiskers(spread: Array<number | null>, colour: string): Plugin<'bar'> {
  return {
    id: 'copseWhiskers',
    afterDatasetsDraw(chart: Chart<'bar'>) {
      const meta = chart.getDatasetMeta(0);
      const x = chart.scales.x;
      const ctx = chart.ctx;
      const values = chart.data.datasets[0].data as Array<number | null>;
      ctx.save();
      ctx.strokeStyle = colour;
      ctx.lineWidth = 1.2;
      meta.data.forEach((bar, i) => {
        const v = values[i];
        const s = spread[i];
        if (v === null || s === null || !(s > 0)) return;
        const y = bar.y;
        const lo = x.getPixelForValue(v - s);
        const hi = x.getPixelForValue(v + s);
        ctx.beginPath();
        ctx.moveTo(lo, y);
        ctx.lineTo(hi, y);
        ctx.moveTo(lo, y - 4);
        ctx.lineTo(lo, y + 4);
        ctx.moveTo(hi, y - 4);
        ctx.lineTo(hi, y + 4);
        ctx.stroke();
      });
      ctx.restore();
    },
  };
}
