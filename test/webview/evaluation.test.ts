// The ranking, calibration and threshold views in headless Chromium, fed summaries that core computed from
// real fits (Pima: two classes; iris: three; a demo regression), reshaped by the host's one reshaping
// function: the curves draw, the threshold control redraws the confusion table from core's tallies, and
// the counts it shows are core's own at that threshold.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import { fitForest } from '../../src/core/forest/fit';
import { crossValidate } from '../../src/core/summary/cross-validation';
import { summarizeFit } from '../../src/core/summary/fit';
import { panelSummary } from '../../src/extension/summary/panel';
import type { FitSummary } from '../../src/protocol/messages';
import { PanelPage, ROOT } from './harness';

async function summaryOf(file: string, target: string, id: string, holdout?: number, folds?: number): Promise<FitSummary> {
  const { table } = await loadCsv(path.join(ROOT, file), { target });
  const fit = { target, params: { trees: 60, seed: 3 }, workers: 2, permutationImportance: false };
  const report = await fitForest(table, { ...fit, holdout });
  const core = summarizeFit(report, table, { file: path.basename(file) });
  const cv = folds ? await crossValidate(table, fit, { folds }) : undefined;
  return panelSummary(cv ? { ...core, cv } : core, { fit: id, uri: `file:///${file}` });
}

async function cells(p: PanelPage, id: string): Promise<number[]> {
  return await p.page.evaluate<number[]>(`['tn','fp','fn','tp'].map((c) => Number(document.querySelector('[data-testid=threshold-${id}-' + c + ']').textContent.replace(/,/g, '')))`);
}

async function setSlider(p: PanelPage, step: number): Promise<void> {
  await p.page.evaluate(`(() => { const s = document.querySelector('[data-testid=threshold-slider]'); s.value = '${step}'; s.dispatchEvent(new Event('input')); })()`);
}

describe('ranking, calibration and threshold views (headless Chromium)', function () {
  this.timeout(240_000);
  let p: PanelPage;
  let pima: FitSummary;
  before(async () => {
    pima = await summaryOf('test/fixtures/open/pima.csv', 'type', 'pima-1', 0.25);
    p = await PanelPage.open('dark');
  });
  after(async () => p?.close());

  it('two classes: draws the ROC, precision-recall and calibration charts with the areas core computed', async () => {
    await p.send({ type: 'summary', summary: pima });
    const shown = await p.page.evaluate<boolean>(`!document.querySelector('[data-testid=evaluation-section]').classList.contains('hidden')`);
    assert.ok(shown);
    const caption = await p.page.locator('[data-testid=roc-caption]').textContent();
    const e = pima.oob!.kind === 'classification' ? pima.oob!.evaluation! : null;
    assert.match(caption!, new RegExp(`AUC ${e!.auc!.toFixed(3)}`));
    const drawn = await p.page.evaluate<number>(`[...document.querySelectorAll('[data-testid=evaluation] canvas')].filter((c) => c.width > 0 && c.height > 0).length`);
    assert.equal(drawn, 4);
    await p.screenshotOf('[data-testid=evaluation-section]', 'evaluation-binary-dark.png');
  });

  it('moving the threshold redraws the confusion table with core’s tallies at that threshold', async () => {
    const t = pima.oob!.kind === 'classification' ? pima.oob!.evaluation!.thresholds! : null;
    const held = pima.heldOut!.scores.kind === 'classification' ? pima.heldOut!.scores.evaluation!.thresholds! : null;
    const at50 = await cells(p, 'oob');
    // At 0.5 the control gives the usual answers: the summary's own confusion table.
    const usual = pima.oob!.kind === 'classification' ? pima.oob!.confusion.flat() : [];
    assert.deepEqual(at50, usual);
    for (const step of [20, 35, 70]) {
      await setSlider(p, step);
      const tally = t!.tallies[step];
      assert.deepEqual(await cells(p, 'oob'), [t!.negatives - tally.falsePositives, tally.falsePositives, t!.positives - tally.truePositives, tally.truePositives]);
      const h = held!.tallies[step];
      assert.deepEqual(await cells(p, 'held'), [held!.negatives - h.falsePositives, h.falsePositives, held!.positives - h.truePositives, h.truePositives]);
      assert.equal(await p.page.locator('[data-testid=threshold-value]').textContent(), (step / 100).toFixed(2));
    }
    assert.notDeepEqual(await cells(p, 'oob'), at50);
    const best = t!.presets.find((x) => x.kind === 'balanced-accuracy')!.threshold!;
    await p.page.locator('[data-testid=threshold-preset-balanced-accuracy]').click();
    assert.equal(await p.page.locator('[data-testid=threshold-value]').textContent(), best.toFixed(2));
    assert.match((await p.page.locator('[data-testid=threshold-note]').textContent())!, /honest check/);
    await p.setTheme('light');
    await p.screenshotOf('[data-testid=evaluation-section]', 'evaluation-binary-light.png');
  });

  it('three classes: one curve per class and no threshold control', async () => {
    const iris = await summaryOf('test/fixtures/open/iris.csv', 'species', 'iris-1', undefined, 5);
    await p.send({ type: 'summary', summary: iris });
    // Cross-validation, as the adjust step's folds give it: one column per fold, and core's mean.
    const cvMean = await p.page.locator('[data-testid=cv-accuracy] td').first().textContent();
    assert.equal(cvMean, iris.cv!.scores[0].mean!.toFixed(3));
    assert.equal(await p.page.locator('[data-testid=cv-accuracy] td').count(), 2 + 5);
    await p.screenshotOf('[data-testid=cv-section]', 'cross-validation-light.png');
    assert.match((await p.page.locator('[data-testid=roc-caption]').textContent())!, /mean AUC/);
    const hidden = await p.page.evaluate<boolean>(`document.querySelector('[data-testid=threshold]').classList.contains('hidden')`);
    assert.ok(hidden);
    await p.screenshotOf('[data-testid=evaluation-section]', 'evaluation-three-light.png');
    await p.setTheme('dark');
    await p.screenshotOf('[data-testid=evaluation-section]', 'evaluation-three-dark.png');
  });

  it('regression: predicted against actual and residual plots instead of curves', async () => {
    const loaves = await summaryOf('demo/loaf-rise.csv', 'rise_mm', 'loaf-1');
    await p.send({ type: 'summary', summary: loaves });
    const state = await p.page.evaluate<boolean[]>(`['evaluation-section','diagnostics-section','cv-section'].map((id) => document.querySelector('[data-testid=' + id + ']').classList.contains('hidden'))`);
    assert.deepEqual(state, [true, false, true]);
    await p.screenshotOf('[data-testid=diagnostics-section]', 'diagnostics-dark.png');
    assert.deepEqual(p.errors, []);
  });
});
