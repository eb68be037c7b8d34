// A new user's first steps, in a real workbench with Copse installed from its .vsix: the walkthrough on the
// Welcome page opens the demo data; the keybindings (checked free in the workbench's own Keyboard Shortcuts
// list) fit the open CSV and show the votes of the row under the cursor; the panel's map controls and its
// doubtful-rows list work from the keyboard alone. Along the way it takes the README's pictures; with
// COPSE_README_IMAGES=1 they are copied into docs/images/ (sizes printed), so they come from this run.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/firststeps.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import type { FrameLocator, Locator, Page } from 'playwright-core';
import { EXTENSION_ID, waitForSummary } from './copse/panel';
import { writeApng } from './harness/apng';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { sleep } from './harness/processes';
import { launchWorkbench, Workbench } from './workbench';
import { recordFailure } from './copse/failures';

const KITE = 'demo/kite-flights.csv';
/** A planted label error of the kite demo (demo/README.md): recorded "crashed", generated "soared". */
const PLANTED = 35;
const README_IMAGES = path.join(repoRoot(), 'docs', 'images');

describe('Copse first steps: walkthrough, keybindings, keyboard-only panel, README pictures', function () {
  this.timeout(300_000);
  let temp: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  const pictures: Record<string, Buffer> = {};
  const frames: Buffer[] = [];

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-first-'));
    const folder = path.join(temp, 'workspace');
    fs.mkdirSync(path.join(folder, 'demo'), { recursive: true });
    fs.copyFileSync(path.join(repoRoot(), KITE), path.join(folder, KITE));
    vsix = packagedVsix();
    wb = await launchWorkbench({
      name: 'firststeps',
      folder,
      vsix: [vsix.file],
      viewport: { width: 1200, height: 760 },
      settings: { 'copse.training.trees': 50, 'copse.training.seed': 7, 'workbench.colorTheme': 'Default Light Modern' },
    });
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

  it('(1) lists the walkthrough on the Welcome page, and its first step opens the demo data', async function () {
    // The walkthrough list: Copse's is offered among the installed ones, and opens on the Welcome page.
    await wb!.runCommand('Welcome: Open Walkthrough...');
    await wb!.pickQuickItem('Get started with Copse');
    const welcome = wb!.page.locator('.gettingStartedContainer');
    await welcome.getByText('Get started with Copse').first().waitFor({ timeout: 30_000 });
    for (const step of ['Open the demo data', 'Fit a forest', 'Hover a doubtful row', 'See why']) {
      assert.ok(await welcome.getByText(step, { exact: true }).first().isVisible(), `step "${step}"`);
    }
    await wb!.screenshot('walkthrough');
    await welcome.getByRole('button', { name: 'Open the Demo Data', exact: true }).click();
    await wb!.page.locator('.tabs-container .tab', { hasText: 'kite-flights.csv' }).first().waitFor({ timeout: 30_000 });
  });

  it('(2) binds its two keys where VS Code\'s own defaults bind nothing', async function () {
    await wb!.runCommand('Preferences: Open Keyboard Shortcuts');
    const editor = wb!.page.locator('.keybindings-editor');
    await editor.waitFor({ timeout: 20_000 });
    for (const [key, title] of [
      ['ctrl+shift+alt+f', 'Fit a Forest'],
      ['ctrl+shift+alt+r', 'Show a Row\'s Tree Votes'],
    ]) {
      await editor.locator('.keybindings-search-input-container .monaco-editor, .search-container .monaco-editor, .search-container input').first().click();
      await wb!.page.keyboard.press('Control+A');
      await wb!.page.keyboard.type(`"${key}"`);
      await sleep(1_500);
      const rows = await editor.locator('.keybindings-table-container .monaco-list-row').allInnerTexts();
      assert.ok(rows.length >= 1, `the list finds Copse's ${key}`);
      assert.strictEqual(rows.length, 1, `only Copse binds ${key}: ${rows.join(' | ')}`);
      assert.match(rows[0], new RegExp(title.replace(/[()']/g, '.')));
    }
    await wb!.page.keyboard.press('Control+W');
  });

  it('(3) fits the open demo file with its key, and shows the row under the cursor with the other', async function () {
    await wb!.activateTab('kite-flights.csv');
    await wb!.page.locator('.monaco-editor .view-lines').first().click();
    await wb!.page.keyboard.press('Control+Shift+Alt+F');
    await wb!.pickQuickItem('outcome');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitForSummary(panel, 'kite-flights.csv', 'outcome');
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 60_000 });
    // Close the panel first: with it open, moving the cursor alone lists the row, and that would pass for the key.
    await wb!.activateTab('Copse');
    await wb!.runCommand('View: Close Editor');
    const copseTabs = wb!.page.locator('.tabs-container .tab').filter({ has: wb!.page.locator('.label-name', { hasText: /^Copse$/ }) });
    await waitFor(async () => (await copseTabs.count()) === 0, 'the panel closes');
    await wb!.activateTab('kite-flights.csv');
    await wb!.page.keyboard.press('Control+G');
    await wb!.page.keyboard.type(String(PLANTED + 1));
    await wb!.page.keyboard.press('Enter');
    await sleep(1_000);
    assert.strictEqual(await copseTabs.count(), 0, 'moving the cursor does not open the panel by itself');
    await wb!.page.keyboard.press('Control+Shift+Alt+R');
    await waitFor(async () => (await copseTabs.count()) === 1, 'the key opens the panel');
    const rowVotes = panel.locator(`[data-testid=disagreement] .vote-row[data-row="${PLANTED}"]`);
    await rowVotes.waitFor({ timeout: 60_000 });
    assert.strictEqual(await panel.locator('[data-testid=disagreement] .vote-row').count(), 1, 'only the row under the cursor is listed');
    assert.strictEqual(await rowVotes.locator('[data-testid=vote-strip]').getAttribute('data-trees'), '50', 'one vote per tree of the fit');
    assert.match(await rowVotes.innerText(), new RegExp(`Row ${PLANTED}\\b`));
    // The README's picture: the pointer parked where it draws no tooltip, the section scrolled fully into view.
    const votes = panel.locator('[data-testid=votes-section]');
    await votes.scrollIntoViewIfNeeded();
    await parkMouse(wb!.page, votes);
    pictures['disagreement'] = await votes.screenshot();
  });

  it('(4) works the map pickers and the doubtful rows from the keyboard alone', async function () {
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const frame = await wb!.webviewFrame({ extensionId: EXTENSION_ID });
    await wb!.runCommand('Copse: Show the Panel');
    // The README's map: the default pair as a reader first sees it, taken before the keyboard changes it.
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 60_000 });
    pictures['region-map'] = await mapPicture(wb!.page, panel);
    const before = (await panel.locator('[data-testid=region-map]').getAttribute('aria-label')) ?? '';
    const focused = () => frame.evaluate<string>(`document.activeElement?.dataset?.testid ?? ''`);
    // Tab from the top of the panel to the first map picker, as a keyboard user would.
    let reached = false;
    for (let i = 0; i < 80 && !reached; i++) {
      await wb!.page.keyboard.press('Tab');
      reached = (await focused()) === 'region-x';
    }
    assert.ok(reached, 'Tab reaches the "Across" picker');
    await wb!.page.keyboard.press('Enter');
    await sleep(300);
    await wb!.page.keyboard.press('ArrowDown');
    await wb!.page.keyboard.press('ArrowDown');
    await wb!.page.keyboard.press('Enter');
    await waitFor(async () => ((await panel.locator('[data-testid=region-map]').getAttribute('aria-label')) ?? '') !== before, 'the map redraws for the feature picked with the keyboard');
    // On to the doubtful rows: Tab until a row's button has focus, then Enter shows it in the editor.
    let row = '';
    for (let i = 0; i < 200 && !row; i++) {
      await wb!.page.keyboard.press('Tab');
      row = await frame.evaluate<string>(`document.activeElement?.closest('[data-testid=suspects]') ? document.activeElement.innerText : ''`);
    }
    assert.match(row, /^Row \d+$/, 'Tab reaches the doubtful-rows list');
    await wb!.page.keyboard.press('Enter');
    const line = Number(row.replace(/\D/g, '')) + 1;
    await waitFor(async () => (await wb!.page.locator('.statusbar').innerText()).includes(`Ln ${line},`), `the editor shows row ${row} (line ${line})`);
  });

  it('(5) takes the README\'s hover and its short capture: right-click, fit, hover', async function () {
    // The capture starts as a new user would: no panel yet, only the file.
    await wb!.activateTab('Copse');
    await wb!.runCommand('View: Close Editor');
    await wb!.openFile(KITE, { pin: true });
    // The tab shows before its text is drawn; a first frame of a blank editor would say nothing.
    await wb!.page.locator('.editor-group-container.active .monaco-editor .view-lines .view-line', { hasText: 'KF-' }).first().waitFor({ timeout: 20_000 });
    await sleep(500);
    frames.push(await shot(wb!.page));
    await wb!.revealInExplorer(KITE);
    const row = wb!.page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'kite-flights.csv' }).first();
    await row.click({ button: 'right' });
    await sleep(600);
    frames.push(await shot(wb!.page));
    await wb!.page.keyboard.press('Escape');
    await wb!.explorerContextMenu(KITE, 'Fit a Forest');
    await sleep(400);
    frames.push(await shot(wb!.page));
    await wb!.pickQuickItem('outcome');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitForSummary(panel, 'kite-flights.csv', 'outcome');
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 60_000 });
    await sleep(800);
    frames.push(await shot(wb!.page));
    // The walkthrough's copy of the demo is open too, under the same tab title: go back through the explorer.
    await wb!.openFile(KITE, { pin: true });
    const text = await wb!.hoverLine(PLANTED + 1, { timeoutMs: 30_000 });
    assert.match(text, /Doubtful row/);
    const full = await shot(wb!.page);
    frames.push(full);
    pictures['hover'] = await wb!.page.locator('.monaco-hover', { hasText: `Copse · row ${PLANTED}` }).last().screenshot();
    const out = wb!.artifacts;
    const sizes: string[] = [];
    const small = await Promise.all(frames.map((f) => shrink(wb!.page, f, 0.5)));
    const apng = path.join(out, 'fit-and-hover.png');
    sizes.push(`fit-and-hover.png ${writeApng(apng, small, [1200, 1200, 1200, 1600, 3000])} bytes`);
    for (const [name, png] of Object.entries(pictures)) {
      fs.writeFileSync(path.join(out, `${name}.png`), png);
      sizes.push(`${name}.png ${png.length} bytes`);
    }
    if (process.env.COPSE_README_IMAGES === '1') {
      fs.mkdirSync(README_IMAGES, { recursive: true });
      for (const name of ['fit-and-hover', ...Object.keys(pictures)]) fs.copyFileSync(path.join(out, `${name}.png`), path.join(README_IMAGES, `${name}.png`));
    }
    // eslint-disable-next-line no-console -- the README's picture sizes go to the run's log, to keep an eye on them.
    console.log(`      README pictures: ${sizes.join(', ')}`);
  });
});

