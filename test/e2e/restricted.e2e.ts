// Restricted Mode, in a real workbench (code-server with workspace trust on and no prompt, so the folder
// opens untrusted): Copse is enabled and does what package.json's `capabilities.untrustedWorkspaces` says
// it does (fit, panel, hover), and refuses what it says it refuses: the folder's own settings for how much
// work a fit may do (here `copse.training.trees`), so the user's value applies.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/restricted.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { EXTENSION_ID, waitForSummary } from './copse/panel';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { launchWorkbench, Workbench } from './workbench';
import { recordFailure } from './copse/failures';

const KITE = 'demo/kite-flights.csv';
const USER_TREES = 12;
const FOLDER_TREES = 7;

describe('Copse in Restricted Mode (an untrusted folder)', function () {
  this.timeout(300_000);
  let temp: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-restricted-'));
    const folder = path.join(temp, 'workspace');
    fs.mkdirSync(path.join(folder, '.vscode'), { recursive: true });
    fs.cpSync(path.join(repoRoot(), 'demo', 'kite-flights.csv'), path.join(folder, KITE), { recursive: true });
    // What an untrusted folder would like Copse to do: its settings ask for a different tree count.
    fs.writeFileSync(path.join(folder, '.vscode', 'settings.json'), JSON.stringify({ 'copse.training.trees': FOLDER_TREES }));
    vsix = packagedVsix();
    wb = await launchWorkbench({
      name: 'restricted',
      folder,
      vsix: [vsix.file],
      restricted: true,
      settings: { 'copse.training.trees': USER_TREES, 'copse.training.seed': 7, 'workbench.colorTheme': 'Default Light Modern' },
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

  it('opens the folder in Restricted Mode with Copse enabled and its fit command offered', async function () {
    const statusBar = await wb!.page.locator('.part.statusbar').innerText();
    assert.match(statusBar, /Restricted Mode/, 'the status bar says the folder is not trusted');
    const labels = await wb!.explorerContextMenuLabels(KITE);
    assert.ok(labels.includes('Fit a Forest'), `the explorer offers Copse's fit: ${labels.join(', ')}`);
  });

  it('fits, draws the panel and hovers, with the user\'s tree count rather than the untrusted folder\'s', async function () {
    await wb!.openFile(KITE, { pin: true });
    await wb!.explorerContextMenu(KITE, 'Fit a Forest');
    await wb!.pickQuickItem('outcome');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitForSummary(panel, 'kite-flights.csv', 'outcome');
    const summary = await panel.locator('[data-testid=summary]').innerText();
    assert.match(summary, new RegExp(`\\b${USER_TREES} trees\\b`), 'the user setting applies');
    assert.doesNotMatch(summary, new RegExp(`\\b${FOLDER_TREES} trees\\b`), 'the folder setting is refused in Restricted Mode');
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 60_000 });
    await wb!.screenshot('restricted-panel');
    await wb!.activateTab('kite-flights.csv');
    const hover = await wb!.hoverLine(36, { timeoutMs: 30_000 });
    assert.match(hover, new RegExp(`Copse · row 35 \\(training row; \\d+ of ${USER_TREES} trees never saw it\\)`));
    const log = await waitForLog(wb!, /Restricted Mode: this folder's own settings/);
    assert.ok(log, 'the output log says Restricted Mode applies');
  });
});

/** Copse's output channel as the server wrote it (server-logs/…/Copse.log), waiting for a line. */
async function waitForLog(wb: Workbench, line: RegExp, timeoutMs = 20_000): Promise<boolean> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const logs = findFiles(path.join(wb.server.userDataDir, 'logs'), 'Copse.log');
    if (logs.some((f) => line.test(fs.readFileSync(f, 'utf8')))) return true;
    if (Date.now() > deadline) return false;
    await new Promise((r) => setTimeout(r, 500));
  }
}

function findFiles(dir: string, name: string): string[] {
  if (!fs.existsSync(dir)) return [];
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? findFiles(p, name) : e.name === name ? [p] : [];
  });
}
