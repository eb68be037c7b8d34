// Every training row with its out-of-bag answer, as a table the reader can sort, filter and scroll through a
// hundred thousand rows of. The host holds the rows and answers pages (src/core/summary/rows-table.ts); this
// view draws only the rows in sight, at a fixed height, so scrolling costs the same whatever the file's size.
// It is the one way into the rows of a file without text lines (Parquet), so pointing at a row shows its votes
// and selecting rows drives the disagreement view, as the editor's cursor does for a CSV.
import type { FitSummary, RowsTablePage, RowsTableQuery, RowsTableRequest, RowsTableRow, RowsTableSortKey, RowVotes } from '../../src/protocol/messages';
import { LIMITS } from '../../src/protocol/messages';
import { append, clear, h } from '../dom';
import { count, fixed, num, percent } from '../format';
import type { Theme } from '../theme';
import { VotesView } from './votes';

/** One row's height in pixels: fixed, so a position in the view is a scroll offset and nothing is measured. */
export const ROW_HEIGHT = 26;
/** Rows asked for at once; well under the host's cap, a few screens' worth. */
const PAGE = 200;
/** Rows drawn beyond each edge of the viewport, so a quick flick does not show blank rows. */
const OVERSCAN = 8;
/** A pointer passing over rows should not ask for every row's votes on its way. */
const PEEK_DELAY_MS = 150;

export interface RowsTableHooks {
  page(request: RowsTableRequest): void;
  peek(row: number): void;
  select(rows: number[], selected: number): void;
  reveal(row: number): void;
  explain(row: number): void;
}

interface Column {
  readonly key: RowsTableSortKey;
  readonly name: string;
  readonly title: string;
  readonly numeric: boolean;
}

const everyRow = (): RowsTableQuery => ({ sort: 'row', descending: false, doubtfulOnly: false, labelClass: null, mismatchOnly: false });

export class RowsTableView {
  readonly root: HTMLElement;
  private readonly head: HTMLElement;
  private readonly scroller: HTMLElement;
  private readonly body: HTMLElement;
  private readonly filters: HTMLElement;
  private readonly countLine: HTMLElement;
  private readonly peekBox: HTMLElement;
  private readonly peekView: VotesView;
  private summary: FitSummary | null = null;
  private query: RowsTableQuery = everyRow();
  /** Rows in the filtered view; -1 until the first page arrives. */
  private total = -1;
  private readonly pages = new Map<number, readonly RowsTableRow[]>();
  private readonly asked = new Set<number>();
  private readonly drawn = new Map<number, HTMLElement>();
  /** Selected data rows, in the order they were picked (the first is the one explained). */
  private selected = new Set<number>();
  /** View position a shift-selection extends from, and the row keyboard focus rests on. */
  private anchor = 0;
  private focusAt = 0;
  private peekTimer: ReturnType<typeof setTimeout> | undefined;
  private peeked: number | null = null;
  private frame = 0;

  constructor(private readonly hooks: RowsTableHooks) {
    this.filters = h('div', { class: 'rows-filters controls' });
    this.countLine = h('p', { class: 'muted', testid: 'rows-count', attrs: { 'aria-live': 'polite' } });
    this.head = h('div', { class: 'rows-line rows-head', attrs: { role: 'row', 'aria-rowindex': '1' } });
    this.body = h('div', { class: 'rows-body', attrs: { role: 'rowgroup' } });
    this.scroller = h(
      'div',
      {
        class: 'rows-scroller',
        testid: 'rows-grid',
        attrs: { role: 'grid', 'aria-multiselectable': 'true', 'aria-label': 'Training rows with their out-of-bag answers', tabindex: '-1' },
        on: { scroll: () => this.schedule(), keydown: (e) => this.key(e) },
      },
      h('div', { class: 'rows-headgroup', attrs: { role: 'rowgroup' } }, this.head),
      this.body,
    );
    this.peekView = new VotesView((row) => hooks.reveal(row), (row) => hooks.explain(row));
    // The same drawing as the disagreement view, under its own names, so a test or a reader finds each once.
    for (const el of [this.peekView.root, ...this.peekView.root.querySelectorAll<HTMLElement>('[data-testid]')]) el.dataset.testid = `peek-${el.dataset.testid}`;
    this.peekBox = h('div', { class: 'rows-peek hidden', testid: 'rows-peek' }, h('h3', {}, 'Votes of the row pointed at'), this.peekView.root);
    this.root = h(
      'div',
      { class: 'rows-table', testid: 'rows-table' },
      this.filters,
      this.countLine,
      this.scroller,
      h(
        'p',
        { class: 'muted rows-hint' },
        'Arrow keys move between rows; Space or Enter selects (Shift extends, Ctrl adds); Alt+Enter goes to the row’s line in a text file. ',
        'Out-of-bag answers come from a quick, exploratory forest: validate it before decisions that affect people, and follow local rules and qualified review where health, money or safety are at stake.',
      ),
      this.peekBox,
    );
  }

