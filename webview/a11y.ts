// Accessibility helpers for every panel section. A picture (canvas, chart, strip) gets an accessible name
// and a text equivalent: a sentence anyone can read and the table behind it, folded in a <details> so it
// costs no space until asked for. vscode-elements controls take their names through `nameControl`,
// because their inner combobox or input sits in a shadow root where an aria-label on the host does not reach.
import { append, clear, h, type Child } from './dom';

let nextId = 0;

/** A unique id for aria-describedby / aria-labelledby links. */
export function uniqueId(prefix: string): string {
  return `${prefix}-${++nextId}`;
}

/** Text only assistive technology reads (hidden visually, still in the accessibility tree). */
export function visuallyHidden(...children: Child[]): HTMLElement {
  return h('span', { class: 'visually-hidden' }, ...children);
}

/** Names a vscode-single-select / vscode-textfield (their `label` reaches the inner control) or any element. */
export function nameControl<T extends HTMLElement>(el: T, name: string): T {
  el.setAttribute('aria-label', name);
  if (el.tagName.startsWith('VSCODE-')) el.setAttribute('label', name);
  return el;
}

export interface TextTable {
  caption: string;
  /** Header of the first column (what the row headers are). */
  corner: string;
  columns: string[];
  rows: Array<{ head: string; cells: string[] }>;
}

/**
 * The text equivalent of a picture: `summary` (a sentence, shown) and `table` (folded). Call `set` on every
 * redraw; `describe(el)` points an element's aria-describedby at the sentence.
 */
export class PictureText {
  readonly root: HTMLElement;
  private readonly sentence: HTMLElement;
  private readonly details: HTMLDetailsElement;
  private readonly tableBox: HTMLElement;
  private readonly toggle: HTMLElement;

  constructor(testid: string, toggleText = 'Show the numbers as a table') {
    this.sentence = h('p', { class: 'picture-summary', attrs: { id: uniqueId(testid) } });
    this.toggle = h('summary', {}, toggleText);
    this.tableBox = h('div', { class: 'picture-table' });
    this.details = h('details', { class: 'picture-details' }, this.toggle, this.tableBox);
    this.root = h('div', { class: 'picture-text', testid }, this.sentence, this.details);
  }

  describe(el: HTMLElement, name: string): void {
    if (el instanceof HTMLCanvasElement) el.setAttribute('role', 'img');
    el.setAttribute('aria-label', name);
    el.setAttribute('aria-describedby', this.sentence.id);
  }

  set(summary: string, table: TextTable | null): void {
    this.sentence.textContent = summary;
    clear(this.tableBox);
    this.details.classList.toggle('hidden', table === null);
    if (!table) return;
    append(this.tableBox, dataTable(table));
  }
}

/** A plain data table with row and column headers (scope set, so a screen reader announces both). */
export function dataTable(t: TextTable): HTMLTableElement {
  return h(
    'table',
    { class: 'data-table' },
    h('caption', {}, t.caption),
    h('thead', {}, h('tr', {}, h('th', { attrs: { scope: 'col' } }, t.corner), ...t.columns.map((c) => h('th', { attrs: { scope: 'col' } }, c)))),
    h('tbody', {}, ...t.rows.map((r) => h('tr', {}, h('th', { attrs: { scope: 'row' } }, r.head), ...r.cells.map((c) => h('td', {}, c))))),
  );
}
