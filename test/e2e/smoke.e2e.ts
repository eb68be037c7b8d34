// Proves the e2e harness against the bare workbench, before any Copse code is
// installed: each step drives a built-in feature and checks what it did.
// Run: bash scripts/e2e/setup.sh && npx tsc -p tsconfig.json &&
//      npx mocha --timeout 300000 out/test/e2e/*.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { isAlive } from './harness/processes';
import { launchWorkbench, Workbench } from './workbench';

// An invented table. The source column holds URLs because VS Code's built-in
// link detection is the only hover a plain CSV gets without extensions.
const CSV_LINES = [
  'tree_id,height_m,crown_m,source',
  'T3,14.2,5.1,https://example.org/plot/3',
  'T1,9.8,4.0,https://example.org/plot/1',
  'T2,21.5,7.3,https://example.org/plot/2',
];

describe('e2e harness smoke (bare workbench)', function () {
  let folder: string;
  let wb: Workbench | undefined;

  before(async function () {
    folder = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-smoke-'));
    fs.writeFileSync(path.join(folder, 'trees.csv'), `${CSV_LINES.join('\n')}\n`);
    fs.mkdirSync(path.join(folder, 'notes'));
    fs.writeFileSync(path.join(folder, 'notes', 'README.md'), '# Plot survey\n\nHeights in metres.\n');
    wb = await launchWorkbench({ name: 'smoke', folder });
    await wb.waitForReady();
    // eslint-disable-next-line no-console -- timings go to the run's log, never into an assertion.
    console.log(`      server up after ${wb.timings.serverMs} ms, workbench ready after ${wb.timings.readyMs} ms`);
  });

  afterEach(async function () {
    if (this.currentTest?.state === 'failed' && wb) {
      await wb.screenshot(`failed-${this.currentTest.title}`).catch(() => undefined);
      // A dialog or menu left open by the failed step would block every later click.
      await wb.page.keyboard.press('Escape').catch(() => undefined);
    }
  });

  after(async function () {
    await wb?.close();
    fs.rmSync(folder, { recursive: true, force: true });
  });

  it('opens the CSV from the explorer and shows its lines', async function () {
    await wb!.openFile('trees.csv');
    assert.deepStrictEqual((await wb!.visibleLines()).slice(0, CSV_LINES.length), CSV_LINES);
  });

  it('reads the hover of a line', async function () {
    const text = await wb!.hoverLine(2, { column: CSV_LINES[1].indexOf('https') + 5 });
    // Monaco's own wording for a detected link (common practice in VS Code).
    assert.match(text, /Follow link/);
  });

  it('selects lines and runs a built-in command from the palette on them', async function () {
    const status = await wb!.selectLines(2, 4);
    assert.match(status, /selected/);
    assert.strictEqual(await wb!.selectedText(), `${CSV_LINES.slice(1).join('\n')}\n`);
    await wb!.runCommand('Sort Lines Ascending');
    const sorted = [CSV_LINES[0], ...CSV_LINES.slice(1).sort()];
    await waitFor(async () => JSON.stringify((await wb!.visibleLines()).slice(0, 4)) === JSON.stringify(sorted), 'lines to be sorted');
  });

  it('picks an entry from an explorer context menu', async function () {
    await wb!.explorerContextMenu('trees.csv', 'Copy Path');
    const copied = await wb!.page.evaluate<string>('navigator.clipboard.readText()');
    assert.strictEqual(copied, path.join(folder, 'trees.csv'));
  });

  it('picks an entry from the editor context menu', async function () {
    await wb!.openFile('trees.csv');
    await wb!.selectLines(3, 3);
    await wb!.editorContextMenu(3, 'Copy');
    const copied = await wb!.page.evaluate<string>('navigator.clipboard.readText()');
    assert.strictEqual(copied, `${(await wb!.visibleLines())[2]}\n`);
  });

  it('reads a notification and presses one of its buttons', async function () {
    // An unsaved edit, then the file changed on disk underneath: File: Save
    // fails with a toast that offers to overwrite.
    const file = path.join(folder, 'trees.csv');
    await wb!.openFile('trees.csv');
    await wb!.page.keyboard.press('Control+End');
    await wb!.page.keyboard.type('T4,3.3,1.2,https://example.org/plot/4\n');
    await wb!.page.locator('.tab.active.dirty').waitFor();
    const edited = `${(await wb!.visibleLines()).join('\n')}`;
    fs.writeFileSync(file, 'changed on disk\n');
    await new Promise((resolve) => setTimeout(resolve, 1100)); // let the mtime move past the editor's copy
    await wb!.runCommand('File: Save');
    const note = await wb!.waitForNotification(/newer/);
    assert.strictEqual(note.severity, 'error');
    assert.ok(note.buttons.includes('Overwrite'), `buttons: ${JSON.stringify(note.buttons)}`);
    await wb!.clickNotificationButton(/newer/, 'Overwrite');
    await waitFor(() => fs.readFileSync(file, 'utf8') === edited, 'the editor to overwrite the file');
  });

  it('reads and answers a modal dialog', async function () {
    // A bare workbench has no CSV formatter and asks about it in a modal dialog.
    await wb!.runCommand('Format Document');
    const dialog = await wb!.waitForDialog();
    assert.match(dialog.message, /no formatter/);
    assert.ok(dialog.buttons.includes('Cancel'), `buttons: ${JSON.stringify(dialog.buttons)}`);
    await wb!.answerDialog('Cancel');
  });

  it('reaches into a webview', async function () {
    await wb!.openFile('notes/README.md');
    await wb!.runCommand('Markdown: Open Preview');
    const heading = wb!.webview({ extensionId: 'vscode.markdown-language-features' }).locator('h1');
    await heading.waitFor({ timeout: 30_000 });
    assert.strictEqual((await heading.innerText()).trim(), 'Plot survey');
    const frame = await wb!.webviewFrame({ extensionId: 'vscode.markdown-language-features' });
    assert.match(await frame.evaluate<string>('document.body.innerText'), /Heights in metres/);
  });

  it('reloads the window and gets the editors back', async function () {
    await wb!.reload();
    const tabs = await wb!.page.locator('.tabs-container .tab').evaluateAll((els: { getAttribute(n: string): string | null }[]) =>
      els.map((el) => el.getAttribute('data-resource-name')),
    );
    assert.ok(tabs.includes('README.md'), `tabs after reload: ${JSON.stringify(tabs)}`);
  });

  it('saves a screenshot', async function () {
    const file = await wb!.screenshot('after-reload');
    const header = fs.readFileSync(file).subarray(0, 8);
    assert.deepStrictEqual([...header], [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  });

  it('shuts down without leaving a process behind', async function () {
    const before = wb!.processes();
    // code-server, its inner server, an extension host, Chromium and its helpers at the least.
    assert.ok(before.length >= 5, `processes found: ${before.length}`);
    await wb!.close();
    const left = before.filter(isAlive);
    assert.deepStrictEqual(left, [], `still running: ${left.join(', ')}`);
  });
});

async function waitFor(condition: () => boolean | Promise<boolean>, what: string, timeoutMs = 10_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await condition())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}
