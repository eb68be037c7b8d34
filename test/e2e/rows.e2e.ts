// The rows table in a real workbench (code-server, Copse installed from its .vsix) on a Parquet file, which
// has no text lines to hover: fit it from the explorer, sort the table by margin, select three rows and see
// their votes in the disagreement view, and point at a row to see its own. The headline score and the count
// of doubtful rows are checked against the `copse` command line on the same file.
//
// Run: bash scripts/e2e/run.sh out/test/e2e/rows.e2e.js

import * as assert from 'assert';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { writeParquetWithDuckDb } from '../core/csv/parquet-writer';
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
const PARQUET = 'kite-flights.parquet';

describe('Copse rows table: a Parquet file\'s rows, sorted, selected and voted on', function () {
  this.timeout(300_000);
  let temp: string;
  let folder: string;
  let vsix: PackagedVsix;
  let wb: Workbench | undefined;
  let cli: CliFit;

  before(async function () {
    temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-rows-'));
    folder = path.join(temp, 'workspace');
    fs.mkdirSync(folder);
    // Written by DuckDB (an independent writer) from the demo CSV, in several row groups.
    await writeParquetWithDuckDb(path.join(repoRoot(), 'demo', 'kite-flights.csv'), path.join(folder, PARQUET), { compression: 'zstd', rowGroupRows: 100 });
    vsix = packagedVsix();
    const reference = copseJson<CliFit>(['fit', path.join(folder, PARQUET), '--target', 'outcome', '--trees', String(TREES), '--seed', String(SEED)]);
    reference.catch(() => undefined);
    wb = await launchWorkbench({ name: 'rows', folder, vsix: [vsix.file], settings: SETTINGS });
    await wb.waitForReady();
    cli = await reference;
  });

  afterEach(async function () {
    await recordFailure(wb, this.currentTest);
  });

  after(async function () {
    await wb?.close();
    fs.rmSync(temp, { recursive: true, force: true });
    if (vsix) fs.rmSync(path.dirname(vsix.file), { recursive: true, force: true });
  });

  it('sorts a Parquet fit\'s rows by margin, shows three selected rows\' votes, in the light and the dark theme', async function () {
    await wb!.explorerContextMenu(PARQUET, 'Fit a Forest');
    await wb!.pickQuickItem('outcome');
    const panel = wb!.webview({ extensionId: EXTENSION_ID });
    assert.strictEqual(await waitForSummary(panel, PARQUET, 'outcome'), contractHeadline(cli), 'the CLI\'s out-of-bag score');
    const grid = panel.locator('[data-testid=rows-grid]');
    await grid.scrollIntoViewIfNeeded();
    await waitFor(async () => (await grid.locator('[data-row]').count()) > 5, 'the rows table draws rows');

    await grid.locator('[role=columnheader][data-key=margin] button').click();
    await waitFor(async () => (await grid.locator('[role=columnheader][data-key=margin]').getAttribute('aria-sort')) === 'ascending', 'sorted by margin');
    await sleep(1_000);
    const margins = (await grid.locator('[data-row] [role=gridcell]:nth-child(5)').allInnerTexts()).map((t) => Number(t.replace('−', '-')));
    assert.ok(margins.length > 5 && margins.every((m, k) => k === 0 || m >= margins[k - 1]), `margins ascending: ${margins.join(' ')}`);
    assert.ok(margins[0] < 0, 'the lowest margin is a doubtful row');
    // No text lines in a Parquet file: rows carry no line link.
    assert.strictEqual(await grid.locator('.rows-line-link').count(), 0);

    const lines = grid.locator('[data-row]');
    const picked = [await lines.nth(0).getAttribute('data-row'), await lines.nth(1).getAttribute('data-row'), await lines.nth(2).getAttribute('data-row')];
    await lines.nth(0).click();
    await lines.nth(1).click({ modifiers: ['Control'] });
    await lines.nth(2).click({ modifiers: ['Control'] });
    const votes = panel.locator('[data-testid=disagreement] .vote-row');
    await waitFor(async () => (await votes.count()) === 3, 'three rows in the disagreement view');
    const shown = await votes.evaluateAll((els) => els.map((e) => (e as unknown as { dataset: { row: string } }).dataset.row));
    assert.deepStrictEqual(shown, picked, 'the selected rows, in the order picked');
    assert.strictEqual(await grid.locator('[aria-selected=true]').count(), 3);

    await lines.nth(4).hover();
    const peek = panel.locator('[data-testid=rows-peek]');
    const pointed = await lines.nth(4).getAttribute('data-row');
    await waitFor(async () => (await peek.innerText().catch(() => '')).includes(`Row ${pointed}`), 'the pointed-at row\'s votes');

    await panel.locator('[data-testid=rows-doubtful]').check();
    await waitFor(async () => (await panel.locator('[data-testid=rows-count]').innerText()).startsWith(`${cli.suspectCount} training rows match`), `the CLI's ${cli.suspectCount} doubtful rows`);

    await panel.locator('[data-testid=rows-section]').scrollIntoViewIfNeeded();
    await wb!.screenshot('rows-table-light');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
    await sleep(1_500);
    await wb!.screenshot('rows-table-dark');
    await wb!.runCommand('Preferences: Toggle between Light/Dark Themes');
  });
});

async function waitFor(check: () => Promise<boolean>, what: string, timeoutMs = 60_000): Promise<void> {
  for (const deadline = Date.now() + timeoutMs; !(await check()); ) {
    if (Date.now() > deadline) throw new Error(`timed out: ${what}`);
    await sleep(250);
  }
}
