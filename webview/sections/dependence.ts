// How the forest's output moves with one feature while every other feature keeps each row's own value:
// one thin curve per sampled row (individual conditional expectation), their mean drawn bold (partial
// dependence), and under them where the rows actually lie along the axis, so a curve drawn over
// empty ground is seen to be extrapolation. Every number comes from the host.
import type { Chart, Plugin } from 'chart.js';
import type { Dependence, FitSummary } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { nameControl } from '../a11y';
import { append, clear, custom, h } from '../dom';
import { count, num, percent, truncate } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

type SelectEl = HTMLElement & { value: string };

/** Share of the plot's height the distribution bars may take at most. */
const DISTRIBUTION_SHARE = 0.22;

export class DependenceView {
  readonly root: HTMLElement;
  private readonly featureSel: SelectEl;
  private readonly classSel: SelectEl;
  private readonly classField: HTMLElement;
  private readonly box: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly note: HTMLElement;
  private readonly table: HTMLElement;
  private readonly empty: HTMLElement;
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;
  private dep: Dependence | null = null;

  constructor(private readonly choose: (feature: string, output: number | null) => void) {
    this.featureSel = nameControl(custom('vscode-single-select', { testid: 'dependence-feature' }), 'Feature') as SelectEl;
    this.classSel = nameControl(custom('vscode-single-select', { testid: 'dependence-class' }), 'Class') as SelectEl;
    this.classField = h('label', { class: 'field' }, h('span', {}, 'Probability of'), this.classSel);
    this.featureSel.addEventListener('change', () => {
      if (this.featureSel.value && this.featureSel.value !== this.dep?.feature) this.choose(this.featureSel.value, null);
    });
    this.classSel.addEventListener('change', () => {
      const k = Number(this.classSel.value);
      if (this.dep && Number.isInteger(k) && k !== this.dep.output) this.choose(this.dep.feature, k);
    });
    this.canvas = h('canvas', { attrs: { role: 'img', 'aria-label': 'Partial dependence with individual curves' } });
    this.box = h('div', { class: 'chart-box tall' }, this.canvas);
    this.note = h('p', { class: 'muted', testid: 'dependence-note' });
    this.table = h('div', {});
    this.empty = h('p', { class: 'muted' }, 'The curves appear once the host has worked them out.');
    this.root = h(
      'div',
      { class: 'dependence', testid: 'dependence' },
      h('div', { class: 'controls' }, h('label', { class: 'field' }, h('span', {}, 'Feature'), this.featureSel), this.classField),
      this.empty,
      this.box,
      this.note,
      this.table,
    );
    this.box.classList.add('hidden');
  }

  setSummary(summary: FitSummary): void {
    this.summary = summary;
    this.dep = null;
    clear(this.featureSel);
    for (const f of summary.features) this.featureSel.appendChild(custom('vscode-option', { attrs: { value: f.name } }, f.name));
    clear(this.classSel);
    summary.classes.forEach((c, k) => this.classSel.appendChild(custom('vscode-option', { attrs: { value: String(k) } }, c)));
    this.classField.classList.toggle('hidden', summary.task !== 'classification');
    this.draw();
  }

  set(dep: Dependence): void {
    this.dep = dep;
    this.featureSel.value = dep.feature;
    if (dep.output !== null) this.classSel.value = String(dep.output);
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  private draw(): void {
    const d = this.dep;
    const theme = this.theme;
    clear(this.note);
    clear(this.table);
    this.empty.classList.toggle('hidden', d !== null);
    this.box.classList.toggle('hidden', d === null);
    if (!d || !theme) return;
    applyTheme(theme);
    const numeric = d.kind === 'numeric';
    const G = d.grid.length;
    const xs = numeric ? d.grid : d.grid.map((_, g) => g);
    // All curves in one dataset, broken by gaps: hundreds of datasets would slow chart.js for nothing.
    const ice: Array<{ x: number; y: number | null }> = [];
    for (const curve of d.ice) {
      curve.forEach((y, g) => ice.push({ x: xs[g], y }));
      ice.push({ x: xs[G - 1], y: null });
    }
    const average = d.average.map((y, g) => ({ x: xs[g], y }));
    const what = d.output === null ? (this.summary?.target ?? 'prediction') : `P(${this.summary?.classes[d.output] ?? `class ${d.output}`})`;
    const labels = d.labels ?? [];
    const total = d.counts.reduce((a, b) => a + b, 0) + d.missing;
    replaceChart(this.canvas, {
      type: 'line',
      data: {
        datasets: [
          { label: 'one row', data: ice, borderColor: css(theme.muted, d.ice.length > 60 ? 0.22 : 0.4), borderWidth: 1, pointRadius: 0, spanGaps: false },
          { label: 'average', data: average, borderColor: css(theme.focus), backgroundColor: css(theme.focus), borderWidth: 3, pointRadius: numeric ? 0 : 3 },
        ],
      },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        parsing: false,
        normalized: true,
        interaction: { mode: 'nearest', axis: 'x', intersect: false },
        plugins: {
          legend: { display: false },
          tooltip: {
            filter: (item) => item.datasetIndex === 1,
            callbacks: {
              title: (items) => {
                const g = items[0]?.dataIndex ?? 0;
                return `${d.feature} = ${numeric ? num(d.grid[g]) : (labels[g] ?? '')}`;
              },
              label: (item) => {
                const g = item.dataIndex;
                return [`average ${what}: ${num(d.average[g])}`, `rows in this cell: ${count(d.counts[g])}`];
              },
            },
          },
        },
        scales: {
          x: numeric
            ? { type: 'linear', min: d.grid[0], max: d.grid[G - 1], title: { display: true, text: d.feature }, ticks: { maxTicksLimit: 8, callback: (v) => num(Number(v)) } }
            : { type: 'linear', min: -0.5, max: G - 0.5, title: { display: true, text: d.feature }, afterBuildTicks: (axis) => (axis.ticks = d.grid.map((_, g) => ({ value: g }))), ticks: { callback: (v) => truncate(labels[Number(v)] ?? '', 12) } },
          y: { title: { display: true, text: what }, ticks: { callback: (v) => num(Number(v)) } },
        },
      },
      plugins: [distribution(d, css(theme.muted, 0.35), css(theme.error, 0.08))],
    });

    const empty = emptyRanges(d);
    append(
      this.note,
      `Bold: the average over ${d.ice.length} sampled rows; thin: each of those rows with only ${d.feature} changed. ` +
        `The bars along the bottom show how ${count(total)} rows spread along ${d.feature}: its training rows for a forest fitted here, or the rows of the file it is shown with for an opened one.`,
    );
    if (empty.length > 0) {
      append(this.note, ' ', h('strong', {}, 'No rows ' + empty.join(', ') + ':'), ' the curve there is the forest extrapolating.');
    }
    if (d.missing > 0) append(this.note, ` ${count(d.missing)} rows (${percent(d.missing / Math.max(1, total), 1)}) have no value for ${d.feature} and are not on the axis.`);
    append(this.table, tableOf(d, what));
  }
}

