// A boosted ensemble's trees on one row: they do not vote, each adds a raw score. Two strips in tree order share
// their columns: each tree's own raw output as a signed bar from zero (the increase colour raises the score,
// the decrease colour lowers it), and under it the running total from the base score, a step per tree, with
// zero marked. Position and sign carry the numbers; the head says them in words.
import type { FitSummary, RowVotes } from '../../src/protocol/messages';
import { h } from '../dom';
import { num } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

const BAR_HEIGHT = 56;
const TOTAL_HEIGHT = 56;

export function boostedBlock(r: RowVotes, summary: FitSummary, theme: Theme, reveal: (row: number) => void, explain: (row: number) => void): HTMLElement {
  const b = r.boosted!;
  const classification = summary.task === 'classification';
  const cls = (k: number) => summary.classes[k] ?? `class ${k}`;
  const k = b.shown;
  const of = classification ? ` of “${cls(k)}”` : '';
  const head = h(
    'div',
    { class: 'vote-head' },
    h('button', { class: 'row-link', attrs: { type: 'button' }, title: 'Show this row in the editor', on: { click: () => reveal(r.row) } }, `Row ${r.row}`),
    stat('label', r.label === null ? 'n/a' : classification ? cls(r.label) : num(r.label)),
    stat('predicted', classification ? cls(r.allPredicted) : num(r.allPredicted)),
    b.probability !== null ? stat('probability', h('span', { testid: 'boosted-probability' }, num(b.probability))) : null,
    stat(`${b.scale}${of}`, h('span', { testid: 'boosted-total' }, `${signed(b.base[k])} → ${signed(b.total[k])}`)),
    stat('agreement', h('span', { class: 'muted', title: 'Boosted trees add raw scores; they do not vote, so there is no agreement to count.' }, 'not applicable')),
    h('button', { class: 'row-link', testid: 'explain-row', attrs: { type: 'button' }, title: 'Chart how each feature moved this row’s raw score', on: { click: () => explain(r.row) } }, 'Explain'),
  );
  // A multiclass tree adds to one class: the strips follow the shown class's trees, the others are left blank.
  const mine = b.output.map((o) => o === k);
  const rawMax = Math.max(0, ...b.raw.filter((_, t) => mine[t]));
  const rawMin = Math.min(0, ...b.raw.filter((_, t) => mine[t]));
  const totals = [b.base[k], ...b.cumulative.filter((_, t) => mine[t])];
  const totMax = Math.max(0, ...totals);
  const totMin = Math.min(0, ...totals);
  const bars = track('raw-bars', BAR_HEIGHT);
  const steps = track('raw-total', TOTAL_HEIGHT);
  const y = (v: number, lo: number, hi: number) => (hi > lo ? (hi - v) / (hi - lo) : 0.5);
  zero(bars, y(0, rawMin, rawMax), theme);
  zero(steps, y(0, totMin, totMax), theme);
  b.raw.forEach((v, t) => {
    const col = h('span', { class: 'raw-col', title: `tree ${t + 1}${classification && summary.classes.length > 2 ? ` (adds to “${cls(b.output[t])}”)` : ''}: ${signed(v)}; running total ${signed(b.cumulative[t])}` });
    col.dataset.tree = String(t);
    col.dataset.raw = String(v);
    col.dataset.total = String(b.cumulative[t]);
    bars.appendChild(col);
    const stepCol = col.cloneNode(false) as HTMLElement;
    steps.appendChild(stepCol);
    if (!mine[t]) return;
    const top = y(Math.max(0, v), rawMin, rawMax);
    const bottom = y(Math.min(0, v), rawMin, rawMax);
    const bar = h('span', { class: 'raw-bar' });
    bar.style.top = `${100 * top}%`;
    bar.style.height = `max(1px, ${100 * (bottom - top)}%)`;
    bar.style.backgroundColor = css(v >= 0 ? theme.increase : theme.decrease);
    col.appendChild(bar);
    const mark = h('span', { class: 'raw-step' });
    mark.style.top = `${100 * y(b.cumulative[t], totMin, totMax)}%`;
    mark.style.backgroundColor = css(theme.foreground, 0.85);
    stepCol.appendChild(mark);
  });
  const n = mine.filter(Boolean).length;
  const strip = h(
    'div',
    { class: 'raw-strip', testid: 'vote-strip', attrs: { 'data-trees': String(r.votes.length), role: 'img' } },
    h('span', { class: 'lane-name muted' }, `each tree adds (${num(rawMin)} to ${num(rawMax)})`),
    bars,
    h('span', { class: 'lane-name muted' }, `running total (${num(totMin)} to ${num(totMax)})`),
    steps,
  );
  strip.setAttribute(
    'aria-label',
    `${n} trees’ raw outputs${of} for row ${r.row}, from ${num(rawMin)} to ${num(rawMax)}; the running total goes from the base ${num(b.base[k])} to ${num(b.total[k])}`,
  );
  const block = h('div', { class: 'vote-row boosted' }, head, strip);
  block.dataset.row = String(r.row);
  return block;
}

/** The note under the list for a boosted ensemble. */
export function boostedNote(summary: FitSummary, scale: string): string {
  const units = summary.task === 'classification' ? `its raw score (${scale}), which the link turns into the probability` : 'the value';
  return `Boosted trees do not vote: each column is one tree, in order. The bar is what that tree adds to ${units}; the step under it is the running total after that tree, from the base score. Out-of-bag answers and agreement do not apply.`;
}

function track(testid: string, height: number): HTMLElement {
  const t = h('span', { class: 'raw-track', testid });
  t.style.height = `${height}px`;
  return t;
}

function zero(t: HTMLElement, at: number, theme: Theme): void {
  const line = h('span', { class: 'raw-zero' });
  line.style.top = `${100 * at}%`;
  line.style.borderColor = css(theme.foreground, 0.5);
  t.appendChild(line);
}

function signed(v: number): string {
  return `${v >= 0 ? '+' : ''}${num(v)}`;
}

function stat(name: string, ...value: Array<Node | string | null>): HTMLElement {
  return h('span', { class: 'stat' }, h('span', { class: 'muted' }, `${name} `), ...value);
}
