// What was fitted and how well it scores: the numbers a practitioner checks before looking at any map.
import type { ClassificationScoreSummary, FitSummary, RegressionScoreSummary, ScoreSummary } from '../../src/protocol/messages';
import { nameControl, visuallyHidden } from '../a11y';
import { append, clear, custom, h } from '../dom';
import { count, fixed, headline, num, percent } from '../format';
import { countTint, css } from '../palette';
import type { Theme } from '../theme';

export class SummaryView {
  readonly root: HTMLElement;
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;

  constructor(private readonly refit: (leaveOut: string[], trees: number | null) => void) {
    this.root = h('div', { class: 'summary-body' });
  }

  set(summary: FitSummary): void {
    this.summary = summary;
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  private draw(): void {
    const s = this.summary;
    const theme = this.theme;
    clear(this.root);
    if (!s || !theme) {
      append(this.root, h('p', { class: 'muted' }, 'No forest yet. Run “Copse: Fit” on a CSV file.'));
      return;
    }
    const taskText = s.task === 'classification' ? `classification into ${s.classes.length} classes` : 'regression';
    // Three blocks that sit side by side on a wide panel and stack on a narrow one.
    const scores = h(
      'div',
      { class: 'summary-block' },
      h(
        'dl',
        { class: 'facts' },
        fact('Predicting', h('strong', {}, s.target), ` (${taskText})`),
        fact(
          'Rows',
          `${count(s.rowsUsed)} used`,
          s.rowsRead !== s.rowsUsed ? ` of ${count(s.rowsRead)} read` : '',
          s.sampled ? h('span', { class: 'badge', title: 'The rows used are a random sample of the file' }, 'sampled') : null,
        ),
        fact('Forest', `${count(s.trees)} trees`, s.fitSeconds !== null ? `, fitted in ${fixed(s.fitSeconds, 1)} s` : ''),
      ),
      scoreTable(s),
    );
    const cm = s.task === 'classification' ? confusionBlock(s, theme) : residualBlock(s);
    append(this.root, scores, cm, this.featureBlock(s));
  }

  private featureBlock(s: FitSummary): HTMLElement {
    const keep = new Map<string, HTMLElement & { checked: boolean }>();
    const used = h('ul', { class: 'feature-list', testid: 'features-used' });
    for (const f of s.features) {
      // The name sits inside the checkbox (its slot), so it is the checkbox's label for a screen reader too.
      const box = custom(
        'vscode-checkbox',
        { attrs: { checked: '' }, title: 'Untick to leave this feature out at the next fit' },
        h('span', { class: 'feature-name' }, f.name),
      ) as HTMLElement & { checked: boolean };
      box.checked = true;
      keep.set(f.name, box);
      append(used, h('li', {}, box, h('span', { class: 'muted kind' }, ` ${f.kind}`)));
    }
    const dropped = h('ul', { class: 'dropped-list', testid: 'features-dropped' });
    for (const d of s.dropped) append(dropped, h('li', {}, h('span', { class: 'feature-name' }, d.name), h('span', { class: 'muted' }, ` — ${d.reason}`)));
    const trees = nameControl(custom('vscode-textfield', { attrs: { type: 'number', min: '1', value: String(s.trees) } }), 'Trees for the next fit') as HTMLElement & { value: string };
    const button = custom('vscode-button', { testid: 'refit', on: { click: () => {
      const leaveOut = [...keep].filter(([, b]) => !b.checked).map(([name]) => name);
      const n = Math.floor(Number(trees.value));
      this.refit(leaveOut, Number.isFinite(n) && n >= 1 ? n : null);
    } } }, 'Fit again');
    return h(
      'div',
      { class: 'features' },
      h('h3', {}, `Features used (${s.features.length})`),
      used,
      s.dropped.length > 0 ? h('h3', {}, `Left out (${s.dropped.length})`) : null,
      s.dropped.length > 0 ? dropped : null,
      h('div', { class: 'refit-row' }, h('label', { class: 'inline-field' }, 'trees', trees), button),
    );
  }
}

function fact(term: string, ...value: Array<Node | string | null>): HTMLElement {
  const wrap = h('div', {});
  append(wrap, h('dt', {}, term), h('dd', {}, ...value));
  return wrap;
}

function scoreRows(kind: ScoreSummary['kind']): Array<[string, (s: ScoreSummary) => string]> {
  if (kind === 'classification') {
    const c = (f: (s: ClassificationScoreSummary) => string) => (s: ScoreSummary) => (s.kind === 'classification' ? f(s) : 'n/a');
    return [
      ['Accuracy', c((s) => percent(s.accuracy))],
      ['Balanced accuracy', c((s) => percent(s.balancedAccuracy))],
      ['Log loss', c((s) => fixed(s.logLoss, 3))],
      ['Rows scored', (s) => count(s.rows)],
    ];
  }
  const r = (f: (s: RegressionScoreSummary) => string) => (s: ScoreSummary) => (s.kind === 'regression' ? f(s) : 'n/a');
  return [
    ['R²', r((s) => fixed(s.r2, 3))],
    ['Mean absolute error', r((s) => num(s.mae))],
    ['Root mean squared error', r((s) => num(s.rmse))],
    ['Rows scored', (s) => count(s.rows)],
  ];
}

function scoreTable(s: FitSummary): HTMLElement {
  const cols: Array<{ title: string; scores: ScoreSummary | null }> = [{ title: 'Out-of-bag', scores: s.oob }];
  if (s.heldOut) cols.push({ title: s.heldOut.from === 'test' ? 'Test file' : 'Held-out rows', scores: s.heldOut.scores });
  const head = h('tr', {}, h('th', { attrs: { scope: 'col' } }, visuallyHidden('Score')), ...cols.map((c) => h('th', { attrs: { scope: 'col' } }, c.title)));
  const body = scoreRows(s.task).map(([name, get], r) =>
    h(
      'tr',
      {},
      h('th', { attrs: { scope: 'row' } }, name),
      ...cols.map((c, i) => {
        const text = c.scores ? get(c.scores) : 'n/a';
        // The headline figure carries the contract's test hook and exact format.
        if (r === 0 && i === 0 && c.scores) {
          const value = c.scores.kind === 'classification' ? c.scores.accuracy : c.scores.r2;
          return h('td', {}, h('span', { class: 'headline', testid: 'oob-score' }, headline(c.scores.kind, value)));
        }
        return h('td', {}, text);
      }),
    ),
  );
  const note = s.oob ? null : h('p', { class: 'muted', testid: 'oob-note' }, s.oobUnavailable ?? 'No out-of-bag score: every row was in every tree’s sample.');
  const wrap = h('div', { class: 'scores' }, h('table', { class: 'score-table' }, h('thead', {}, head), h('tbody', {}, ...body)));
  if (note) append(wrap, note);
  return wrap;
}

function confusionBlock(s: FitSummary, theme: Theme): HTMLElement | null {
  const scores = s.oob?.kind === 'classification' ? s.oob : s.heldOut?.scores.kind === 'classification' ? s.heldOut.scores : null;
  if (!scores) return null;
  const which = scores === s.oob ? 'out-of-bag' : 'held-out';
  const labels = s.classes;
  const head = h(
    'tr',
    {},
    h('th', { class: 'corner muted' }, 'true ↓ / predicted →'),
    ...labels.map((l, k) => h('th', { attrs: { scope: 'col' } }, swatchFor(theme, k), l)),
    h('th', { class: 'muted' }, 'recall'),
  );
  // One shade for every cell, stronger the more rows it holds, so the biggest numbers stand out first
  // and a thin off-diagonal cell stays faint: the table reads as counts, not as judgements.
  const most = Math.max(0, ...scores.confusion.flat());
  const rows = scores.confusion.map((row, t) =>
    h(
      'tr',
      {},
      h('th', { attrs: { scope: 'row' } }, swatchFor(theme, t), labels[t] ?? `class ${t}`),
      ...row.map((n, p) => {
        const td = h('td', { class: p === t ? 'diag' : '' }, count(n));
        if (n > 0 && most > 0) {
          td.style.backgroundColor = css(countTint(theme.background, theme.foreground, n / most));
          td.style.color = css(theme.foreground);
        }
        return td;
      }),
      h('td', { class: 'muted' }, percent(scores.perClass[t]?.recall ?? null, 0)),
    ),
  );
  const precision = h(
    'tr',
    {},
    h('th', { class: 'muted', attrs: { scope: 'row' } }, 'precision'),
    ...labels.map((_, k) => h('td', { class: 'muted' }, percent(scores.perClass[k]?.precision ?? null, 0))),
    h('td', {}, ''),
  );
  return h(
    'div',
    { class: 'confusion', testid: 'confusion' },
    h('h3', {}, `Confusion (${which})`),
    h('table', { class: 'confusion-table' }, h('thead', {}, head), h('tbody', {}, ...rows, precision)),
    h('p', { class: 'muted note' }, 'Rows are the true class, columns the predicted one; the more rows a cell holds, the stronger its shade.'),
  );
}

function swatchFor(theme: Theme, k: number): HTMLElement {
  const s = h('span', { class: 'swatch' });
  s.style.backgroundColor = css(theme.classColour(k));
  return s;
}

function residualBlock(s: FitSummary): HTMLElement | null {
  const scores = s.oob?.kind === 'regression' ? s.oob : s.heldOut?.scores.kind === 'regression' ? s.heldOut.scores : null;
  const r = scores?.residuals;
  if (!scores || !r) return null;
  const cells: Array<[string, number]> = [
    ['min', r.min],
    ['25%', r.q1],
    ['median', r.median],
    ['75%', r.q3],
    ['max', r.max],
  ];
  return h(
    'div',
    { class: 'residuals', testid: 'residuals' },
    h('h3', {}, `Residuals, true − predicted (${scores === s.oob ? 'out-of-bag' : 'held-out'})`),
    h(
      'table',
      { class: 'score-table' },
      h('thead', {}, h('tr', {}, ...cells.map(([n]) => h('th', { attrs: { scope: 'col' } }, n)))),
      h('tbody', {}, h('tr', {}, ...cells.map(([, v]) => h('td', {}, num(v))))),
    ),
  );
}
