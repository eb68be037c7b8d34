// A boosted ensemble in a real workbench (code-server, Copse installed from its .vsix): an XGBoost model
// (test/fixtures/xgboost/binary.model.json, written by XGBoost 1.7.4 through scripts/xgboost_reference.py on the
// Pima data, test/fixtures/open/SOURCES.md) opened against its CSV from the CSV's menu, as step (4) of
// sequences.e2e.ts opens a saved forest and step (8) of copse.e2e.ts an ONNX file. Checked: the region map is
// drawn, the contributions are in log-odds and end at XGBoost's own margin with its probability beside, and the
// per-tree view shows each tree's raw output, the same numbers `copse votes` gives, ending at the margin.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/boosted.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { copseJson } from './copse/cli';
import { EXTENSION_ID } from './copse/panel';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { sleep } from './harness/processes';
import { launchWorkbench, Workbench } from './workbench';
import { recordFailure } from './copse/failures';

const MODEL = 'pima.xgboost.json';
const CSV = 'pima.csv';
/** Data row 2 (line 3): XGBoost gives it probability 0.81 of class 1, so both signs of tree output show. */
const ROW = 2;

interface Expected {
  predict: number[][];
  margin: number[][];
}

interface BoostedVotes {
  rows: Array<{ row: number; trees: Array<{ raw: number; cumulative: number }> }>;
}

describe('Copse on a boosted ensemble: an XGBoost model opened against its CSV', function () {
  this.timeout(300_000);
  let temp: string;
  let folder: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  let expected: Expected;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-boosted-'));
    folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    fs.copyFileSync(path.join(repoRoot(), 'test/fixtures/xgboost/binary.model.json'), path.join(folder, MODEL));
    fs.copyFileSync(path.join(repoRoot(), 'test/fixtures/open', CSV), path.join(folder, CSV));
    expected = JSON.parse(fs.readFileSync(path.join(repoRoot(), 'test/fixtures/xgboost/binary.expected.json'), 'utf8')) as Expected;
    vsix = packagedVsix();
    wb = await launchWorkbench({ name: 'boosted', folder, vsix: [vsix.file], settings: { 'workbench.colorTheme': 'Default Light Modern' } });
    await wb.waitForReady();
  });

  afterEach(async function () {
    await recordFailure(wb, this.currentTest);
  });

  after(async function () {
    await wb?.close();
    fs.rmSync(temp, { recursive: true, force: true });
    if (vsix) fs.rmSync(path.dirname(vsix.file), { recursive: true, force: true });
  });

  it('opens the model against its CSV, draws the map, and marks out-of-bag figures unavailable', async function () {
    await wb!.explorerContextMenu(CSV, 'Open a Saved Forest…');
    await wb!.answerFileDialog(path.join(folder, MODEL));
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const title = panel.locator('h1');
    const deadline = Date.now() + 120_000;
    while ((await title.innerText({ timeout: 2_000 }).catch(() => '')).replace(/\s+/g, ' ').trim() !== `Copse ${CSV} → target`) {
      if (Date.now() > deadline) throw new Error('the panel did not show the XGBoost model on pima.csv');
      await sleep(200);
    }
    assert.match(await panel.locator('[data-testid=warnings]').innerText({ timeout: 30_000 }), /XGBoost 1\.7\.4, objective binary:logistic/);
    assert.match(await panel.locator('[data-testid=oob-note]').innerText({ timeout: 30_000 }), /unavailable/);
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 90_000 });
    await wb!.screenshot('boosted-opened');
  });

  it("shows a row's contributions in log-odds ending at XGBoost's margin, its probability beside, and each tree's raw output", async function () {
    const cli = await copseJson<BoostedVotes>(['votes', path.join(folder, MODEL), path.join(folder, CSV), '--rows', String(ROW)]);
    await wb!.openFile(CSV, { pin: true });
    await wb!.selectLines(ROW + 1, ROW + 1);
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const strip = panel.locator('[data-testid=disagreement] [data-testid=raw-bars] .raw-col');
    await strip.first().waitFor({ timeout: 30_000 });
    const cols = await strip.evaluateAll((els: Array<{ getAttribute(name: string): string | null }>) =>
      els.map((e) => ({ raw: Number(e.getAttribute('data-raw')), total: Number(e.getAttribute('data-total')) })),
    );
    const trees = cli.rows[0].trees;
    assert.strictEqual(cols.length, trees.length, 'one column per tree');
    cols.forEach((c, t) => {
      assert.ok(Math.abs(c.raw - trees[t].raw) <= 1e-9, `tree ${t + 1}: the panel shows ${c.raw}, copse votes ${trees[t].raw}`);
      assert.ok(Math.abs(c.total - trees[t].cumulative) <= 1e-9);
    });
    const margin = expected.margin[ROW - 1][0];
    assert.ok(Math.abs(cols[cols.length - 1].total - margin) <= 1e-4, `running total ${cols[cols.length - 1].total} vs XGBoost's margin ${margin}`);
    assert.ok(cols.some((c) => c.raw > 0) && cols.some((c) => c.raw < 0), 'trees pull both ways on this row');

    const head = panel.locator('[data-testid=contributions-head]');
    const deadline = Date.now() + 60_000;
    while (!(await head.innerText().catch(() => '')).includes('log-odds')) {
      if (Date.now() > deadline) {
        // The cursor may not have reached the panel as an explanation request: ask for it as a user would.
        await panel.locator('[data-testid=explain-row]').first().click();
      }
      if (Date.now() > deadline + 30_000) throw new Error(`the contributions never showed log-odds: "${await head.innerText().catch(() => '')}"`);
      await sleep(300);
    }
    const text = await head.innerText();
    assert.match(text, new RegExp(`Row ${ROW}\\b`));
    assert.match(text, /log-odds of 1/);
    const prediction = Number(await panel.locator('[data-testid=contributions-prediction]').innerText());
    assert.ok(Math.abs(prediction - margin) <= 5e-3 * Math.abs(margin), `the contributions end at ${prediction}; XGBoost's margin is ${margin}`);
    const probability = Number((await panel.locator('[data-testid=contributions-probability]').innerText()).replace(/[^0-9.]/g, ''));
    assert.ok(Math.abs(probability - expected.predict[ROW - 1][0]) <= 5e-3, `probability ${probability} vs XGBoost's ${expected.predict[ROW - 1][0]}`);
    await panel.locator('[data-testid=disagreement]').scrollIntoViewIfNeeded();
    await wb!.screenshot('boosted-trees-light');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
    await sleep(1_500);
    await wb!.screenshot('boosted-trees-dark');
    await panel.locator('[data-testid=contributions]').scrollIntoViewIfNeeded();
    await wb!.screenshot('boosted-contributions-dark');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
  });
});
