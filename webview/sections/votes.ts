// How the individual trees voted on the rows the user selected in the editor. For a classifier, a strip
// in tree order, so the same tree sits in the same column for every row and shared splits line up; for
// a regression, each tree's value as a dot on a numeric axis (tree-values.ts).
import { uniqueId } from '../a11y';
import { LIMITS, type FitSummary, type RowVotes } from '../../src/protocol/messages';
import { append, clear, custom, h } from '../dom';
import { count, fixed, listed, num, percent } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';
import { boostedBlock, boostedNote } from './raw-strip';
import { treeValues, valueScale, type ValueScale } from './tree-values';

export class VotesView {
  readonly root: HTMLElement;
  private readonly list: HTMLElement;
  private readonly group: HTMLElement & { checked: boolean };
  private readonly controls: HTMLElement;
  private readonly note: HTMLElement;
  private rows: RowVotes[] = [];
  /** How many rows are selected in all; rows holds at most LIMITS.selectedRows of them. */
  private selected = 0;
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;

  constructor(
    private readonly reveal: (row: number) => void,
    private readonly explain: (row: number) => void = () => undefined,
  ) {
    this.group = custom('vscode-checkbox', { testid: 'group-votes', attrs: { label: 'Group trees by vote' } }) as HTMLElement & { checked: boolean };
    this.group.addEventListener('change', () => this.draw());
    this.list = h('div', { class: 'vote-list' });
    this.controls = h('div', { class: 'controls' }, this.group);
    this.note = h('p', { class: 'muted' });
    this.root = h('div', { class: 'votes', testid: 'disagreement' }, this.controls, this.list, this.note);
  }

  setSummary(summary: FitSummary): void {
    this.summary = summary;
    this.draw();
  }