/**
 * Moves the pointer onto a panel section's plain heading, where neither the workbench nor the panel draws a
 * tooltip or a hover mark (the pointer itself is not in the picture).
 */
async function parkMouse(page: Page, section: Locator): Promise<void> {
  const box = await section.locator('h2').first().boundingBox();
  if (!box) throw new Error('the section heading is not on screen');
  await page.mouse.move(box.x + box.width - 4, box.y + box.height / 2);
  await sleep(800);
}

/**
 * The map section from its title down to the legend: the whole section is taller than the panel's view, and
 * a screenshot of it would take the status bar and blank space below the webview with it.
 */
async function mapPicture(page: Page, panel: FrameLocator): Promise<Buffer> {
  const section = panel.locator('[data-testid=map-section]');
  await section.evaluate((el: { scrollIntoView(options: { block: 'start' }): void }) => el.scrollIntoView({ block: 'start' }));
  await parkMouse(page, section);
  const top = await section.boundingBox();
  const bottom = await panel.locator('[data-testid=region-legend]').boundingBox();
  if (!top || !bottom) throw new Error('the map section is not on screen');
  return page.screenshot({ clip: { x: top.x, y: top.y, width: top.width, height: bottom.y + bottom.height + 4 - top.y } });
}

async function shot(page: Page): Promise<Buffer> {
  return page.screenshot();
}

