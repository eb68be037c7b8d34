// Checks the harness's .vsix path end to end with a tiny probe extension
// (test/e2e/fixtures/probe-extension), so that when the real extension's
// .vsix arrives, only the extension can be at fault. It also exercises what
// built-ins cannot: an extension's hover, an explorer submenu and an
// extension-owned webview that posts back to its host.

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { fixturePath, packExtension } from './harness/vsix';
import { launchWorkbench, Workbench } from './workbench';

const PROBE_ID = 'copse-e2e.probe';

describe('e2e harness with an installed .vsix', function () {
  let temp: string;
  let wb: Workbench | undefined;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-vsix-'));
    const folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    // Invented rows.
    fs.writeFileSync(path.join(folder, 'plots.csv'), 'plot,slope_deg,aspect\nP1,12,N\nP2,30,SW\n');
    const vsix = packExtension(fixturePath('probe-extension'), temp);
    wb = await launchWorkbench({ name: 'vsix', folder, vsix: [vsix] });
    await wb.waitForReady();
  });

  afterEach(async function () {
    if (this.currentTest?.state === 'failed' && wb) {
      await wb.screenshot(`failed-${this.currentTest.title}`).catch(() => undefined);
      await wb.page.keyboard.press('Escape').catch(() => undefined);
    }
  });

  after(async function () {
    await wb?.close();
    fs.rmSync(temp, { recursive: true, force: true });
  });

  it('installs the extension into the fresh extensions folder', function () {
    const installed = fs.readdirSync(wb!.server.extensionsDir);
    assert.ok(installed.some((name) => name.startsWith(`${PROBE_ID}-`)), `extensions folder: ${JSON.stringify(installed)}`);
  });

  it('sees the extension activate on the event its manifest names', async function () {
    assert.strictEqual(await wb!.waitForExtensionActivation(PROBE_ID), 'onStartupFinished');
  });

  it("reads the extension's hover", async function () {
    await wb!.openFile('plots.csv');
    const text = await wb!.hoverLine(3);
    assert.match(text, /probe: line 3 has 3 fields/);
  });

  it("runs the extension's command from an explorer submenu and reads its notification", async function () {
    await wb!.explorerContextMenu('plots.csv', 'E2E Probe', 'E2E Probe: Say Hello');
    const note = await wb!.waitForNotification('Probe says hello from plots.csv');
    assert.strictEqual(note.severity, 'info');
  });

  it("reaches into the extension's webview and gets its message back", async function () {
    await wb!.runCommand('E2E Probe: Open Panel');
    const panel = wb!.webview({ extensionId: PROBE_ID });
    assert.strictEqual((await panel.locator('#title').innerText()).trim(), 'Probe panel');
    await panel.locator('#ping').click();
    await wb!.waitForNotification('Panel clicked: ping');
    await wb!.screenshot('probe-panel');
  });

  it('looks past a retained webview while it is hidden, and finds it again when shown', async function () {
    // The probe's panel retains its context, so its iframe stays in the page
    // while another tab is in front, only hidden.
    await wb!.openFile('plots.csv', { pin: true });
    const title = wb!.webview({ extensionId: PROBE_ID }).locator('#title');
    await title.waitFor({ state: 'hidden', timeout: 10_000 });
    await wb!.activateTab('Probe Panel');
    assert.strictEqual((await title.innerText()).trim(), 'Probe panel');
  });
});
