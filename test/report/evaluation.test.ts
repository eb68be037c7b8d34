// The report's evaluation figures as the command line writes them: the table's ROC area, average precision,
// Brier score and cross-validation mean are the numbers --json prints, and the ROC, precision-recall and
// calibration pictures appear for two and three classes (one line per class) and not for a regression, which
// gets predicted against actual and the interval's coverage instead.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { formatFixed, formatShare } from '../../src/core/format';
import type { FitJson, ScoresJson } from '../cli/output';

/** The evaluation keys of --json this file reads, written out here so a renamed key fails the test. */
type EvalScores = ScoresJson & {
  auc?: number;
  averagePrecision?: number | Record<string, number>;
  brier?: number;
  diagnostics?: { pairs: Array<{ actual: number; predicted: number }>; rows: number; interval?: { level: number; coverage: number; rows: number } };
};
type EvalJson = Omit<FitJson, 'oob' | 'test'> & {
  oob: EvalScores | null;
  test?: EvalScores;
  cv?: { foldCount: number; mean: Record<string, number | Record<string, number>>; sd: Record<string, number | Record<string, number>> };
};

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');
const loaves = path.join(root, 'demo/loaf-rise.csv');

function fit(data: string, target: string, out: string, ...extra: string[]): { html: string; json: EvalJson } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), 'fit', data, '--target', target, '--trees', '30', '--seed', '5', '--report', out, '--json', ...extra], { encoding: 'utf8' });
  assert.equal(r.status, 0, r.stderr);
  return { html: readFileSync(out, 'utf8'), json: JSON.parse(r.stdout) as EvalJson };
}

/** The exact number a table cell carries for one score of one column. */
function cell(html: string, of: string, key: string): number | undefined {
  // The headline (accuracy, R²) is marked as the panel's headline is; the other scores by their key.
  const pattern = key === 'accuracy' || key === 'r2' ? `data-score="${of}" data-value="([^"]+)"` : `data-of="${of}" data-key="${key}" data-value="([^"]+)"`;
  const m = new RegExp(pattern).exec(html);
  return m ? Number(m[1]) : undefined;
}

/** The figure elements of one kind, each with its markup. */
const figures = (html: string, chart: string): string[] => html.match(new RegExp(`<figure data-chart="${chart}"[\\s\\S]*?</figure>`, 'g')) ?? [];
const lines = (figure: string): number => (figure.match(/<polyline class="series"/g) ?? []).length;

describe('report: evaluation scores and curves', function () {
  this.timeout(240000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-report-eval-'));

  it('two classes: the table and the ROC caption carry --json’s areas and Brier score, and cross-validation’s mean', () => {
    // The demo's kites without the "wobbled" rows: two classes, enough rows for a holdout and three folds.
    const csv = path.join(dir, 'two.csv');
    const all = readFileSync(kites, 'utf8').trimEnd().split('\n');
    const kept = all.filter((l, i) => i === 0 || !l.endsWith(',wobbled'));
    assert.ok(kept.length > 2000 && kept.length < all.length);
    writeFileSync(csv, kept.join('\n') + '\n');
    const { html, json } = fit(csv, 'outcome', path.join(dir, 'two.html'), '--holdout', '0.2', '--folds', '3');
    const oob = json.oob!;
    assert.equal(typeof oob.auc, 'number');
    assert.equal(cell(html, 'oob', 'auc'), oob.auc);
    assert.equal(cell(html, 'oob', 'averagePrecision'), oob.averagePrecision);
    assert.equal(cell(html, 'oob', 'brier'), oob.brier);
    assert.equal(cell(html, 'test', 'auc'), json.test!.auc);
    assert.ok(html.includes(`ROC curve, out-of-bag: area ${formatFixed(oob.auc, 3)}`), 'the area in the caption');
    // Cross-validation: the column, its fold count, and the mean and spread --json reports.
    const cv = json.cv!;
    assert.equal(cell(html, 'cv', 'accuracy'), cv.mean.accuracy);
    assert.equal(cell(html, 'cv', 'auc'), cv.mean.auc);
    assert.ok(html.includes('Cross-validation (3 folds, mean ± sd)'));
    assert.ok(html.includes(`${formatShare(cv.mean.accuracy as number)}</span> ± ${formatShare(cv.sd.accuracy as number)}`));
    assert.ok(html.includes('data-cv="3"'));
    // One line per picture, for the out-of-bag rows and the held-out ones; calibration with its count strip.
    for (const chart of ['roc', 'precision-recall', 'calibration']) {
      const figs = figures(html, chart);
      assert.deepEqual(figs.map((f) => /data-source="(\w+)"/.exec(f)?.[1]), ['oob', 'test'], chart);
      assert.ok(figs.every((f) => lines(f) === 1), `${chart}: one line each`);
    }
    assert.ok(figures(html, 'calibration').every((f) => f.includes('class="hist"')), 'the rows per bin under the calibration curve');
    assert.equal(figures(html, 'predicted-actual').length, 0);
  });

  it('three classes: one line per class, a calibration picture per class; no cross-validation column without --folds', () => {
    const { html, json } = fit(kites, 'outcome', path.join(dir, 'three.html'));
    assert.equal(cell(html, 'oob', 'auc'), json.oob!.auc);
    assert.ok(html.includes(`mean area ${formatFixed(json.oob!.auc, 3)}`));
    assert.equal(figures(html, 'roc').length, 1);
    assert.equal(lines(figures(html, 'roc')[0]), 3);
    assert.equal(lines(figures(html, 'precision-recall')[0]), 3);
    assert.equal(figures(html, 'calibration').length, 3);
    assert.equal(cell(html, 'cv', 'accuracy'), undefined);
    assert.ok(!html.includes('Cross-validation ('));
  });

  it('regression: predicted against actual and the interval coverage, and no ROC or calibration pictures', () => {
    const { html, json } = fit(loaves, 'rise_mm', path.join(dir, 'loaf.html'), '--folds', '3');
    for (const chart of ['roc', 'precision-recall', 'calibration']) assert.equal(figures(html, chart).length, 0, chart);
    const scatter = figures(html, 'predicted-actual');
    assert.equal(scatter.length, 1);
    const d = json.oob!.diagnostics!;
    assert.equal((scatter[0].match(/<circle /g) ?? []).length, d.pairs.length, 'one dot per pair in the summary');
    const iv = d.interval!;
    assert.match(html, new RegExp(`data-coverage="oob">The ${formatShare(iv.level, 0)} prediction interval held the true value for ${formatShare(iv.coverage).replace('.', '\\.')} of`));
    assert.equal(cell(html, 'cv', 'r2'), json.cv!.mean.r2);
  });
});