  /** A new fit starts the table afresh (unsorted, unfiltered, nothing selected); the same fit asks again for what is in sight. */
  setSummary(s: FitSummary): void {
    const fresh = this.summary?.fit !== s.fit;
    this.summary = s;
    this.peekView.setSummary(s);
    if (fresh) {
      this.query = everyRow();
      this.selected = new Set();
      this.anchor = this.focusAt = 0;
      this.scroller.scrollTop = 0;
      this.setPeek(null);
    }
    this.drawFilters();
    this.restart();
  }

  setTheme(theme: Theme): void {
    this.peekView.setTheme(theme);
  }

  setPage(query: RowsTableQuery, page: RowsTablePage): void {
    if (JSON.stringify(query) !== JSON.stringify(this.query)) return;
    const index = Math.floor(page.offset / PAGE);
    this.pages.set(index, page.rows);
    if (page.total !== this.total) {
      this.total = page.total;
      this.body.style.height = `${this.total * ROW_HEIGHT}px`;
      this.scroller.setAttribute('aria-rowcount', String(this.total + 1));
      this.drawCount();
    }
    for (const [pos, el] of this.drawn) if (Math.floor(pos / PAGE) === index) this.forget(pos, el);
    this.draw();
  }

  /** The pointed-at row's votes, drawn as the disagreement view draws a selected row. */
  setPeek(votes: RowVotes | null): void {
    this.peekBox.classList.toggle('hidden', votes === null);
    this.peekView.setRows(votes ? [votes] : []);
  }

  private restart(): void {
    this.pages.clear();
    this.asked.clear();
    for (const [pos, el] of this.drawn) this.forget(pos, el);
    this.total = -1;
    this.drawHead();
    this.drawCount();
    this.draw();
  }

  private columns(): Column[] {
    const classification = this.summary?.task === 'classification';
    return [
      { key: 'row', name: 'row', title: 'Data row in the file (first row after the header is 1); the line link opens it in a text file', numeric: false },
      { key: 'label', name: 'label', title: 'The row’s own target', numeric: !classification },
      { key: 'predicted', name: 'out-of-bag', title: 'What the trees that never saw the row predict', numeric: !classification },
      classification
        ? { key: 'agreement', name: 'agreement', title: 'Share of the out-of-bag trees’ averaged vote that goes to their prediction', numeric: true }
        : { key: 'residual', name: 'residual', title: 'Label minus out-of-bag prediction', numeric: true },
      classification
        ? { key: 'margin', name: 'margin', title: 'Share of out-of-bag votes for the label minus the largest share for any other class; negative is doubtful', numeric: true }
        : { key: 'margin', name: 'z', title: 'The residual in robust standard deviations from the median residual; beyond 3.5 is doubtful', numeric: true },
    ];
  }

  private drawHead(): void {
    clear(this.head);
    for (const c of this.columns()) {
      const sorted = this.query.sort === c.key;
      const button = h(
        'button',
        { class: 'rows-sort', attrs: { type: 'button' }, title: `${c.title}. Click to sort.`, on: { click: () => this.sortBy(c.key) } },
        c.name,
        h('span', { class: 'rows-arrow', attrs: { 'aria-hidden': 'true' } }, sorted ? (this.query.descending ? ' ▼' : ' ▲') : ''),
      );
      const cell = h('div', { class: c.numeric ? 'rows-cell num' : 'rows-cell', attrs: { role: 'columnheader', 'aria-sort': sorted ? (this.query.descending ? 'descending' : 'ascending') : 'none' } }, button);
      cell.dataset.key = c.key;
      this.head.appendChild(cell);
    }
  }

  private drawFilters(): void {
    clear(this.filters);
    const s = this.summary;
    if (!s) return;
    const check = (label: string, testid: string, on: boolean, set: (v: boolean) => void) => {
      const box = h('input', { testid, attrs: { type: 'checkbox' }, on: { change: () => set(box.checked) } });
      box.checked = on;
      return h('label', { class: 'rows-filter' }, box, ` ${label}`);
    };
    append(this.filters, check('Doubtful only', 'rows-doubtful', this.query.doubtfulOnly, (v) => this.refilter({ doubtfulOnly: v })));
    if (s.task !== 'classification') return;
    append(this.filters, check('Prediction differs from label', 'rows-mismatch', this.query.mismatchOnly, (v) => this.refilter({ mismatchOnly: v })));
    const pick = h('select', { testid: 'rows-class', on: { change: () => this.refilter({ labelClass: pick.value === '' ? null : Number(pick.value) }) } });
    append(pick, h('option', { attrs: { value: '' } }, 'every class'), ...s.classes.map((c, k) => h('option', { attrs: { value: String(k) } }, c)));
    pick.value = this.query.labelClass === null ? '' : String(this.query.labelClass);
    append(this.filters, h('label', { class: 'rows-filter' }, 'Label ', pick));
  }

