// k-fold cross-validation as a table: each score per fold, then its mean and spread. The folds say how much
// the estimate moves with the rows a forest happens to see; the numbers are core's.
import type { CrossValidationView, FitSummary } from '../../src/protocol/messages';
import { append, clear, h } from '../dom';
import { fixed, num } from '../format';

const NAMES: Record<string, string> = {
  accuracy: 'accuracy',
  balancedAccuracy: 'balanced accuracy',
  auc: 'ROC AUC',
  brier: 'Brier score',
  logLoss: 'log loss',
  r2: 'R²',
  mae: 'MAE',
  rmse: 'RMSE',
};

export class CrossValidationPanel {
  readonly root: HTMLElement;

  constructor() {
    this.root = h('div', { class: 'cross-validation', testid: 'cross-validation' });
  }

  static of(s: FitSummary): CrossValidationView | undefined {
    return s.cv;
  }

  set(s: FitSummary): void {
    clear(this.root);
    const cv = s.cv;
    if (!cv) return;
    const show = (key: string, v: number | null) => (key === 'mae' || key === 'rmse' ? num(v) : fixed(v, 3));
    const folds = cv.scores[0]?.perFold.length ?? 0;
    const head = h('tr', {}, h('th', {}, 'score'), h('th', {}, 'mean'), h('th', {}, '± sd'), ...Array.from({ length: folds }, (_, k) => h('th', { class: 'muted' }, `fold ${k + 1}`)));
    const rows = cv.scores.map((r) =>
      h('tr', { testid: `cv-${r.key}` }, h('th', { attrs: { scope: 'row' } }, NAMES[r.key] ?? r.key), h('td', {}, show(r.key, r.mean)), h('td', {}, show(r.key, r.sd)), ...r.perFold.map((v) => h('td', { class: 'muted' }, show(r.key, v)))),
    );
    append(
      this.root,
      h('div', { class: 'table-scroll' }, h('table', { class: 'cv-table' }, h('thead', {}, head), h('tbody', {}, ...rows))),
      h(
        'p',
        { class: 'muted' },
        `${cv.foldCount} folds${cv.repeats > 1 ? `, ${cv.repeats} times` : ''}${cv.stratified ? ', stratified by class' : ''}: each fold's forest was fitted on the other folds with this fit's settings and seed, and scored on the fold. ` +
          'A wide spread means one split of the rows would say much less than it seems to.',
      ),
    );
  }
}
