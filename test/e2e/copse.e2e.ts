// Copse end to end: the packaged .vsix installed into a real VS Code 1.100
// workbench (code-server) and used the way a person uses it: explorer menu,
// quick pick, panel, hover, selection, a broken file, a window reload, a
// forest from another library. Every figure the UI shows is checked against
// the `copse` command line on the same file with the same seed and tree count,
// or against core's predictor on a model the CLI saved.
//
// The steps share one workbench and run in order (each builds on the fit
// before it): starting a workbench costs ~20 s, so one start keeps the run short.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/copse.e2e.js
// (run.sh compiles first; bin/copse.js runs the compiled out/, so a mocha run
// on a stale out/ would compare the fresh .vsix with an older CLI.)
// The .vsix is built with `npm run package` first when missing or older than
// its sources (see harness/package.ts; COPSE_E2E_NO_BUILD=1 refuses to build).

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { loadModel } from '../../src/core/model/file';
import type { Forest } from '../../src/core/forest/forest';
import { CliFit, CliVoteRow, CliVotes, contractHeadline, copseJson } from './copse/cli';
import { editorGroups, EXTENSION_ID, groupOf, parseHoverVotes, readConfusion, readDisagreement, waitForSummary } from './copse/panel';
import { changedShare, checkMap, MapPicture, readRegionMap } from './copse/regionMap';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { sleep } from './harness/processes';
import { launchWorkbench, Notification, Workbench } from './workbench';
import { recordFailure } from './copse/failures';

// The extension reads its defaults from these settings; the CLI gets the same
// values as flags, so both grow the same forest.
const TREES = 50;
const SEED = 7;
const SETTINGS = {
  'copse.training.trees': TREES,
  'copse.training.seed': SEED,
  'copse.training.featuresPerSplit': 'auto',
  'copse.training.holdout': 0,
};
const CLI_FLAGS = ['--trees', String(TREES), '--seed', String(SEED)];

const KITE = 'demo/kite-flights.csv';
const LOAF = 'demo/loaf-rise.csv';
// An invented table whose fourth line has one field too few.
const RAGGED = 'ragged.csv';
const RAGGED_TEXT = 'span_cm,weight_g,outcome\n80,120,soared\n95,140,crashed\n70,110\n88,125,soared\n';
// A forest written outside Copse (scikit-learn through onnx.helper; test/core/onnx/fixtures/make_sklearn_onnx.py),
// with features named only by position, and the open dataset it was fitted on.
const FOREIGN = 'sklearn-iris.onnx';
const IRIS = 'iris.csv';

