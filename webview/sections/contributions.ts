// One row's prediction taken apart, table first: one sentence with where the forest starts and where
// this row ends up, then a table of features (name, this row's value, signed contribution) with a bar
// from a zero line in the last column, largest first. The host computes every number; the bars only
// redraw the numbers beside them, on one scale for the whole table.
import type { FitSummary, HostToPanel, RowContributions } from '../../src/protocol/messages';
import { append, clear, h } from '../dom';
import { count, num } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

/** Features listed one row each before the rest fold into one row; a wide table still reads at a glance. */
export const SHOWN_FEATURES = 8;

type ContributionsMessage = Extract<HostToPanel, { type: 'contributions' }>;

interface Line {
  feature: string;
  value: string;
  contribution: number;
}

export class ContributionsView {
  readonly root: HTMLElement;
  private readonly head: HTMLElement;
  private readonly body: HTMLElement;
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;
  private message: ContributionsMessage | null = null;
  /** The folded rows stay open across redraws of the same row (a theme change, say), not across rows. */
  private expandedRow: number | null = null;

  constructor() {
    this.head = h('p', { class: 'contrib-head', testid: 'contributions-head' });
    this.body = h('div', { class: 'contrib-body' });
    const note = h(
      'p',
      { class: 'muted' },
      'Each contribution is what knowing that feature’s value moved this prediction by; together they make up the step from the average to this row’s prediction. ' +
        'They are exact Shapley values of the trees (Lundberg et al. 2020).',
    );
    this.root = h('div', { class: 'contributions', testid: 'contributions' }, this.head, this.body, note);
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
    clear(this.body);
    const m = this.message;
    const c = m?.state === 'ready' ? m.contributions : null;
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
        ? h('span', {}, 'predicted ', h('strong', {}, s?.target ?? 'value'))
        : h('span', {}, c.scale ? `${c.scale} of ` : 'probability of ', h('strong', {}, s?.classes[c.output] ?? `class ${c.output}`));
    // A training row is explained by the trees that never saw it, as its out-of-bag answer is.
    const whose = c.outOfBag ? [` (explained by the ${count(c.trees)} trees that never saw it): their average `] : [c.scale ? ': the boosted ensemble’s average ' : ': the forest’s average '];
    append(
      this.head,
      h('strong', {}, `Row ${c.row}`),
      ...whose,
      what,
      ' is ',
      h('strong', { testid: 'contributions-base' }, num(c.base)),
      '; this row’s values take it to ',
      h('strong', { testid: 'contributions-prediction' }, num(c.prediction)),
      // A boosted ensemble is explained in its raw-score space; the probability that score gives stands beside it.
      c.scale && c.probability !== undefined ? h('span', { testid: 'contributions-probability' }, ` (probability ${num(c.probability)})`) : null,
      '.',
      c.scale ? h('span', { class: 'muted' }, ` Contributions are in ${c.scale}, the standard for boosted trees.`) : null,
    );
    if (this.theme) append(this.body, this.table(c, this.theme));
  }

  private table(c: RowContributions, theme: Theme): HTMLElement {
    const order: Line[] = c.features
      .map((f, j) => ({ ...f, j }))
      .sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution) || a.j - b.j);
    // Folding a single feature would hide a row behind a row: show it instead.
    const fold = order.length > SHOWN_FEATURES + 1;
    const shown = fold ? order.slice(0, SHOWN_FEATURES) : order;
    const rest = fold ? order.slice(SHOWN_FEATURES) : [];
    const restSum = rest.reduce((a, f) => a + f.contribution, 0);
    const scale = barScale([...order.map((f) => f.contribution), restSum]);
    const open = this.expandedRow === c.row;

    const body = h('tbody', {}, ...shown.map((f) => featureRow(f, scale, theme)));
    const folded = h('tbody', { class: open ? 'folded' : 'folded hidden', testid: 'contributions-folded' }, ...rest.map((f) => featureRow(f, scale, theme)));
    folded.id = `contrib-folded-${c.row}`;
    const parts: HTMLElement[] = [body];
    if (fold) {
      const toggle = h(
        'button',
        {
          class: 'fold-toggle',
          testid: 'contributions-expand',
          attrs: { type: 'button', 'aria-expanded': String(open), 'aria-controls': folded.id },
          title: open ? 'Fold these features back into one row' : 'List these features one row each',
          on: {
            click: () => {
              this.expandedRow = this.expandedRow === c.row ? null : c.row;
              this.draw();
            },
          },
        },
        `${open ? '▾' : '▸'} ${count(rest.length)} other features`,
      );
      const others = h(
        'tr',
        { class: 'others', testid: 'contributions-others' },
        h('th', { attrs: { scope: 'row' } }, toggle),
        h('td', { class: 'muted' }, open ? 'listed below' : 'combined'),
        h('td', { class: 'num' }, signed(restSum)),
        barCell(restSum, scale, theme, true),
      );
      body.appendChild(others);
      parts.push(folded);
    }
    return h(
      'table',
      { class: 'contrib-table', testid: 'contributions-table' },
      h(
        'thead',
        {},
        h(
          'tr',
          {},
          h('th', { attrs: { scope: 'col' } }, 'Feature'),
          h('th', { attrs: { scope: 'col' } }, 'Value in this row'),
          h('th', { class: 'num', attrs: { scope: 'col' } }, 'Contribution'),
          axisHead(scale),
        ),
      ),
      ...parts,
    );
  }
}