  setRows(rows: RowVotes[], selected: number = rows.length): void {
    this.rows = rows;
    this.selected = selected;
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  private draw(): void {
    clear(this.list);
    clear(this.note);
    const { summary, theme } = this;
    if (!summary || !theme) return;
    const classification = summary.task === 'classification';
    // Grouping reorders a colour strip; on a numeric axis the dots already sit in value order.
    this.controls.classList.toggle('hidden', !classification);
    if (this.rows.length === 0) {
      append(this.list, h('p', { class: 'muted empty' }, 'Put the cursor on a data row in the CSV (or select several) to see how each tree voted.'));
      return;
    }
    const scale = classification ? null : valueScale(this.rows);
    const say = (v: number | null) => (v === null ? 'n/a' : classification ? (summary.classes[v] ?? `class ${v}`) : num(v));
    // A boosted ensemble's trees add raw scores rather than vote (raw-strip.ts); the section's title says so.
    const boosted = this.rows[0].boosted;
    const title = this.root.closest('section')?.querySelector('h2');
    if (title) title.textContent = boosted ? 'Tree outputs on the selected rows' : 'Tree votes on the selected rows';
    this.controls.classList.toggle('hidden', !classification || boosted !== undefined);
    if (boosted) {
      for (const r of this.rows) append(this.list, boostedBlock(r, summary, theme, this.reveal, this.explain));
      append(this.note, boostedNote(summary, boosted.scale));
      return;
    }
    for (const r of this.rows) append(this.list, this.rowBlock(r, scale, say));
    // Only a full list can be cut short; the host says how many rows were selected in all.
    append(
      this.note,
      this.selected > this.rows.length ? `${listed(this.rows.length, this.selected, LIMITS.selectedRows, 'selected rows')} ` : '',
      classification
        ? 'One cell per tree. A notch under a cell marks a tree that did not see this row while training: those votes make the out-of-bag answer.'
        : 'One dot per tree, at the value it predicts; dots stack where trees agree. Filled dots are trees that did not see the row while training; the dashed line is their mean, the out-of-bag answer, and the solid line is the row’s own label. For a row the forest did not train on, a dotted line marks the mean of all trees.',
    );
  }

  private rowBlock(r: RowVotes, scale: ValueScale | null, say: (v: number | null) => string): HTMLElement {
    const theme = this.theme as Theme;
    const summary = this.summary as FitSummary;
    const classification = scale === null;
    // A classifier's out-of-bag trees vote; a regression's are averaged.
    const oobName = classification ? 'out-of-bag vote' : 'out-of-bag mean';
    const missed = r.label !== null && r.oobVote !== null && classification && r.label !== r.oobVote;
    const oobLeads = r.lead === 'out-of-bag' && !summary.oobUnavailable;
    const head = h(
      'div',
      { class: 'vote-head' },
      h('button', { class: 'row-link', attrs: { type: 'button' }, title: 'Show this row in the editor', on: { click: () => this.reveal(r.row) } }, `Row ${r.row}`),
      stat('label', swatchOr(classification, theme, r.label), say(r.label)),
      summary.oobUnavailable
        ? stat(oobName, h('span', { class: 'muted', title: summary.oobUnavailable }, 'unavailable'))
        : stat(
            oobName,
            swatchOr(classification, theme, r.oobVote),
            say(r.oobVote),
            missed ? h('span', { class: 'miss', title: 'The out-of-bag vote disagrees with the label' }, ' ✗ differs') : null,
          ),
      // The trees that never saw a training row lead; the all-trees answer follows, named for what it includes.
      oobLeads
        ? stat('all trees, including those fitted on it', swatchOr(classification, theme, r.allPredicted), say(r.allPredicted))
        : stat('all trees', swatchOr(classification, theme, r.allPredicted), say(r.allPredicted)),
      stat(oobLeads ? 'agreement of out-of-bag trees' : 'agreement', percent(r.agreement, 1)),
      classification ? stat('vote entropy', `${fixed(r.entropy, 2)} bits`) : null,
      summary.oobUnavailable ? null : stat('out-of-bag trees', count(r.outOfBag.length)),
      r.interval ? stat(`${Number((r.interval.level * 100).toFixed(1))}% interval`, h('span', { testid: 'row-interval' }, `${num(r.interval.lower)} to ${num(r.interval.upper)}`)) : null,
      h('button', { class: 'row-link', testid: 'explain-row', attrs: { type: 'button' }, title: 'Chart how each feature moved this row’s prediction', on: { click: () => this.explain(r.row) } }, 'Explain'),
    );
    const counts = classification
      ? h(
          'div',
          { class: 'vote-counts' },
          ...r.counts.map((n, k) => {
            const bar = h('span', { class: 'count-bar' });
            bar.style.width = `${(100 * n) / Math.max(1, r.votes.length)}%`;
            bar.style.backgroundColor = css(theme.classColour(k));
            return h('div', { class: 'count' }, h('span', { class: 'count-label' }, summary.classes[k] ?? `class ${k}`), h('span', { class: 'count-track' }, bar), h('span', { class: 'count-n' }, count(n)));
          }),
        )
      : null;
    const strip = scale ? treeValues(r, scale, theme, summary.target, !summary.oobUnavailable) : this.classStrip(r, say);
    // The strip's text equivalent is the vote count per class beside it (or, for regression, its own summary).
    if (counts) {
      counts.id = uniqueId(`vote-counts-${r.row}`);
      strip.setAttribute('aria-describedby', counts.id);
    }
    const block = h('div', { class: missed ? 'vote-row missed' : 'vote-row' }, head, counts, strip);
    block.dataset.row = String(r.row);
    return block;
  }

  private classStrip(r: RowVotes, say: (v: number | null) => string): HTMLElement {
    const theme = this.theme as Theme;
    const oob = new Set(r.outOfBag);
    const order = r.votes.map((_, t) => t);
    if (this.group.checked) order.sort((a, b) => r.votes[a] - r.votes[b] || a - b);
    const strip = h('div', { class: 'vote-strip', testid: 'vote-strip', attrs: { 'data-trees': String(r.votes.length), role: 'img' } });
    strip.setAttribute('aria-label', `${r.votes.length} tree votes for row ${r.row}`);
    for (const t of order) {
      const v = r.votes[t];
      const cell = h('span', { class: oob.has(t) ? 'tree oob' : 'tree', title: `tree ${t + 1}: ${say(v)}${oob.has(t) ? ' (out-of-bag)' : ''}` });
      cell.dataset.tree = String(t);
      cell.style.backgroundColor = css(theme.classColour(v));
      strip.appendChild(cell);
    }
    return strip;
  }
}

function stat(name: string, ...value: Array<Node | string | null>): HTMLElement {
  return h('span', { class: 'stat' }, h('span', { class: 'muted' }, `${name} `), ...value);
}

function swatchOr(classification: boolean, theme: Theme, k: number | null): HTMLElement | null {
  if (!classification || k === null) return null;
  const s = h('span', { class: 'swatch' });
  s.style.backgroundColor = css(theme.classColour(k));
  return s;
}
