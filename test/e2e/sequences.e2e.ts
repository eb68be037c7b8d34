// Sequences a new user meets, in a real workbench (code-server) with Copse installed from its .vsix:
// a regression fit and then a classification fit in the same panel, a planted label error hovered in the
// fitted file, and the saved forest opened again against its own training file. Each figure is checked
// against the `copse` command line, or against core's predictor on the model the CLI saved.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/sequences.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { loadCsv } from '../../src/core/csv/load';
import { trainingRowsIn } from '../../src/core/forest/membership';
import { encodeTable, predictEncoded } from '../../src/core/forest/predict';
import { membershipOf } from '../../src/core/forest/row-votes';
import { loadModel } from '../../src/core/model/file';
import { CliFit, contractHeadline, copseJson } from './copse/cli';
import { EXTENSION_ID, waitForSummary } from './copse/panel';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { sleep } from './harness/processes';
import { launchWorkbench, Workbench } from './workbench';
import { recordFailure } from './copse/failures';

const TREES = 50;
const SEED = 7;
const SETTINGS = {
  'copse.training.trees': TREES,
  'copse.training.seed': SEED,
  'copse.training.featuresPerSplit': 'auto',
  'copse.training.holdout': 0,
  'workbench.colorTheme': 'Default Light Modern',
};
const CLI_FLAGS = ['--trees', String(TREES), '--seed', String(SEED)];
const KITE = 'demo/kite-flights.csv';
const LOAF = 'demo/loaf-rise.csv';
const MODEL = 'kite.cli.forest.json';
/** A planted label error of the kite demo (demo/README.md): recorded "crashed", generated "soared". */
const PLANTED = 35;

describe('Copse sequences: two fits in one panel, a planted error, a saved forest against its own file', function () {
  this.timeout(300_000);
  let temp: string;
  let folder: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  let cliKite: CliFit;
  let cliLoaf: CliFit;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-seq-'));
    folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    fs.cpSync(path.join(repoRoot(), 'demo'), path.join(folder, 'demo'), { recursive: true });
    vsix = packagedVsix();
    const reference = Promise.all([
      copseJson<CliFit>(['fit', path.join(folder, KITE), '--target', 'outcome', ...CLI_FLAGS, '--save', path.join(folder, MODEL)]),
      copseJson<CliFit>(['fit', path.join(folder, LOAF), '--target', 'rise_mm', ...CLI_FLAGS]),
    ]);
    reference.catch(() => undefined);
    wb = await launchWorkbench({ name: 'sequences', folder, vsix: [vsix.file], settings: SETTINGS });
    await wb.waitForReady();
    [cliKite, cliLoaf] = await reference;
  });

  afterEach(async function () {
    await recordFailure(wb, this.currentTest);
  });

  after(async function () {
    await wb?.close();
    fs.rmSync(temp, { recursive: true, force: true });
    if (vsix) fs.rmSync(path.dirname(vsix.file), { recursive: true, force: true });
  });

  it('(1) lists a regression fit\'s doubtful rows, in the light and the dark theme', async function () {
    await wb!.openFile(LOAF, { pin: true });
    await wb!.explorerContextMenu(LOAF, 'Fit a Forest');
    await wb!.pickQuickItem('rise_mm');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    assert.strictEqual(await waitForSummary(panel, 'loaf-rise.csv', 'rise_mm'), contractHeadline(cliLoaf));
    assert.ok(cliLoaf.suspectCount !== null && cliLoaf.suspectCount > 0, `the CLI lists ${cliLoaf.suspectCount} doubtful loaf rows`);
    const rows = await waitForRows(panel.locator('[data-testid=suspects] tbody tr'), Math.min(50, cliLoaf.suspectCount));
    assert.strictEqual(rows, Math.min(50, cliLoaf.suspectCount), 'the panel lists as many doubtful rows as the CLI counts');
    await panel.locator('[data-testid=suspects]').scrollIntoViewIfNeeded();
    await wb!.screenshot('loaf-doubtful-light');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
    await sleep(1_500);
    await wb!.screenshot('loaf-doubtful-dark');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
  });

  it('(2) shows only the second fit in every section after a classification fit in the same panel', async function () {
    await wb!.openFile(KITE, { pin: true });
    await wb!.explorerContextMenu(KITE, 'Fit a Forest');
    await wb!.pickQuickItem('outcome');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    assert.strictEqual(await waitForSummary(panel, 'kite-flights.csv', 'outcome'), contractHeadline(cliKite));
    const kite = [...cliKite.features].sort();
    // Wait until the slower sections (map, small maps, dependence, importance) have drawn for this fit too.
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 60_000 });
    await waitFor(async () => sameSet(await options(panel, 'dependence-feature'), kite), 'the dependence view offers the kite features');
    assert.deepStrictEqual((await options(panel, 'region-x')).sort(), kite, 'the map\'s feature picker');
    assert.deepStrictEqual((await options(panel, 'region-y')).sort(), kite);
    // Nothing of the loaf fit is left anywhere on the page.
    const loafOnly = ['rise_mm', ...cliLoaf.features.filter((f) => !cliKite.features.includes(f))];
    await sleep(3_000);
    const text = await panel.locator('body').innerText();
    for (const name of loafOnly) assert.ok(!text.includes(name), `the kite panel still mentions "${name}" from the loaf fit`);
    // Doubtful rows are listed by class name, and as many as the CLI counts.
    const labels = await panel.locator('[data-testid=suspects] tbody tr td:nth-child(2)').allInnerTexts();
    assert.strictEqual(labels.length, Math.min(50, cliKite.suspectCount!));
    for (const l of labels) assert.ok(cliKite.classes.includes(l.trim()), `doubtful row labelled "${l}"`);
    // A new fit starts at the top of the panel, where its scores are.
    const top = await panel.locator('body').evaluate((el: { ownerDocument: { defaultView: { scrollY: number } | null } }) => el.ownerDocument.defaultView?.scrollY ?? -1);
    assert.strictEqual(top, 0);
    await wb!.screenshot('second-fit');
  });

  it('(3) leads the hover of a planted label error with what the trees that never saw it say', async function () {
    const expected = await outOfBagClass(path.join(folder, MODEL), path.join(folder, KITE), PLANTED);
    assert.strictEqual(expected, 'soared', 'core: the out-of-bag trees of row 35 say soared');
    await wb!.activateTab('kite-flights.csv');
    const text = await wb!.hoverLine(PLANTED + 1, { timeoutMs: 30_000 });
    assert.match(text, /Copse · row 35 \(training row; \d+ of 50 trees never saw it\)/);
    assert.match(text, /Out-of-bag prediction of outcome: soared/);
    assert.match(text, /Label: crashed \(differs\)/);
    assert.match(text, /Doubtful row/);
    assert.ok(text.indexOf('Out-of-bag prediction') < text.indexOf('including the'), 'the all-trees answer comes second');
    await wb!.screenshot('hover-planted');
  });

  it('(4) opens the saved forest against its own training file with the fit\'s out-of-bag score and doubtful rows', async function () {
    await wb!.explorerContextMenu(KITE, 'Open a Saved Forest…');
    await wb!.answerFileDialog(path.join(folder, MODEL));
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitFor(async () => (await panel.locator('[data-testid=warnings]').innerText().catch(() => '')).includes(`Opened from ${MODEL}`), 'the panel shows the opened forest');
    assert.strictEqual(await waitForSummary(panel, 'kite-flights.csv', 'outcome'), contractHeadline(cliKite), 'the out-of-bag score of the fit');
    const rows = await waitForRows(panel.locator('[data-testid=suspects] tbody tr'), Math.min(50, cliKite.suspectCount!));
    assert.strictEqual(rows, Math.min(50, cliKite.suspectCount!), 'as many doubtful rows as the fit');
    const note = await panel.locator('[data-testid=importance]').innerText();
    assert.match(note, /Permutation importance not measured: this is the file the forest was trained on/);
    assert.doesNotMatch(note, /was not computed for this fit/);
    await wb!.activateTab('kite-flights.csv');
    const text = await wb!.hoverLine(PLANTED + 1, { timeoutMs: 30_000 });
    assert.match(text, /Out-of-bag prediction of outcome: soared/);
    assert.doesNotMatch(text, /another file|scored with the forest from/);
    await wb!.activateTab('Copse');
    await wb!.screenshot('opened-own-file');
  });
});

