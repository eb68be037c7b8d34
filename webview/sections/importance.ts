// Three views of what the forest leans on, side by side in one feature order: impurity decrease
// (cheap, but favours features with many split points), permutation drop (costlier, measured on
// out-of-bag rows) with its spread drawn as whiskers, and the mean absolute contribution over a sample
// of rows (worked out in the background, so it fills in later). Different units, so separate axes.
// Theme colours, not class colours: a bar here is not about any class.
import type { FeatureImportance, FitSummary, GlobalContributions } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { PictureText } from '../a11y';
import { append, clear, h } from '../dom';
import { num, percent, permutationDrop, truncate } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';
import type { Plugin } from 'chart.js';
import { Chart } from '../charts';

const MAX_FEATURES = 15;

// What permutation importance measured, with its unit: the rise in error when a feature is shuffled, on
// out-of-bag rows after a fit, or on the file shown for a forest opened from a file.
function permCaption(s: FitSummary, on: 'out-of-bag' | 'file'): string {
  const rows = on === 'out-of-bag' ? 'out-of-bag' : 'on this file';
  return s.task === 'classification'
    ? `Drop in accuracy ${rows} when shuffled, in percentage points (± spread)`
    : `Rise in mean squared error ${rows} when shuffled, in ${s.target}² (± spread)`;
}

export class ImportanceView {
  readonly root: HTMLElement;
  private readonly impurity: HTMLCanvasElement;
  private readonly permutation: HTMLCanvasElement;
  private readonly contrib: HTMLCanvasElement;
  private readonly contribCaption: HTMLElement;
  private readonly contribNote: HTMLElement;
  private readonly note: HTMLElement;
  private readonly permCaption: HTMLElement;
  private readonly boxes: HTMLElement[];
  private readonly text = new PictureText('importance-text');
  private global: GlobalContributions | null = null;
  private globalText = '';
  private last: { s: FitSummary; theme: Theme } | null = null;

  constructor() {
    this.impurity = h('canvas', { attrs: { 'aria-label': 'Impurity decrease per feature' } });
    this.permutation = h('canvas', { attrs: { 'aria-label': 'Permutation drop per feature' } });
    this.contrib = h('canvas', { attrs: { 'aria-label': 'Mean absolute contribution per feature' } });
    this.boxes = [h('div', { class: 'chart-box' }, this.impurity), h('div', { class: 'chart-box' }, this.permutation), h('div', { class: 'chart-box' }, this.contrib)];
    this.contribCaption = h('figcaption', {}, 'Mean |contribution| over sampled rows');
    this.contribNote = h('p', { class: 'muted contrib-status' });
    this.note = h('p', { class: 'muted' });
    this.permCaption = h('figcaption', { testid: 'permutation-caption' }, '');
    this.root = h(
      'div',
      { class: 'importance', testid: 'importance' },
      h(
        'div',
        { class: 'pair' },
        h('figure', {}, h('figcaption', {}, 'Impurity decrease (share of total)'), this.boxes[0]),
        h('figure', {}, this.permCaption, this.boxes[1]),
        h('figure', { testid: 'importance-contrib' }, this.contribCaption, this.boxes[2], this.contribNote),
      ),
      this.note,
      this.text.root,
      // The reference below is written from memory (authors, year, journal, article number).
      h(
        'p',
        { class: 'muted', testid: 'importance-bias' },
        'Why the three can disagree: impurity decrease favours features with many distinct values or levels, because they offer more split points and so win splits by chance more often, even when they carry no signal ' +
          '(Strobl, Boulesteix, Zeileis & Hothorn 2007, “Bias in random forest variable importance measures”, BMC Bioinformatics 8:25). ' +
          'Permutation drop asks what is lost when a feature’s values are shuffled on rows the trees did not see. Mean |contribution| measures, row by row and in the prediction’s own units, how far each feature moves this forest’s output; it follows the trees’ splits, so it is not free of that bias either.',
      ),
    );
  }

  /** The global view, as the background sample grows; null with a note while there is nothing yet. */
  setGlobal(global: GlobalContributions | null, text: string): void {
    this.global = global;
    this.globalText = text;
    if (this.last) this.draw(this.last.s, this.last.theme);
  }

  /** A new fit: the last forest's global view no longer applies. */
  reset(): void {
    this.global = null;
    this.globalText = '';
  }

