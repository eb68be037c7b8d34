// One row's prediction taken apart: from the forest's average output, each feature's signed contribution
// (largest first) to the row's own prediction, drawn as a running total so the bars end where the
// prediction is. The host computes every number; the table under the chart holds the same numbers as text.
import type { FitSummary, HostToPanel, RowContributions } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { append, clear, h } from '../dom';
import { num, truncate } from '../format';
import { niceTicks } from '../map/ticks';
import { css } from '../palette';
import type { Theme } from '../theme';

/** Features drawn one bar each; the rest share one bar, so a wide table still reads. */
const MAX_BARS = 12;

type ContributionsMessage = Extract<HostToPanel, { type: 'contributions' }>;

export class ContributionsView {
  readonly root: HTMLElement;
  private readonly head: HTMLElement;
  private readonly box: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly table: HTMLElement;
  private readonly note: HTMLElement;
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;
  private message: ContributionsMessage | null = null;

  constructor() {
    this.head = h('p', { class: 'contrib-head', testid: 'contributions-head' });
    this.canvas = h('canvas', { attrs: { role: 'img', 'aria-label': 'Contributions of each feature to the selected row’s prediction' } });
    this.box = h('div', { class: 'chart-box' }, this.canvas);
    this.table = h('div', { class: 'contrib-table' });
    this.note = h(
      'p',
      { class: 'muted' },
      'Each bar is what knowing that feature’s value moved this prediction by, starting from the forest’s average output over its training rows. ' +
        'The contributions are exact Shapley values of the trees (Lundberg et al. 2020) and add up to the prediction.',
    );
    this.root = h('div', { class: 'contributions', testid: 'contributions' }, this.head, this.box, this.table, this.note);
    this.draw();
  }

  setSummary(summary: FitSummary): void {
    this.summary = summary;
    this.message = null;
    this.draw();
  }

  set(message: ContributionsMessage): void {
    this.message = message;
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  private draw(): void {
    clear(this.head);
    clear(this.table);
    const m = this.message;
    const c = m?.state === 'ready' ? m.contributions : null;
    this.box.classList.toggle('hidden', !c);
    this.root.dataset.state = m?.state ?? 'empty';
    if (!m) {
      append(this.head, h('span', { class: 'muted' }, 'Put the cursor on a data row in the CSV, or press Explain on a row below, to take its prediction apart.'));
      return;
    }
    if (!c) {
      append(this.head, h('span', { class: m.state === 'unavailable' ? 'muted' : 'muted working' }, m.text));
      return;
    }
    const s = this.summary;
    const what =
      c.output === null
        ? h('span', {}, 'the predicted ', h('strong', {}, s?.target ?? 'value'))
        : h('span', {}, 'the probability of ', h('strong', {}, s?.classes[c.output] ?? `class ${c.output}`));
    append(this.head, h('strong', {}, `Row ${c.row}`), ': ', what, ` goes from ${num(c.base)} on average to ${num(c.prediction)} here.`);
    append(this.table, tableOf(c));
    if (this.theme) this.chart(c, this.theme);
  }

  private chart(c: RowContributions, theme: Theme): void {
    applyTheme(theme);
    const order = c.features.map((f, j) => ({ ...f, j })).sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution) || a.j - b.j);
    const shown = order.slice(0, MAX_BARS);
    const rest = order.slice(MAX_BARS);
    const steps = shown.map((f) => ({ label: `${truncate(f.feature, 18)} = ${truncate(f.value, 10)}`, full: `${f.feature} = ${f.value}`, v: f.contribution }));
    if (rest.length > 0) steps.push({ label: `${rest.length} other features`, full: rest.map((f) => f.feature).join(', '), v: rest.reduce((a, f) => a + f.contribution, 0) });
    // Running total from the base: each bar spans what its feature added.
    const spans: Array<[number, number]> = [];
    let at = c.base;
    for (const st of steps) {
      spans.push([at, at + st.v]);
      at += st.v;
    }
    const all = [c.base, c.prediction, ...spans.flat()];
    const lo = Math.min(...all);
    const hi = Math.max(...all);
    const pad = (hi - lo || Math.abs(hi) || 1) * 0.08;
    // Axis ends on round values just outside the bars, so the edge ticks read as numbers, not leftovers.
    const ticks = niceTicks(lo - pad, hi + pad, 6);
    const step = ticks.length > 1 ? ticks[1] - ticks[0] : pad;
    const start = ticks[0] > lo - pad ? ticks[0] - step : ticks[0];
    const end = ticks[ticks.length - 1] < hi + pad ? ticks[ticks.length - 1] + step : ticks[ticks.length - 1];
    const labels = ['average output', ...steps.map((st) => st.label), 'this row'];
    const data: Array<[number, number]> = [[start, c.base], ...spans, [start, c.prediction]];
    const colours = [css(theme.muted, 0.7), ...steps.map((st) => css(st.v >= 0 ? theme.increase : theme.decrease)), css(theme.foreground, 0.75)];
    const full = ['average output', ...steps.map((st) => st.full), 'this row'];
    this.box.style.height = `${Math.max(120, 22 * labels.length + 40)}px`;
    replaceChart(this.canvas, {
      type: 'bar',
      data: { labels, datasets: [{ data, backgroundColor: colours, barPercentage: 0.85, categoryPercentage: 0.9 }] },
      options: {
        indexAxis: 'y',
        responsive: true,
        maintainAspectRatio: false,
        plugins: {
          legend: { display: false },
          tooltip: {
            callbacks: {
              title: (items) => full[items[0]?.dataIndex ?? 0] ?? '',
              label: (item) => {
                const i = item.dataIndex;
                if (i === 0) return `${num(c.base)} (the forest’s average output)`;
                if (i === labels.length - 1) return `${num(c.prediction)} (this row’s prediction)`;
                const v = steps[i - 1].v;
                return `${v >= 0 ? '+' : '−'}${num(Math.abs(v))}`;
              },
            },
          },
        },
        scales: { x: { min: start, max: end, ticks: { callback: (v) => num(Number(v)) } }, y: { ticks: { autoSkip: false } } },
      },
    });
  }
}

function tableOf(c: RowContributions): HTMLElement {
  const rows = [...c.features]
    .map((f, j) => ({ ...f, j }))
    .sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution) || a.j - b.j)
    .map((f) => {
      const tr = h(
        'tr',
        {},
        h('th', { attrs: { scope: 'row' } }, f.feature),
        h('td', {}, f.value),
        h('td', { class: f.contribution >= 0 ? 'num up' : 'num down' }, `${f.contribution >= 0 ? '+' : '−'}${num(Math.abs(f.contribution))}`),
      );
      tr.dataset.feature = f.feature;
      return tr;
    });
  return h(
    'details',
    {},
    h('summary', {}, `All ${c.features.length} features as a table`),
    h(
      'table',
      { class: 'score-table', testid: 'contributions-table' },
      h('thead', {}, h('tr', {}, h('th', { attrs: { scope: 'col' } }, 'feature'), h('th', { attrs: { scope: 'col' } }, 'value here'), h('th', { attrs: { scope: 'col' } }, 'contribution'))),
      h('tbody', {}, ...rows),
      h('tfoot', {}, h('tr', {}, h('th', { attrs: { scope: 'row' } }, 'average output'), h('td', {}, ''), h('td', { class: 'num' }, num(c.base))), h('tr', {}, h('th', { attrs: { scope: 'row' } }, 'prediction'), h('td', {}, ''), h('td', { class: 'num' }, num(c.prediction)))),
    ),
  );
}