/** The class the out-of-bag trees of a data row give, by core's predictor on the model the CLI saved. */
async function outOfBagClass(modelPath: string, csvPath: string, dataRow: number): Promise<string> {
  const forest = await loadModel(modelPath);
  const load = await loadCsv(csvPath, { target: forest.schema.target.name });
  const rows = trainingRowsIn(forest, load.table, load.fingerprint);
  if (!('trainRows' in rows)) throw new Error(`no training rows: ${rows.unknown}`);
  const x = encodeTable(forest.schema, load.table);
  const p = predictEncoded(forest, x, load.table.rowCount, membershipOf(rows.trainRows, load.table.rowCount, rows.inBag));
  const r = load.table.rowNumber ? load.table.rowNumber.indexOf(dataRow) : dataRow - 1;
  return forest.schema.target.classes![p.oob!.predicted[r]];
}

async function options(panel: ReturnType<Workbench['webview']>, testid: string): Promise<string[]> {
  return (await panel.locator(`[data-testid=${testid}] vscode-option`).allInnerTexts()).map((o) => o.trim());
}

function sameSet(a: string[], b: string[]): boolean {
  return JSON.stringify([...a].sort()) === JSON.stringify([...b].sort());
}

async function waitFor(check: () => Promise<boolean>, what: string, timeoutMs = 60_000): Promise<void> {
  for (const deadline = Date.now() + timeoutMs; !(await check()); ) {
    if (Date.now() > deadline) throw new Error(`timed out: ${what}`);
    await sleep(250);
  }
}

/** Waits until `rows` has `want` elements (or the time is up), and returns how many it has. */
async function waitForRows(rows: ReturnType<ReturnType<Workbench['webview']>['locator']>, want: number, timeoutMs = 60_000): Promise<number> {
  for (const deadline = Date.now() + timeoutMs; (await rows.count()) !== want && Date.now() < deadline; ) await sleep(250);
  return rows.count();
}