describe('Copse in a real workbench, installed from its .vsix', function () {
  this.timeout(300_000);
  let temp: string;
  let folder: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  let cliKite: CliFit;
  let cliLoaf: CliFit;
  let cliForest: Forest;
  let cliVotes: CliVotes | undefined;
  const durations: Array<{ title: string; ms: number; state: string }> = [];

  before(async function () {
    const started = Date.now();
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-copse-'));
    folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    fs.cpSync(path.join(repoRoot(), 'demo'), path.join(folder, 'demo'), { recursive: true });
    fs.writeFileSync(path.join(folder, RAGGED), RAGGED_TEXT);
    fs.copyFileSync(path.join(repoRoot(), 'test/core/onnx/fixtures', FOREIGN), path.join(folder, FOREIGN));
    fs.copyFileSync(path.join(repoRoot(), 'test/fixtures/open', IRIS), path.join(folder, IRIS));
    vsix = packagedVsix();
    const cliModel = path.join(temp, 'cli-kite.forest.json');
    // The reference fits run while the workbench starts.
    const reference = Promise.all([
      copseJson<CliFit>(['fit', path.join(folder, KITE), '--target', 'outcome', ...CLI_FLAGS, '--save', cliModel]),
      copseJson<CliFit>(['fit', path.join(folder, LOAF), '--target', 'rise_mm', ...CLI_FLAGS]),
    ]);
    reference.catch(() => undefined);
    wb = await launchWorkbench({ name: 'copse', folder, vsix: [vsix.file], settings: SETTINGS });
    await wb.waitForReady();
    [cliKite, cliLoaf] = await reference;
    cliForest = await loadModel(cliModel);
    // eslint-disable-next-line no-console -- timings go to the run's log, never into an assertion.
    console.log(
      `      .vsix ${vsix.built ? `built (${vsix.built}) in ${vsix.buildMs} ms` : 'up to date'}; ` +
        `server up after ${wb.timings.serverMs} ms, workbench ready after ${wb.timings.readyMs} ms, before() ${Date.now() - started} ms`,
    );
  });

  afterEach(async function () {
    const test = this.currentTest!;
    durations.push({ title: test.title, ms: test.duration ?? 0, state: test.state ?? '?' });
    await recordFailure(wb, test);
  });

  after(async function () {
    await wb?.close();
    // A record for the report, not an assertion: times depend on the machine.
    // eslint-disable-next-line no-console -- timings go to the run's log, never into an assertion.
    for (const d of durations) console.log(`      ${d.ms.toString().padStart(7)} ms  ${d.state.padEnd(6)} ${d.title.slice(0, 90)}`);
    if (wb) fs.writeFileSync(path.join(wb.artifacts, 'durations.json'), JSON.stringify(durations, null, 2));
    fs.rmSync(temp, { recursive: true, force: true });
    if (vsix) fs.rmSync(path.dirname(vsix.file), { recursive: true, force: true });
  });

  it('(1) installs the packaged extension', async function () {
    const installed = fs.readdirSync(wb!.server.extensionsDir);
    assert.ok(installed.includes(`${EXTENSION_ID}-${vsix.version}`), `extensions folder: ${JSON.stringify(installed)}`);
    // And the workbench lists it as an enabled extension, under its own name and version.
    await wb!.runCommand('Extensions: Show Enabled Extensions');
    const rows = wb!.page.locator('.extensions-viewlet .monaco-list-row');
    await rows.first().waitFor({ timeout: 30_000 });
    // The list can render again while it fills (a clean run once read it empty right after its first row
    // appeared), so it is read until it names Copse or the time is up.
    const want = `Copse, ${vsix.version}, Publisher copse`;
    let labels: string[] = [];
    for (const deadline = Date.now() + 30_000; !labels.some((l) => l.startsWith(want)) && Date.now() < deadline; ) {
      labels = await rows.evaluateAll((els: Array<{ getAttribute(n: string): string | null }>) => els.map((el) => el.getAttribute('aria-label') ?? ''));
      if (!labels.some((l) => l.startsWith(want))) await sleep(250);
    }
    assert.ok(labels.some((l) => l.startsWith(want)), `enabled extensions: ${JSON.stringify(labels)}`);
    await wb!.runCommand('View: Show Explorer');
  });

  it('(2) fits from the explorer menu and shows the CLI\'s out-of-bag score in a panel beside the file', async function () {
    const offered = await wb!.explorerContextMenuLabels(KITE);
    assert.ok(offered.includes('Fit a Forest'), `context menu of ${KITE}: ${JSON.stringify(offered)}`);
    const notOffered = await wb!.explorerContextMenuLabels('demo/README.md');
    assert.ok(!notOffered.includes('Fit a Forest'), 'the fit command is offered on a Markdown file');

    await wb!.openFile(KITE, { pin: true });
    await wb!.explorerContextMenu(KITE, 'Fit a Forest');
    const title = wb!.page.locator('.quick-input-widget .quick-input-title');
    await title.waitFor({ state: 'visible', timeout: 60_000 });
    assert.strictEqual((await title.innerText()).trim(), 'Copse: fit a forest on kite-flights.csv');
    await wb!.pickQuickItem('outcome');

    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const shown = await waitForSummary(panel, 'kite-flights.csv', 'outcome');
    assert.strictEqual(shown, contractHeadline(cliKite), `panel ${shown}, CLI accuracy ${cliKite.oob?.accuracy}`);
    const confusion = await readConfusion(panel);
    assert.deepStrictEqual(confusion, cliKite.oob!.confusion, 'the panel\'s confusion table differs from the CLI\'s');

    const groups = await editorGroups(wb!.page);
    const csvGroup = groupOf(groups, 'kite-flights.csv');
    const panelGroup = groupOf(groups, 'Copse');
    assert.ok(csvGroup >= 0 && panelGroup > csvGroup, `editor groups, left to right: ${JSON.stringify(groups.map((g) => g.tabs))}`);
    await wb!.screenshot('panel');
  });

  it('(3) draws the decision regions the forest predicts, and redraws for another feature', async function () {
    const frame = await wb!.webviewFrame({ extensionId: EXTENSION_ID });
    await frame.waitForSelector('[data-testid=region-map][data-grid]', { timeout: 60_000 });
    const before = await readRegionMap(frame);
    assert.strictEqual(before.reference, 'typical');
    const first = checkMap(cliForest, before);
    assert.deepStrictEqual(first.problems, [], first.problems.slice(0, 10).join('\n'));
    assert.ok(first.checked >= 40 && first.classesSeen >= 2, `only ${first.checked} cells of ${first.classesSeen} classes were clear enough to check`);
    // The comparison must be able to fail: with the legend's colours handed to the wrong classes it does.
    const rotated = before.legend.map((l, k, all) => ({ label: l.label, colour: all[(k + 1) % all.length].colour }));
    assert.ok(checkMap(cliForest, { ...before, legend: rotated }).problems.length > first.checked / 2, 'the pixel check passes with the colours swapped');

    // Switch the feature across, through the picker as a person does.
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const picker = panel.locator('[data-testid=region-x]');
    const next = ['sail', 'frame', 'tail_ribbons'].find((f) => f !== before.x && f !== before.y)!;
    await picker.click();
    await picker.locator('li[role=option]', { hasText: new RegExp(`^\\s*${next}\\s*$`) }).click();
    const deadline = Date.now() + 60_000;
    let after = before;
    while (after.x !== next || JSON.stringify(after.grid) === JSON.stringify(before.grid)) {
      if (Date.now() > deadline) throw new Error(`the map was not redrawn for ${next} (still ${after.x} x ${after.y}, ${JSON.stringify(after.grid)})`);
      await sleep(200);
      after = await readRegionMap(await wb!.webviewFrame({ extensionId: EXTENSION_ID }));
    }
    const changed = changedShare(before, after);
    assert.ok(changed > 0.05, `only ${(changed * 100).toFixed(1)}% of the map's pixels changed`);
    const second = checkMap(cliForest, after);
    assert.deepStrictEqual(second.problems, [], second.problems.slice(0, 10).join('\n'));
    assert.ok(second.checked >= 10, `only ${second.checked} cells of the ${next} map were clear enough to check`);
    await wb!.screenshot(`map-${next}`);
  });

  it('(4) shows on hover the tree votes `copse votes` reports for that row, and exports a forest that votes the same', async function () {
    await wb!.activateTab('kite-flights.csv');
    // The model the extension itself grew, saved through its command.
    const modelPath = path.join(folder, 'kite.outcome.forest.json');
    await wb!.runCommand('Copse: Save the Forest…');
    await wb!.answerFileDialog(modelPath);
    await wb!.waitForNotification(/saved the forest/);
    assert.ok(fs.existsSync(modelPath), `no model at ${modelPath}`);
    // Rows 4-8 are for the selection step; 35 is one of the demo's planted label errors (demo/README.md).
    cliVotes = await copseJson<CliVotes>(['votes', modelPath, path.join(folder, KITE), '--rows', '2,35,4,5,6,7,8']);
    assert.strictEqual(cliVotes.trees, TREES);
    // The same forest exported to ONNX through the editor votes as the model file does.
    const onnxPath = path.join(folder, 'kite.outcome.forest.onnx');
    await wb!.runCommand('Copse: Export the Forest to ONNX…');
    await wb!.answerFileDialog(onnxPath);
    await wb!.waitForNotification(/exported the forest/);
    const onnxVotes = await copseJson<CliVotes>(['votes', onnxPath, path.join(folder, KITE), '--rows', '2,35,4,5,6,7,8']);
    assert.deepStrictEqual(onnxVotes.rows, cliVotes.rows, 'the exported ONNX file votes otherwise than the saved model');

    await wb!.activateTab('kite-flights.csv');
    for (const row of [2, 35]) {
      const expected: CliVoteRow = cliVotes.rows.find((r) => r.row === row)!;
      const text = await wb!.hoverLine(expected.line, { timeoutMs: 20_000 });
      const hover = parseHoverVotes(text);
      assert.strictEqual(hover.row, row, text);
      assert.strictEqual(hover.trees, TREES, text);
      assert.deepStrictEqual(sortKeys(hover.counts), sortKeys(expected.counts!), `row ${row}: hover ${JSON.stringify(hover.counts)}, CLI ${JSON.stringify(expected.counts)}`);
      // Every row here is a training row: the all-trees answer the CLI gives comes second, after the out-of-bag one.
      assert.match(text, /Out-of-bag prediction of outcome: \w+/);
      assert.match(text, new RegExp(`All ${TREES} trees, including the \\d+ fitted on this row: ${expected.prediction}\\b`));
      if (row === 2) await wb!.screenshot('hover');
    }
  });

  it('(5) follows a selection of several lines with those rows in the disagreement view', async function () {
    assert.ok(cliVotes, 'needs the votes from step 4');
    await wb!.activateTab('kite-flights.csv');
    // Lines 5-9 hold data rows 4-8 (line 1 is the header).
    const status = await wb!.selectLines(5, 9);
    assert.match(status, /selected/);
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const deadline = Date.now() + 20_000;
    let rows = await readDisagreement(panel);
    while (JSON.stringify(rows.map((r) => r.row)) !== '[4,5,6,7,8]') {
      if (Date.now() > deadline) throw new Error(`the disagreement view shows rows ${JSON.stringify(rows.map((r) => r.row))}, not 4-8`);
      await sleep(200);
      rows = await readDisagreement(panel);
    }
    for (const shown of rows) {
      const expected: CliVoteRow = cliVotes.rows.find((r) => r.row === shown.row)!;
      assert.deepStrictEqual(shown.votes, expected.trees, `row ${shown.row}: the panel's per-tree votes differ from copse votes`);
    }
    await panel.locator('[data-testid=disagreement]').scrollIntoViewIfNeeded();
    await wb!.screenshot('selection');
  });

  it('(6) reports a malformed CSV in one readable notification and keeps the extension host up', async function () {
    const hostsBefore = wb!.server.extensionHostLogs().length;
    await wb!.explorerContextMenu(RAGGED, 'Fit a Forest');
    const note = await waitForError(wb!, 30_000);
    assert.strictEqual(note.severity, 'error', JSON.stringify(note));
    assert.match(note.message, /ragged\.csv/, 'the message should name the file');
    assert.match(note.message, /line 4\b/, 'the message should name the bad line');
    assert.doesNotMatch(note.message, /unexpected error|\n\s*at |Error:/, 'the message reads like a bug report');
    assert.ok(note.message.length < 300, `a ${note.message.length}-character message`);
    await wb!.screenshot('malformed-error');
    await wb!.runCommand('Notifications: Clear All Notifications');

    // A second fit, on another file and task, in the same extension host.
    await wb!.activateTab('kite-flights.csv');
    await wb!.openFile(LOAF, { pin: true });
    await wb!.explorerContextMenu(LOAF, 'Fit a Forest');
    await wb!.pickQuickItem('rise_mm');
    const shown = await waitForSummary(wb!.webview({ extensionId: EXTENSION_ID }), 'loaf-rise.csv', 'rise_mm');
    assert.strictEqual(shown, contractHeadline(cliLoaf), `panel ${shown}, CLI R² ${cliLoaf.oob?.r2}`);
    assert.strictEqual(wb!.server.extensionHostLogs().length, hostsBefore, 'a new extension host was started');
    assert.doesNotMatch(wb!.currentExtensionHostLog(), /Extension host terminated|exited with code/);
  });

  it('(7) restores the panel, its forest and its map after a window reload', async function () {
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const before = await waitForSummary(panel, 'loaf-rise.csv', 'rise_mm');
    // Choose a feature pair other than the default, so the reload has something of the user's to keep.
    const shown = await readRegionMap(await wb!.webviewFrame({ extensionId: EXTENSION_ID }));
    const picker = panel.locator('[data-testid=region-x]');
    await picker.click();
    const options = (await picker.locator('li[role=option]').allInnerTexts()).map((o) => o.trim());
    const chosen = options.find((o) => o !== shown.x && o !== shown.y)!;
    assert.ok(chosen, `no third feature among ${JSON.stringify(options)}`);
    await picker.locator('li[role=option]', { hasText: new RegExp(`^\\s*${chosen}\\s*$`) }).click();
    for (const deadline = Date.now() + 60_000; (await readRegionMap(await wb!.webviewFrame({ extensionId: EXTENSION_ID }))).x !== chosen; ) {
      if (Date.now() > deadline) throw new Error(`the map was not redrawn for ${chosen}`);
      await sleep(200);
    }
    await wb!.reload();
    const after = await waitForSummary(wb!.webview({ extensionId: EXTENSION_ID }), 'loaf-rise.csv', 'rise_mm', 60_000);
    assert.strictEqual(after, before);
    const groups = await editorGroups(wb!.page);
    assert.ok(groupOf(groups, 'Copse') > groupOf(groups, 'loaf-rise.csv'), `editor groups: ${JSON.stringify(groups.map((g) => g.tabs))}`);

    const frame = await wb!.webviewFrame({ extensionId: EXTENSION_ID });
    await frame.waitForSelector('[data-testid=region-map][data-grid]', { timeout: 60_000 });
    const map = await readRegionMap(frame);
    const painted = paintedShare(map);
    assert.ok(painted > 0.9, `only ${(painted * 100).toFixed(0)}% of the restored map is painted`);
    // The new extension host draws the pair chosen before the reload, not its default (its own log says
    // which map it scored; the panel's saved picture alone would look the same).
    const firstMap = () => /Map (.+?) × (.+?) \(/.exec(copseLogOfCurrentHost(wb!))?.[1];
    for (const deadline = Date.now() + 60_000; firstMap() === undefined; ) {
      if (Date.now() > deadline) throw new Error('the reloaded extension host drew no map');
      await sleep(200);
    }
    assert.strictEqual(firstMap(), chosen, 'the reloaded host drew another pair than the one chosen');

    // The host has the forest back too (not only the panel's saved picture): the fitted file answers hovers.
    await wb!.activateTab('loaf-rise.csv');
    const text = await wb!.hoverLine(2, { timeoutMs: 30_000 });
    assert.match(text, /Copse · row 1 /);
    assert.match(text, /Out-of-bag prediction of rise_mm: /);
    await wb!.activateTab('Copse');
    await wb!.screenshot('reloaded');
  });

  it('(8) opens an ONNX forest from elsewhere against a CSV, by position once asked, with the votes `copse votes` gives', async function () {
    const expected = await copseJson<CliVotes>(['votes', path.join(folder, FOREIGN), path.join(folder, IRIS), '--rows', '71,120', '--by-position', '--leave-out', 'species']);
    await wb!.explorerContextMenu(FOREIGN, 'Open a Saved Forest…');
    await wb!.answerFileDialog(path.join(folder, IRIS));
    const question = await wb!.waitForDialog(60_000);
    assert.match(question.message, /names its 4 features by position only .* leaving out "species" as the target/, question.message);
    await wb!.answerDialog('Take the columns in order');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const title = panel.locator('h1');
    const deadline = Date.now() + 120_000;
    while ((await title.innerText({ timeout: 2_000 }).catch(() => '')).replace(/\s+/g, ' ').trim() !== 'Copse iris.csv → species') {
      if (Date.now() > deadline) throw new Error('the panel did not show the imported forest on iris.csv');
      await sleep(200);
    }
    // Nothing stands in for what the file does not carry.
    assert.match(await panel.locator('[data-testid=oob-note]').innerText({ timeout: 30_000 }), /unavailable for an imported forest/);

    await wb!.openFile(IRIS, { pin: true });
    for (const want of expected.rows) {
      const text = await wb!.hoverLine(want.line, { timeoutMs: 30_000 });
      const hover = parseHoverVotes(text);
      assert.strictEqual(hover.row, want.row, text);
      assert.strictEqual(hover.trees, expected.trees, text);
      assert.deepStrictEqual(sortKeys(hover.counts), sortKeys(want.counts!), `row ${want.row}: hover ${JSON.stringify(hover.counts)}, CLI ${JSON.stringify(want.counts)}`);
      assert.match(text, /imported from sklearn-iris\.onnx/);
    }
    await wb!.screenshot('imported');
  });
});

/** The Copse output channel of the window's current extension host, as written so far. */
function copseLogOfCurrentHost(wb: Workbench): string {
  const hosts = wb.server.extensionHostLogs();
  const file = path.join(path.dirname(hosts[hosts.length - 1]), 'copse.copse', 'Copse.log');
  return fs.existsSync(file) ? fs.readFileSync(file, 'utf8') : '';
}

/** The first error toast to appear (the file's reading progress toast names it too, as info). */
async function waitForError(wb: Workbench, timeoutMs: number): Promise<Notification> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const shown = await wb.notifications();
    const error = shown.find((n) => n.severity === 'error');
    if (error) return error;
    if (Date.now() > deadline) throw new Error(`no error notification within ${timeoutMs} ms; on screen: ${JSON.stringify(shown)}`);
    await sleep(200);
  }
}

function sortKeys(counts: Record<string, number>): Record<string, number> {
  return Object.fromEntries(Object.entries(counts).sort(([a], [b]) => a.localeCompare(b)));
}

/** Share of the canvas not left in the background colour. */
function paintedShare(map: MapPicture): number {
  let painted = 0;
  const [r, g, b] = map.background;
  for (let o = 0; o < map.pixels.length; o += 4) {
    if (map.pixels[o + 3] > 0 && (map.pixels[o] !== r || map.pixels[o + 1] !== g || map.pixels[o + 2] !== b)) painted++;
  }
  return painted / (map.pixels.length / 4);
}
