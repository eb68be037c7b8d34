// Two classes: where to put the decision threshold. A slider (in steps of 0.01) and presets chosen by core
// on out-of-bag rows; the confusion table, precision, recall and the share flagged are read from core's
// per-threshold tallies (counts of rows flagged), for out-of-bag rows and, beside them, the held-out ones.
import type { FitSummary, ThresholdsView } from '../../src/protocol/messages';
import { append, clear, custom, h } from '../dom';
import { count, fixed, percent } from '../format';

const STEPS = 100;

interface Reading {
  tn: number;
  fp: number;
  fn: number;
  tp: number;
  precision: number | null;
  recall: number | null;
  flagged: number | null;
}

/** The tally at a threshold as a table: counts straight from core, and the three ratios of them. */
function readAt(t: ThresholdsView, threshold: number): Reading | null {
  const x = t.tallies.find((a) => Math.round(a.threshold * STEPS) === Math.round(threshold * STEPS));
  if (!x) return null;
  const flagged = x.truePositives + x.falsePositives;
  const rows = t.positives + t.negatives;
  return {
    tn: t.negatives - x.falsePositives,
    fp: x.falsePositives,
    fn: t.positives - x.truePositives,
    tp: x.truePositives,
    precision: flagged ? x.truePositives / flagged : null,
    recall: t.positives ? x.truePositives / t.positives : null,
    flagged: rows ? flagged / rows : null,
  };
}

export class ThresholdView {
  readonly root: HTMLElement;
  private readonly slider: HTMLInputElement;
  private readonly value: HTMLElement;
  private readonly presets: HTMLElement;
  private readonly tables: HTMLElement;
  private readonly note: HTMLElement;
  private oob: ThresholdsView | null = null;
  private held: ThresholdsView | null = null;
  private heldName = 'held out';
  private classes: string[] = [];

  constructor() {
    this.slider = h('input', { testid: 'threshold-slider', attrs: { type: 'range', min: '0', max: String(STEPS), step: '1', value: '50', 'aria-label': 'Decision threshold' } });
    this.slider.addEventListener('input', () => this.draw());
    this.value = h('output', { testid: 'threshold-value', class: 'threshold-value' });
    this.presets = h('div', { class: 'presets', testid: 'threshold-presets' });
    this.tables = h('div', { class: 'threshold-tables' });
    this.note = h('p', { class: 'muted', testid: 'threshold-note' });
    this.root = h(
      'div',
      { class: 'threshold hidden', testid: 'threshold' },
      h('h3', {}, 'Decision threshold'),
      h('div', { class: 'threshold-row' }, h('label', { class: 'field' }, h('span', { testid: 'threshold-label' }, 'Flag a row when its probability exceeds'), this.slider), this.value),
      this.presets,
      this.tables,
      this.note,
    );
  }

  setSummary(s: FitSummary, oob: ThresholdsView | null, held: ThresholdsView | null): void {
    this.oob = oob;
    this.held = held;
    this.classes = s.classes;
    this.heldName = s.heldOut?.from === 'test' ? 'test file' : 'held out';
    this.root.classList.toggle('hidden', !oob && !held);
    this.slider.value = '50';
    clear(this.presets);
    const source = oob ?? held;
    for (const p of source?.presets ?? []) {
      const name = p.kind === 'balanced-accuracy' ? 'Best balanced accuracy' : `${p.kind === 'recall' ? 'Recall' : 'Precision'} ≥ ${fixed(p.target, 2)}`;
      const button = custom('vscode-button', { testid: `threshold-preset-${p.kind}`, attrs: { secondary: '' } }, p.threshold === null ? `${name}: not reached` : `${name} (${fixed(p.threshold, 2)})`);
      if (p.threshold === null) button.setAttribute('disabled', '');
      else {
        const at = p.threshold;
        button.addEventListener('click', () => {
          this.slider.value = String(Math.round(at * STEPS));
          this.draw();
        });
      }
      append(this.presets, button);
    }
    this.draw();
  }

  /** The tables take their colours from the stylesheet; a theme change only needs them drawn again. */
  setTheme(): void {
    this.draw();
  }

  private draw(): void {
    const source = this.oob ?? this.held;
    if (!source) return;
    const threshold = Number(this.slider.value) / STEPS;
    this.value.textContent = fixed(threshold, 2);
    const positive = source.positiveClass;
    const negative = this.classes.find((c) => c !== positive) ?? '';
    clear(this.tables);
    if (this.oob) append(this.tables, table('out-of-bag', 'oob', readAt(this.oob, threshold), negative, positive));
    if (this.held) append(this.tables, table(this.heldName, 'held', readAt(this.held, threshold), negative, positive));
    clear(this.note);
    append(
      this.note,
      `A row is given “${positive}” when its probability of “${positive}” exceeds the threshold; 0.50 gives the usual answer. ` +
        (this.oob
          ? `The presets were chosen on the out-of-bag curve, so out-of-bag figures flatter them a little; ${this.held ? `the ${this.heldName} rows are the honest check` : 'hold out rows (or score a test file) for an honest check'}. `
          : '') +
        'copse predict --threshold applies the same rule.',
    );
  }
}

function table(name: string, id: string, r: Reading | null, negative: string, positive: string): HTMLElement {
  if (!r) return h('p', { class: 'muted' }, `${name}: no rows`);
  const cell = (n: number, testid: string, diag: boolean) => h('td', { testid: `threshold-${id}-${testid}`, class: diag ? 'diag' : '' }, count(n));
  return h(
    'figure',
    { testid: `threshold-${id}` },
    h('figcaption', {}, `${name} rows`),
    h(
      'table',
      { class: 'confusion-table threshold-confusion' },
      h('tr', {}, h('th', { class: 'corner muted' }, 'true ↓ / given →'), h('th', {}, negative), h('th', {}, positive)),
      h('tr', {}, h('th', { attrs: { scope: 'row' } }, negative), cell(r.tn, 'tn', true), cell(r.fp, 'fp', false)),
      h('tr', {}, h('th', { attrs: { scope: 'row' } }, positive), cell(r.fn, 'fn', false), cell(r.tp, 'tp', true)),
    ),
    h(
      'p',
      { class: 'threshold-figures', testid: `threshold-${id}-figures` },
      `precision ${percent(r.precision)} · recall ${percent(r.recall)} · flags ${percent(r.flagged)} of rows`,
    ),
  );
}