/** Scales a PNG in the browser (a canvas), so the README's capture stays small. */
async function shrink(page: Page, png: Buffer, scale: number): Promise<Buffer> {
  const b64 = await page.evaluate<string>(`(async () => {
    const bytes = Uint8Array.from(atob(${JSON.stringify(png.toString('base64'))}), (c) => c.charCodeAt(0));
    const bitmap = await createImageBitmap(new Blob([bytes], { type: 'image/png' }));
    const canvas = new OffscreenCanvas(Math.round(bitmap.width * ${scale}), Math.round(bitmap.height * ${scale}));
    const ctx = canvas.getContext('2d');
    ctx.imageSmoothingQuality = 'high';
    ctx.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
    const buf = new Uint8Array(await (await canvas.convertToBlob({ type: 'image/png' })).arrayBuffer());
    let text = '';
    for (let i = 0; i < buf.length; i += 0x8000) text += String.fromCharCode(...buf.subarray(i, i + 0x8000));
    return btoa(text);
  })()`);
  return Buffer.from(b64, 'base64');
}

async function waitFor(check: () => Promise<boolean>, what: string, timeoutMs = 30_000): Promise<void> {
  for (const deadline = Date.now() + timeoutMs; !(await check()); ) {
    if (Date.now() > deadline) throw new Error(`timed out: ${what}`);
    await sleep(250);
  }
}
