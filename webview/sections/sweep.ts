// Features tried per split against out-of-bag error: the host refits the same data with a handful of
// counts and reports each forest's error; this draws them, marks the lowest and the count of the forest
// shown, and offers the one refit that would follow from it.
import type { HostToPanel, SweepSummary } from '../../src/protocol/messages';
import { applyTheme, replaceChart } from '../charts';
import { append, clear, custom, h } from '../dom';
import { count, fixed, num, percent } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

type SweepMessage = Extract<HostToPanel, { type: 'sweep' }>;

export interface SweepCallbacks {
  run(): void;
  cancel(): void;
  refit(featuresPerSplit: number): void;
}

export class SweepView {
  readonly root: HTMLElement;
  private readonly start: HTMLElement;
  private readonly cancel: HTMLElement;
  private readonly refit: HTMLElement;
  private readonly progress: HTMLProgressElement;
  private readonly status: HTMLElement;
  private readonly box: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly verdict: HTMLElement;
  private readonly table: HTMLElement;
  private theme: Theme | null = null;
  private message: SweepMessage | null = null;
  private result: SweepSummary | null = null;

  constructor(private readonly cb: SweepCallbacks) {
    this.start = custom('vscode-button', { testid: 'sweep', on: { click: () => this.cb.run() } }, 'Tune features per split by out-of-bag error');
    this.cancel = custom('vscode-button', { testid: 'sweep-cancel', attrs: { secondary: '' }, on: { click: () => this.cb.cancel() } }, 'Cancel');
    this.refit = custom('vscode-button', {
      testid: 'sweep-refit',
      on: {
        click: () => {
          if (this.result) this.cb.refit(this.result.best);
        },
      },
    });
    this.progress = h('progress', { attrs: { max: '1' } });
    this.status = h('span', { class: 'muted', attrs: { role: 'status' } });
    this.canvas = h('canvas', { attrs: { role: 'img', 'aria-label': 'Out-of-bag error by features per split' } });
    this.box = h('div', { class: 'chart-box' }, this.canvas);
    this.verdict = h('p', { testid: 'sweep-verdict' });
    this.table = h('div', {});
    this.root = h(
      'div',
      { class: 'sweep' },
      h(
        'p',
        { class: 'muted' },
        'Refits this data with several numbers of features tried at each split, same seed and settings otherwise, and compares their out-of-bag error, so no rows need to be held back to choose.',
      ),
      h('div', { class: 'controls' }, this.start, this.cancel, this.progress, this.status),
      this.box,
      this.verdict,
      h('div', { class: 'controls' }, this.refit),
      this.table,
    );
    this.draw();
  }

  /** A new fit: an older sweep is shown again only if the host re-sends it. */
  reset(): void {
    this.message = null;
    this.result = null;
    this.draw();
  }

