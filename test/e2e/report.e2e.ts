// "Copse: Save a Report of This Fit…" in a real workbench (code-server, Copse from its .vsix): the editor writes
// the same report as `copse fit --report` for the same fit, apart from the date line, and its save dialog will
// not write over the data file.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/report.e2e.js

import * as assert from 'assert';
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { DATE_LINE } from '../../src/report/html';
import { EXTENSION_ID, waitForSummary } from './copse/panel';
import { packagedVsix, PackagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
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
const KITE = 'demo/kite-flights.csv';

/** The first line where two reports part, for a failure message a reader can act on. */
function firstDifference(a: string, b: string): string {
  const [la, lb] = [a.split('\n'), b.split('\n')];
  const i = la.findIndex((l, k) => l !== lb[k]);
  return i < 0 ? `the CLI's report has ${lb.length - la.length} more lines` : `line ${i + 1}:\n  editor: ${la[i].slice(0, 300)}\n  CLI:    ${(lb[i] ?? '').slice(0, 300)}`;
}

describe('Copse report: the editor command writes what the command line writes', function () {
  this.timeout(300_000);
  let temp: string;
  let folder: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  let cliReport: string;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-report-'));
    folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    fs.cpSync(path.join(repoRoot(), 'demo'), path.join(folder, 'demo'), { recursive: true });
    vsix = packagedVsix();
    const cliOut = path.join(temp, 'cli-report.html');
    const r = spawnSync(process.execPath, [path.join(repoRoot(), 'bin', 'copse.js'), 'fit', path.join(folder, KITE), '--target', 'outcome', '--trees', String(TREES), '--seed', String(SEED), '--report', cliOut], { encoding: 'utf8' });
    assert.strictEqual(r.status, 0, r.stderr);
    cliReport = fs.readFileSync(cliOut, 'utf8');
    wb = await launchWorkbench({ name: 'report', folder, vsix: [vsix.file], settings: SETTINGS });
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

  it('(1) saves the report of the fit on show, the same as `copse fit --report` apart from the date line', async function () {
    await wb!.openFile(KITE, { pin: true });
    await wb!.explorerContextMenu(KITE, 'Fit a Forest');
    await wb!.pickQuickItem('outcome');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    await waitForSummary(panel, 'kite-flights.csv', 'outcome');
    await panel.locator('[data-testid=region-map][data-grid]').waitFor({ timeout: 60_000 });
    await wb!.screenshot('panel-with-report-button');
    const out = path.join(folder, 'kite-report.html');
    await wb!.runCommand('Copse: Save a Report of This Fit…');
    await wb!.answerFileDialog(out);
    await wb!.waitForNotification(/saved the report/, 120_000);
    const editorReport = fs.readFileSync(out, 'utf8');
    assert.ok(!/https?:/i.test(editorReport), 'a network reference in the editor\'s report');
    const [a, b] = [editorReport.replace(DATE_LINE, ''), cliReport.replace(DATE_LINE, '')];
    assert.ok(a === b, `the editor's report differs from the CLI's at ${firstDifference(a, b)}`);
  });

  it('(2) the panel\'s button saves a report too, and never over the data file', async function () {
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    const data = path.join(folder, KITE);
    const before = fs.readFileSync(data, 'utf8');
    await panel.locator('[data-testid=save-report]').click();
    // The web workbench's save dialog adds the filter's extension to a name without it, so the data file's
    // name becomes kite-flights.csv.html; a desktop dialog may return the name as typed, which the command
    // refuses (test/extension/reportPath.test.ts). Either way the data file must be untouched.
    await wb!.answerFileDialog(data);
    // Test (1)'s notice may still be up, so the one awaited here names the file.
    const note = await wb!.waitForNotification(/saved the report to kite-flights\.csv\.html|will not write the report over/, 120_000);
    assert.strictEqual(fs.readFileSync(data, 'utf8'), before, 'the data file changed');
    if (/saved the report to/.test(note.message)) {
      const beside = fs.readFileSync(`${data}.html`, 'utf8');
      assert.ok(beside.startsWith('<!DOCTYPE html>'), 'the report the button saved');
    }
  });
});