  draw(s: FitSummary, theme: Theme): void {
    this.last = { s, theme };
    applyTheme(theme);
    const hasPerm = s.importance.some((m) => m.permutation !== null);
    this.permCaption.textContent = permCaption(s, s.permutationOn ?? 'out-of-bag');
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
    // A classifier's drop is a share of rows; the caption promises percentage points, so the axis shows them.
    const points = (v: number | null) => permutationDrop(s.task, v);
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
              label: (c) => `${points(c.parsed.x)} ± ${points(spread[c.dataIndex])}`,
            },
          },
        },
        scales: { x: { ticks: { callback: (v) => points(Number(v)) } }, y: { ticks: { autoSkip: false } } },
      },
      plugins: [whiskers(spread, css(theme.foreground))],
    });

    this.drawGlobal(shown, labels, tooltipTitle, theme);
    this.describe(s, order, hasPerm);

    clear(this.note);
    if (!hasPerm) append(this.note, `Permutation importance ${s.permutationNote ?? 'was not measured for this forest.'} `);
    if (order.length > shown.length) append(this.note, `${shown.length} of ${order.length} features shown, the most important first. `);
    append(this.note, 'A negative drop means shuffling the feature did not hurt: treat it as no evidence of use.');
  }

  private describe(s: FitSummary, order: FeatureImportance[], hasPerm: boolean): void {
    const t = importanceText(s, order, hasPerm, this.global);
    this.text.set(t.sentence, { caption: 'Feature importance, three measures', corner: 'feature', columns: t.columns, rows: t.rows });
    this.text.describe(this.impurity, 'Impurity decrease per feature');
    this.text.describe(this.permutation, 'Permutation drop per feature');
    this.text.describe(this.contrib, 'Mean absolute contribution per feature');
  }

  private drawGlobal(shown: FeatureImportance[], labels: string[], tooltipTitle: (items: Array<{ dataIndex: number }>) => string, theme: Theme): void {
    const g = this.global;
    clear(this.contribNote);
    this.boxes[2].classList.toggle('hidden', !g || g.rows === 0);
    if (!g || g.rows === 0) {
      Chart.getChart(this.contrib)?.destroy();
      append(this.contribNote, this.globalText || 'Not worked out yet.');
      return;
    }
    // Same feature order as the other two charts, so a feature sits on the same line in all three.
    const by = new Map(g.features.map((f) => [f.feature, f.meanAbs]));
    const values = shown.map((m) => by.get(m.feature) ?? null);
    replaceChart(this.contrib, {
      type: 'bar',
      // Unsigned (a mean of sizes), so neither sign colour: those say "raises" and "lowers" elsewhere.
      data: { labels, datasets: [{ data: values, backgroundColor: css(theme.foreground, 0.5), barPercentage: 0.8 }] },
      options: {
        indexAxis: 'y',
        responsive: true,
        maintainAspectRatio: false,
        plugins: { legend: { display: false }, tooltip: { callbacks: { title: tooltipTitle, label: (c) => num(c.parsed.x) } } },
        scales: { x: { beginAtZero: true, ticks: { callback: (v) => num(Number(v)) } }, y: { ticks: { autoSkip: false } } },
      },
    });
    append(
      this.contribNote,
      g.done
        ? `Over ${g.rows} randomly drawn rows${g.rows < g.planned ? ` (the time allowed ran out before ${g.planned})` : ''}; summed over classes for a classifier.`
        : `Over ${g.rows} of ${g.planned} sampled rows so far…`,
    );
  }
}

/** The three charts in words: the features in the order the charts show them, and every figure as a table. */
function importanceText(s: FitSummary, order: FeatureImportance[], hasPerm: boolean, global: GlobalContributions | null): { sentence: string; columns: string[]; rows: Array<{ head: string; cells: string[] }> } {
  const top = order.slice(0, 3).map((m) => m.feature);
  const by = hasPerm ? 'permutation drop' : 'impurity decrease';
  const sentence = top.length === 0 ? 'No feature importance for this forest.' : `By ${by}, the forest leans most on ${top[0]}${top.length > 1 ? `, then ${top.slice(1).join(' and ')}` : ''}.`;
  const mean = new Map((global?.rows ? global.features : []).map((f) => [f.feature, f.meanAbs]));
  const columns = ['impurity decrease (share)', hasPerm ? permCaption(s, s.permutationOn ?? 'out-of-bag') : 'permutation drop', 'mean |contribution|'];
  const rows = order.map((m) => ({
    head: m.feature,
    cells: [percent(m.impurity, 1), m.permutation === null ? 'n/a' : `${permutationDrop(s.task, m.permutation)} ± ${permutationDrop(s.task, m.permutationSpread)}`, mean.has(m.feature) ? num(mean.get(m.feature) ?? null) : 'n/a'],
  }));
  return { sentence, columns, rows };
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
