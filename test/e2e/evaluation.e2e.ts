// Ranking, calibration and the decision threshold in a real workbench (code-server) with Copse installed from
// its .vsix: a two-class file (Pima, test/fixtures/open/SOURCES.md) and a three-class one (iris). The curves
// show with the CLI's areas; moving the threshold with the keyboard redraws the confusion tables, and at the
// threshold reached they equal what `copse predict --threshold` gives for the same forest on the same rows.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/evaluation.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { copseJson } from './copse/cli';
import { EXTENSION_ID, waitForSummary } from './copse/panel';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { sleep } from './harness/processes';
import { launchWorkbench, Workbench } from './workbench';
import { recordFailure } from './copse/failures';

const TREES = 50;
const SEED = 7;
const HOLDOUT = 0.25;
const SETTINGS = {
  'copse.training.trees': TREES,
  'copse.training.seed': SEED,
  'copse.training.featuresPerSplit': 'auto',
  'copse.training.holdout': HOLDOUT,
  'workbench.colorTheme': 'Default Light Modern',
};
const CLI_FLAGS = ['--trees', String(TREES), '--seed', String(SEED), '--holdout', String(HOLDOUT)];
const PIMA = 'pima.csv';
const IRIS = 'iris.csv';
const MODEL = 'pima.cli.forest.json';

interface Scores {
  auc?: number;
  confusion?: { labels: string[]; counts: number[][] };
}
interface Fit {
  oob: Scores;
  test?: Scores;
}
interface Predicted {
  outOfBag: Scores;
  predictions: Array<Record<string, string | number | null>>;
}

type Panel = ReturnType<Workbench['webview']>;

async function cells(panel: Panel, id: 'oob' | 'held'): Promise<number[][]> {
  const read = async (c: string) => Number((await panel.locator(`[data-testid=threshold-${id}-${c}]`).innerText()).replace(/,/g, ''));
  return [
    [await read('tn'), await read('fp')],
    [await read('fn'), await read('tp')],
  ];
}

describe('Copse evaluation: curves and the decision threshold, checked against the CLI', function () {
  this.timeout(300_000);
  let temp: string;
  let folder: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  let cliPima: Fit;
  let cliIris: Fit;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-eval-'));
    folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    for (const f of [PIMA, IRIS]) fs.copyFileSync(path.join(repoRoot(), 'test/fixtures/open', f), path.join(folder, f));
    vsix = packagedVsix();
    const reference = Promise.all([
      copseJson<Fit>(['fit', path.join(folder, PIMA), '--target', 'type', ...CLI_FLAGS, '--save', path.join(folder, MODEL)]),
      copseJson<Fit>(['fit', path.join(folder, IRIS), '--target', 'species', ...CLI_FLAGS]),
    ]);
    reference.catch(() => undefined);
    wb = await launchWorkbench({ name: 'evaluation', folder, vsix: [vsix.file], settings: SETTINGS });
    await wb.waitForReady();
    [cliPima, cliIris] = await reference;
  });

  afterEach(async function () {
    await recordFailure(wb, this.currentTest);
  });

  after(async function () {
    await wb?.close();
    if (temp) fs.rmSync(temp, { recursive: true, force: true });
    if (vsix) fs.rmSync(path.dirname(vsix.file), { recursive: true, force: true });
  });

  it('(1) two classes: the curves show the CLI’s AUC, and the threshold control agrees with copse predict --threshold', async function () {
    await wb!.openFile(PIMA, { pin: true });
    await wb!.explorerContextMenu(PIMA, 'Fit a Forest');
    await wb!.pickQuickItem('type');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitForSummary(panel, PIMA, 'type');
    const section = panel.locator('[data-testid=evaluation-section]');
    await section.scrollIntoViewIfNeeded();
    assert.match(await panel.locator('[data-testid=roc-caption]').innerText(), new RegExp(`AUC ${cliPima.oob.auc!.toFixed(3)}`));
    // At 0.50 the control gives the usual answers: the CLI's confusion tables.
    assert.deepStrictEqual(await cells(panel, 'oob'), cliPima.oob.confusion!.counts);
    assert.deepStrictEqual(await cells(panel, 'held'), cliPima.test!.confusion!.counts);
    const before = await cells(panel, 'oob');
    // Twenty steps down with the keyboard, as a person would: 0.50 to 0.30.
    await panel.locator('[data-testid=threshold-slider]').focus();
    for (let i = 0; i < 20; i++) await wb!.page.keyboard.press('ArrowLeft');
    assert.strictEqual(await panel.locator('[data-testid=threshold-value]').innerText(), '0.30');
    const oob = await cells(panel, 'oob');
    const held = await cells(panel, 'held');
    assert.notDeepStrictEqual(oob, before, 'moving the threshold changed the out-of-bag table');
    const predicted = await copseJson<Predicted>(['predict', path.join(folder, MODEL), path.join(folder, PIMA), '--threshold', '0.3']);
    assert.deepStrictEqual(oob, predicted.outOfBag.confusion!.counts, 'the out-of-bag table equals copse predict --threshold 0.3');
    // The held-out rows: copse predict's all-trees answer at 0.3 against the file's own labels.
    const truth = fs.readFileSync(path.join(folder, PIMA), 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').pop()!);
    const counts = [
      [0, 0],
      [0, 0],
    ];
    const code = (v: unknown) => (v === 'Yes' ? 1 : 0);
    for (const r of predicted.predictions) if (r.row_role === 'holdout') counts[code(truth[Number(r.row) - 1])][code(r.predicted_type)]++;
    assert.deepStrictEqual(held, counts, 'the held-out table equals copse predict --threshold 0.3 on the held-out rows');
    await wb!.screenshot('pima-threshold-light');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
    await sleep(1_500);
    await section.scrollIntoViewIfNeeded();
    await wb!.screenshot('pima-threshold-dark');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
  });

  it('(2) three classes: one curve per class with the CLI’s mean AUC, and no threshold control', async function () {
    await wb!.openFile(IRIS, { pin: true });
    await wb!.explorerContextMenu(IRIS, 'Fit a Forest');
    await wb!.pickQuickItem('species');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitForSummary(panel, IRIS, 'species');
    await panel.locator('[data-testid=evaluation-section]').scrollIntoViewIfNeeded();
    assert.match(await panel.locator('[data-testid=roc-caption]').innerText(), new RegExp(`mean AUC ${cliIris.oob.auc!.toFixed(3)}`));
    assert.strictEqual(await panel.locator('[data-testid=threshold]').isVisible(), false);
    await wb!.screenshot('iris-curves-light');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
    await sleep(1_500);
    await wb!.screenshot('iris-curves-dark');
  });
});