  set(message: SweepMessage): void {
    this.message = message;
    if (message.result) this.result = message.result;
    else if (message.state === 'running') this.result = null;
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  private draw(): void {
    const m = this.message;
    const running = m?.state === 'running';
    this.start.classList.toggle('hidden', running);
    this.cancel.classList.toggle('hidden', !running);
    this.progress.classList.toggle('hidden', !running);
    if (running && m.progress !== null) this.progress.value = m.progress;
    else this.progress.removeAttribute('value');
    this.status.textContent = m?.text ?? '';
    this.status.classList.toggle('error', m?.state === 'error');
    const r = this.result;
    clear(this.verdict);
    clear(this.table);
    this.box.classList.toggle('hidden', !r);
    const offer = r !== null && r.current !== null && r.best !== r.current && !running;
    this.refit.classList.toggle('hidden', !offer);
    if (!r) return;
    const classification = r.task === 'classification';
    const fmt = (v: number) => (classification ? percent(v, 1) : num(v));
    const best = r.points.find((q) => q.featuresPerSplit === r.best)!;
    const now = r.current === null ? undefined : r.points.find((q) => q.featuresPerSplit === r.current);
    this.refit.textContent = `Fit again with ${r.best} features per split`;
    append(this.verdict, h('strong', {}, `Lowest out-of-bag error: ${fmt(best.oobError)} with ${r.best} of ${r.features} features per split.`));
    if (now && r.current !== r.best) append(this.verdict, ` The forest shown uses ${r.current}: ${fmt(now.oobError)}.`);
    else if (r.current === r.best) append(this.verdict, ' The forest shown already uses that count.');
    append(this.verdict, ' Differences of a fraction of a point are within the noise of one seed.');
    if (this.theme) this.chart(r, this.theme, fmt);
    append(this.table, tableOf(r, fmt));
  }

  private chart(r: SweepSummary, theme: Theme, fmt: (v: number) => string): void {
    applyTheme(theme);
    const points = r.points.map((q) => ({ x: q.featuresPerSplit, y: q.oobError }));
    const isBest = r.points.map((q) => q.featuresPerSplit === r.best);
    const isCurrent = r.points.map((q) => q.featuresPerSplit === r.current);
    replaceChart(this.canvas, {
      type: 'line',
      data: {
        datasets: [
          {
            data: points,
            borderColor: css(theme.focus),
            backgroundColor: isBest.map((b) => (b ? css(theme.foreground) : css(theme.focus))),
            pointBorderColor: isCurrent.map((c) => (c ? css(theme.foreground) : css(theme.focus))),
            pointBorderWidth: isCurrent.map((c) => (c ? 2.5 : 1)),
            pointRadius: isBest.map((b) => (b ? 7 : 4)),
            pointStyle: isBest.map((b) => (b ? 'rectRot' : 'circle')),
            borderWidth: 2,
          },
        ],
      },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        parsing: false,
        plugins: {
          legend: { display: false },
          tooltip: {
            callbacks: {
              title: (items) => `${items[0]?.parsed.x ?? ''} features per split`,
              label: (item) => {
                const q = r.points[item.dataIndex];
                const tags = [q.featuresPerSplit === r.best ? 'lowest' : '', q.featuresPerSplit === r.current ? 'forest shown' : ''].filter(Boolean);
                return `OOB error ${fmt(q.oobError)}${tags.length ? ` (${tags.join(', ')})` : ''}`;
              },
            },
          },
        },
        scales: {
          x: { type: 'linear', min: 1, max: r.features, title: { display: true, text: 'features tried per split' }, ticks: { precision: 0, stepSize: 1, autoSkip: true, maxTicksLimit: 12 } },
          y: { title: { display: true, text: r.task === 'classification' ? 'OOB error' : 'OOB MSE' }, ticks: { callback: (v) => fmt(Number(v)) } },
        },
      },
    });
  }
}

function tableOf(r: SweepSummary, fmt: (v: number) => string): HTMLElement {
  const scoreName = r.task === 'classification' ? 'OOB accuracy' : 'OOB R²';
  const rows = r.points.map((q) => {
    const tr = h(
      'tr',
      { class: q.featuresPerSplit === r.best ? 'best' : '' },
      h('th', { attrs: { scope: 'row' } }, count(q.featuresPerSplit), q.featuresPerSplit === r.best ? ' (lowest)' : '', q.featuresPerSplit === r.current ? ' (shown)' : ''),
      h('td', { class: 'num' }, fmt(q.oobError)),
      h('td', { class: 'num' }, r.task === 'classification' ? percent(q.oobScore, 1) : fixed(q.oobScore, 3)),
      h('td', { class: 'num' }, `${fixed(q.seconds, 1)} s`),
    );
    tr.dataset.count = String(q.featuresPerSplit);
    return tr;
  });
  return h(
    'details',
    {},
    h('summary', {}, 'Every forest tried'),
    h(
      'table',
      { class: 'score-table', testid: 'sweep-table' },
      h('thead', {}, h('tr', {}, ...['features per split', 'OOB error', scoreName, 'fit time'].map((t) => h('th', { attrs: { scope: 'col' } }, t)))),
      h('tbody', {}, ...rows),
    ),
  );
}