/** Where the grid's cells hold no row, as text ("between 0.4 and 0.6", "at level x"). */
export function emptyRanges(d: Dependence): string[] {
  const out: string[] = [];
  if (d.kind !== 'numeric') {
    d.counts.forEach((n, g) => n === 0 && out.push(`at ${d.labels?.[g] ?? g}`));
    return out;
  }
  const G = d.grid.length;
  let g = 0;
  while (g < G) {
    if (d.counts[g] > 0) {
      g++;
      continue;
    }
    const from = g;
    while (g < G && d.counts[g] === 0) g++;
    const lo = from === 0 ? d.grid[0] : d.boundaries[from - 1];
    const hi = g >= G ? d.grid[G - 1] : d.boundaries[g - 1];
    out.push(`between ${num(lo)} and ${num(hi)}`);
  }
  return out;
}

/** Draws each cell's share of the rows as a bar along the bottom, and tints cells that hold none. */
function distribution(d: Dependence, bar: string, emptyTint: string): Plugin<'line'> {
  return {
    id: 'copseDistribution',
    beforeDatasetsDraw(chart: Chart<'line'>) {
      const { ctx, chartArea: area } = chart;
      const x = chart.scales.x;
      const G = d.grid.length;
      const numeric = d.kind === 'numeric';
      // Numeric cells run between the midpoints to their neighbours, the outer ones to the axis ends; a bar's
      // height is then rows per unit of the feature (density), so narrow end cells do not look empty.
      const lo = (g: number) => (numeric ? (g === 0 ? d.grid[0] : d.boundaries[g - 1]) : g - 0.4);
      const hi = (g: number) => (numeric ? (g === G - 1 ? d.grid[G - 1] : d.boundaries[g]) : g + 0.4);
      const density = d.counts.map((n, g) => (numeric ? n / Math.max(hi(g) - lo(g), 1e-12) : n));
      const max = Math.max(...density) || 1;
      ctx.save();
      for (let g = 0; g < G; g++) {
        const left = x.getPixelForValue(lo(g));
        const width = Math.max(1, x.getPixelForValue(hi(g)) - left);
        if (d.counts[g] === 0) {
          ctx.fillStyle = emptyTint;
          ctx.fillRect(left, area.top, width, area.bottom - area.top);
          continue;
        }
        const height = Math.max(1, (density[g] / max) * DISTRIBUTION_SHARE * (area.bottom - area.top));
        ctx.fillStyle = bar;
        ctx.fillRect(left + 0.5, area.bottom - height, Math.max(1, width - 1), height);
      }
      ctx.restore();
    },
  };
}

function tableOf(d: Dependence, what: string): HTMLElement {
  const rows = d.grid.map((v, g) => {
    const tr = h('tr', {}, h('th', { attrs: { scope: 'row' } }, d.kind === 'numeric' ? num(v) : (d.labels?.[g] ?? String(v))), h('td', { class: 'num' }, num(d.average[g])), h('td', { class: 'num' }, count(d.counts[g])));
    tr.dataset.point = String(g);
    return tr;
  });
  return h(
    'details',
    {},
    h('summary', {}, 'The curve as a table'),
    h(
      'table',
      { class: 'score-table', testid: 'dependence-table' },
      h('thead', {}, h('tr', {}, h('th', { attrs: { scope: 'col' } }, d.feature), h('th', { attrs: { scope: 'col' } }, `average ${what}`), h('th', { attrs: { scope: 'col' } }, 'rows in cell'))),
      h('tbody', {}, ...rows),
    ),
  );
}
