// Training rows the trees that never saw them disagree with most: often mislabelled rows, data-entry
// slips, or genuinely ambiguous cases worth a look before trusting the fit. The host picks and orders
// them and says how many there are in all (FitSummary.suspectCount); the list it sends is capped.
import { LIMITS, type FitSummary, type SuspectRow } from '../../src/protocol/messages';
import { append, clear, h } from '../dom';
import { fixed, listed, num } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

export class SuspectsView {
  readonly root: HTMLElement;
  private rows: SuspectRow[] = [];
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;
  private highlighted = new Set<number>();

  constructor(private readonly reveal: (row: number) => void) {
    this.root = h('div', { class: 'suspects', testid: 'suspects' });
  }

  setSummary(s: FitSummary): void {
    this.summary = s;
    this.draw();
  }

  setRows(rows: SuspectRow[]): void {
    this.rows = rows;
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  setHighlight(rows: readonly number[]): void {
    this.highlighted = new Set(rows);
    for (const tr of this.root.querySelectorAll<HTMLElement>('tr[data-row]')) tr.classList.toggle('highlight', this.highlighted.has(Number(tr.dataset.row)));
  }

  private draw(): void {
    clear(this.root);
    const { summary, theme } = this;
    if (!summary || !theme) return;
    if (this.rows.length === 0) {
      const text =
        summary.suspectCount === null
          ? 'Not known for this forest: it takes the votes of the trees that never saw each row.'
          : summary.task === 'classification'
            ? 'None: for every training row, the trees that did not see it voted mostly for its own label.'
            : 'None: every training row lies within 3.5 robust standard deviations of what the trees that never saw it predict.';
      append(this.root, h('p', { class: 'muted' }, text));
      return;
    }
    const classification = summary.task === 'classification';
    const say = (v: number) => (classification ? (summary.classes[v] ?? `class ${v}`) : num(v));
    const body = this.rows.map((r) => {
      const tr = h(
        'tr',
        { class: this.highlighted.has(r.row) ? 'highlight' : '', on: { click: () => this.reveal(r.row) } },
        h('td', {}, h('button', { class: 'row-link', attrs: { type: 'button' }, title: 'Show this row in the editor' }, `Row ${r.row}`)),
        h('td', {}, swatch(theme, classification, r.label), say(r.label)),
        h('td', {}, swatch(theme, classification, r.oobPredicted), say(r.oobPredicted)),
        h('td', { class: 'num' }, fixed(r.score, classification ? 2 : 1)),
      );
      tr.dataset.row = String(r.row);
      return tr;
    });
    append(
      this.root,
      h(
        'p',
        { class: 'muted', testid: 'suspects-count' },
        listed(
          this.rows.length,
          summary.suspectCount,
          LIMITS.suspects,
          classification ? 'rows whose out-of-bag vote went against their own label' : 'rows whose label lies far from what the trees that never saw them predict',
        ),
        classification ? ' Lowest out-of-bag margin first' : ' Farthest first',
        '; click a row to go to it.',
      ),
      h(
        'table',
        { class: 'suspect-table' },
        h('thead', {}, h('tr', {}, h('th', {}, 'row'), h('th', {}, 'label'), h('th', {}, classification ? 'out-of-bag vote' : 'out-of-bag prediction'), scoreHeader(classification))),
        h('tbody', {}, ...body),
      ),
    );
  }
}

function scoreHeader(classification: boolean): HTMLElement {
  return classification
    ? h('th', { class: 'num', title: 'Share of out-of-bag trees voting for the label minus the largest share for any other class' }, 'margin')
    : h('th', { class: 'num', title: 'Label minus out-of-bag prediction, in robust standard deviations of all out-of-bag residuals' }, 'z');
}

function swatch(theme: Theme, classification: boolean, k: number): HTMLElement | null {
  if (!classification) return null;
  const s = h('span', { class: 'swatch' });
  s.style.backgroundColor = css(theme.classColour(k));
  return s;
}