  private drawCount(): void {
    clear(this.countLine);
    if (this.total < 0) append(this.countLine, 'Asking for the rows…');
    else if (this.total === 0) append(this.countLine, 'No training row matches these filters.');
    else append(this.countLine, `${count(this.total)} training rows${this.filtered() ? ' match' : ''}. Selected: ${count(this.selected.size)}.`);
  }

  private filtered(): boolean {
    return this.query.doubtfulOnly || this.query.mismatchOnly || this.query.labelClass !== null;
  }

  private sortBy(key: RowsTableSortKey): void {
    // A second click on the sorted column turns it round; a new column starts with the most telling end (lowest margin first).
    this.query = { ...this.query, sort: key, descending: this.query.sort === key ? !this.query.descending : key === 'agreement' || key === 'residual' };
    this.afterQuery();
  }

  private refilter(change: Partial<RowsTableQuery>): void {
    this.query = { ...this.query, ...change };
    this.afterQuery();
  }

  private afterQuery(): void {
    this.anchor = this.focusAt = 0;
    this.scroller.scrollTop = 0;
    this.restart();
  }

  private schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.draw();
    });
  }

  /** The positions in sight (with overscan), clipped to the view. */
  private window(): [number, number] {
    const top = Math.max(0, this.scroller.scrollTop - this.head.offsetHeight);
    const first = Math.max(0, Math.floor(top / ROW_HEIGHT) - OVERSCAN);
    const shown = Math.ceil(this.scroller.clientHeight / ROW_HEIGHT) + 2 * OVERSCAN;
    const end = this.total < 0 ? PAGE : Math.min(this.total, first + shown);
    return [first, end];
  }

  private draw(): void {
    if (!this.summary) return;
    const [first, end] = this.window();
    for (let p = Math.floor(first / PAGE); p <= Math.floor(Math.max(first, end - 1) / PAGE); p++) this.ask(p);
    // The next page too, so scrolling on finds it already here.
    if (this.total > 0 && end + PAGE / 2 < this.total) this.ask(Math.floor((end + PAGE / 2) / PAGE));
    for (const [pos, el] of this.drawn) if (pos < first || pos >= end) this.forget(pos, el);
    if (this.total <= 0) return;
    for (let pos = first; pos < end; pos++) if (!this.drawn.has(pos)) this.drawRow(pos);
    // Keyboard focus needs one row to land on when Tab enters the grid.
    const tabbable = this.drawn.get(this.focusAt) ?? this.drawn.get(first);
    for (const el of this.drawn.values()) el.tabIndex = el === tabbable ? 0 : -1;
  }

  private ask(page: number): void {
    if (this.asked.has(page) || (this.total >= 0 && page * PAGE >= this.total)) return;
    this.asked.add(page);
    this.hooks.page({ query: this.query, offset: page * PAGE, limit: PAGE });
  }

  private rowAt(pos: number): RowsTableRow | undefined {
    return this.pages.get(Math.floor(pos / PAGE))?.[pos % PAGE];
  }

  private forget(pos: number, el: HTMLElement): void {
    el.remove();
    this.drawn.delete(pos);
  }

  private drawRow(pos: number): void {
    const r = this.rowAt(pos);
    const s = this.summary as FitSummary;
    const el = h('div', { class: 'rows-line', attrs: { role: 'row', 'aria-rowindex': String(pos + 2) } });
    el.style.transform = `translateY(${pos * ROW_HEIGHT}px)`;
    el.dataset.pos = String(pos);
    this.drawn.set(pos, el);
    this.body.appendChild(el);
    if (!r) {
      el.setAttribute('aria-busy', 'true');
      append(el, h('div', { class: 'rows-cell muted', attrs: { role: 'gridcell' } }, '…'));
      return;
    }
    const classification = s.task === 'classification';
    const say = (v: number | null) => (v === null ? '—' : classification ? (s.classes[v] ?? `class ${v}`) : num(v));
    const cell = (text: Node | string, numeric: boolean) => h('div', { class: numeric ? 'rows-cell num' : 'rows-cell', attrs: { role: 'gridcell' } }, text);
    const line = r.line;
    const rowCell =
      line === null
        ? `${r.row}`
        : h('span', {}, `${r.row} `, h('button', { class: 'row-link rows-line-link', attrs: { type: 'button', tabindex: '-1' }, title: `Open line ${line} in the editor`, on: { click: (e) => { e.stopPropagation(); this.hooks.reveal(r.row); } } }, `line ${line}`));
    append(
      el,
      cell(rowCell, false),
      cell(say(r.label), !classification),
      cell(say(r.predicted), !classification),
      cell(classification ? percent(r.agreement, 0) : r.residual === null ? '—' : num(r.residual), true),
      cell(r.margin === null ? '—' : fixed(r.margin, 2), true),
    );
    el.dataset.row = String(r.row);
    el.classList.toggle('doubtful', r.doubtful);
    el.classList.toggle('missed', classification && r.predicted !== null && r.label !== null && r.predicted !== r.label);
    el.setAttribute('aria-label', `Row ${r.row}: label ${say(r.label)}, out-of-bag ${say(r.predicted)}${r.doubtful ? ', doubtful' : ''}`);
    this.markSelected(el, r.row);
    el.addEventListener('click', (e) => this.choose(pos, e.shiftKey, e.ctrlKey || e.metaKey));
    el.addEventListener('mouseenter', () => this.peekSoon(r.row));
    el.addEventListener('focus', () => {
      this.focusAt = pos;
      this.peekSoon(r.row);
    });
  }

  private markSelected(el: HTMLElement, row: number): void {
    const on = this.selected.has(row);
    el.classList.toggle('selected', on);
    el.setAttribute('aria-selected', String(on));
  }

  private refreshSelection(): void {
    for (const el of this.drawn.values()) if (el.dataset.row) this.markSelected(el, Number(el.dataset.row));
    this.drawCount();
  }

  private peekSoon(row: number): void {
    clearTimeout(this.peekTimer);
    if (row === this.peeked) return;
    this.peekTimer = setTimeout(() => {
      this.peeked = row;
      this.hooks.peek(row);
    }, PEEK_DELAY_MS);
  }

  /** Click or Space/Enter: one row, a range from the anchor (Shift), or one more or fewer (Ctrl). */
  private choose(pos: number, extend: boolean, toggle: boolean): void {
    const r = this.rowAt(pos);
    if (!r) return;
    this.focusAt = pos;
    if (extend) {
      // Only rows already here can join a range; the pages around the viewport always are.
      const next = new Set<number>(toggle ? this.selected : []);
      const step = pos >= this.anchor ? 1 : -1;
      for (let p = this.anchor; p !== pos + step; p += step) {
        const q = this.rowAt(p);
        if (q) next.add(q.row);
      }
      this.selected = next;
    } else if (toggle) {
      if (!this.selected.delete(r.row)) this.selected.add(r.row);
      this.anchor = pos;
    } else {
      this.selected = new Set([r.row]);
      this.anchor = pos;
    }
    this.refreshSelection();
    const rows = [...this.selected];
    this.hooks.select(rows.slice(0, LIMITS.selectedRows), rows.length);
  }

  private key(e: KeyboardEvent): void {
    if (this.total <= 0) return;
    const inSight = Math.max(1, Math.floor(this.scroller.clientHeight / ROW_HEIGHT) - 1);
    const moves: Record<string, number> = { ArrowDown: 1, ArrowUp: -1, PageDown: inSight, PageUp: -inSight };
    let to: number | undefined;
    if (e.key in moves) to = this.focusAt + moves[e.key];
    else if (e.key === 'Home') to = 0;
    else if (e.key === 'End') to = this.total - 1;
    else if (e.key === ' ' || e.key === 'Enter') {
      e.preventDefault();
      const r = this.rowAt(this.focusAt);
      if (e.key === 'Enter' && e.altKey) {
        if (r?.line !== null && r) this.hooks.reveal(r.row);
      } else this.choose(this.focusAt, e.shiftKey, e.ctrlKey || e.metaKey);
      return;
    }
    if (to === undefined) return;
    e.preventDefault();
    this.moveFocus(Math.max(0, Math.min(this.total - 1, to)));
  }

  /** Scrolls the row into sight if it is not, draws it, and puts focus on it. */
  private moveFocus(pos: number): void {
    this.focusAt = pos;
    const headH = this.head.offsetHeight;
    const top = pos * ROW_HEIGHT;
    const view = this.scroller.clientHeight - headH;
    const scroll = this.scroller.scrollTop;
    if (top < scroll) this.scroller.scrollTop = top;
    else if (top + ROW_HEIGHT > scroll + view) this.scroller.scrollTop = top + ROW_HEIGHT - view;
    this.draw();
    this.drawn.get(pos)?.focus({ preventScroll: true });
  }
}