/** Where zero sits along the bar column (0..1) and how much one full column width is worth. */
interface Scale {
  zero: number;
  low: number;
  high: number;
}

/** One scale for every bar, its axis starting at zero: the column spans the largest fall to the largest rise. */
function barScale(values: number[]): Scale {
  const low = Math.min(0, ...values);
  const high = Math.max(0, ...values);
  const span = high - low || 1;
  return { zero: -low / span, low, high: low === high ? 1 : high };
}

function at(v: number, s: Scale): number {
  const span = s.high - s.low || 1;
  return (v - s.low) / span;
}

function featureRow(f: Line, scale: Scale, theme: Theme): HTMLElement {
  const tr = h(
    'tr',
    {},
    h('th', { attrs: { scope: 'row' } }, f.feature),
    h('td', { class: 'value' }, f.value),
    h('td', { class: 'num' }, signed(f.contribution)),
    barCell(f.contribution, scale, theme, false),
  );
  tr.dataset.feature = f.feature;
  return tr;
}

function barCell(v: number, scale: Scale, theme: Theme, combined: boolean): HTMLElement {
  const track = h('span', { class: 'contrib-track', attrs: { 'aria-hidden': 'true' } });
  const zero = h('span', { class: 'contrib-zero' });
  zero.style.left = `${100 * scale.zero}%`;
  const bar = h('span', { class: combined ? 'contrib-bar combined' : 'contrib-bar' });
  const a = at(Math.min(0, v), scale);
  const b = at(Math.max(0, v), scale);
  bar.style.left = `${100 * a}%`;
  bar.style.width = `${100 * (b - a)}%`;
  bar.style.backgroundColor = css(v >= 0 ? theme.increase : theme.decrease, combined ? 0.55 : 1);
  bar.dataset.sign = v >= 0 ? 'raises' : 'lowers';
  append(track, bar, zero);
  return h('td', { class: 'bar-cell' }, track);
}

/**
 * The bar column's header is its axis: numbers at the ends and at zero, and under them which way
 * lowers and which way raises. An end number too close to zero to fit beside it is left out; the
 * contribution column still carries every value.
 */
function axisHead(scale: Scale): HTMLElement {
  const place = (row: HTMLElement, text: string, where: number, align: 'start' | 'mid' | 'end') => {
    const t = h('span', { class: `tick ${align}` }, text);
    t.style.left = `${100 * where}%`;
    row.appendChild(t);
  };
  const numbers = h('span', { class: 'contrib-axis' });
  const words = h('span', { class: 'contrib-axis words muted' });
  const roomy = (gap: number) => gap >= 0.2;
  if (scale.low < 0 && roomy(scale.zero)) place(numbers, signed(scale.low), 0, 'start');
  place(numbers, '0', scale.zero, scale.zero <= 0.02 ? 'start' : scale.zero >= 0.98 ? 'end' : 'mid');
  if (scale.high > 0 && scale.zero < 1 && roomy(1 - scale.zero)) place(numbers, signed(scale.high), 1, 'end');
  if (scale.low < 0) place(words, '◂ lowers', scale.zero, 'end');
  if (scale.high > 0 && scale.zero < 1) place(words, 'raises ▸', scale.zero, 'start');
  return h(
    'th',
    { class: 'bar-head', attrs: { scope: 'col', 'aria-label': 'Contribution drawn from zero: to the left lowers the prediction, to the right raises it' } },
    numbers,
    words,
  );
}

function signed(v: number): string {
  return `${v >= 0 ? '+' : '−'}${num(Math.abs(v))}`;
}
