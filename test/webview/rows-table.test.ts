// The rows table in headless Chromium against a stand-in host holding 100,000 rows: the panel draws only the
// rows in sight, asks for the pages it scrolls to (never more than a page at a time), sorts by a header with
// aria-sort, filters, moves focus with the keyboard, selects with Space and Shift, and shows a pointed-at
// row's votes. The stand-in's rows are made up here; the figures the host computes are tested in test/extension.
import * as assert from 'node:assert/strict';
import { ROWS_PAGE_MAX, type PanelToHost, type RowsTableRow } from '../../src/protocol/messages';
import { classificationSummary, rowVotes } from './fixtures';
import { PanelPage, type ThemeName } from './harness';

const N = 100_000;

/** The stand-in host's row at a view position: positions are rows, whatever the query. */
function rowOf(pos: number): RowsTableRow {
  const label = pos % 3;
  const predicted = (pos * 7) % 3;
  const margin = (((pos * 7919) % 2001) - 1000) / 1000;
  return { row: pos + 1, line: pos + 2, label, predicted, agreement: 0.4 + (pos % 60) / 100, residual: null, margin, doubtful: margin < 0 };
}

/** Answers every page request posted since the last call; returns the requests. */
async function answer(p: PanelPage, seen: { n: number }): Promise<Array<Extract<PanelToHost, { type: 'rowsPage' }>>> {
  const all = await p.posted();
  const asks = all.slice(seen.n).filter((m): m is Extract<PanelToHost, { type: 'rowsPage' }> => m.type === 'rowsPage');
  seen.n = all.length;
  for (const a of asks) {
    const { offset, limit } = a.request;
    const rows = Array.from({ length: Math.max(0, Math.min(limit, N - offset)) }, (_, k) => rowOf(offset + k));
    await p.send({ type: 'rowsPage', query: a.request.query, page: { total: N, offset, rows } });
  }
  return asks;
}

for (const theme of ['light', 'dark'] as ThemeName[]) {
  describe(`rows table, ${theme} theme (headless Chromium)`, function () {
    this.timeout(180_000);
    let p: PanelPage;
    const seen = { n: 0 };
    const grid = '[data-testid=rows-grid]';

    before(async () => {
      p = await PanelPage.open(theme, { width: 1280, height: 900 });
      await p.send({ type: 'summary', summary: classificationSummary() });
      await answer(p, seen);
      await p.page.locator(grid).scrollIntoViewIfNeeded();
    });
    after(async () => p?.close());

    it('draws only the rows in sight of 100,000, and asks for the pages it scrolls to', async () => {
      const drawn = await p.page.locator(`${grid} [role=row][data-pos]`).count();
      assert.ok(drawn > 5 && drawn < 60, `${drawn} rows drawn`);
      assert.equal(await p.page.locator(grid).getAttribute('aria-rowcount'), String(N + 1));
      await p.page.evaluate(`document.querySelector('${grid}').scrollTop = 26 * 61234`);
      await p.page.waitForTimeout(100);
      const asks = await answer(p, seen);
      assert.ok(asks.length >= 1 && asks.length <= 3, `${asks.length} page requests`);
      for (const a of asks) assert.ok(a.request.limit <= ROWS_PAGE_MAX && Math.abs(a.request.offset - 61_234) < 1_000);
      await p.page.waitForTimeout(100);
      const first = await p.page.locator(`${grid} [data-row]`).first().getAttribute('data-row');
      assert.ok(Math.abs(Number(first) - 61_234) < 20, `first drawn row ${first}`);
      assert.ok((await p.page.locator(`${grid} [role=row][data-pos]`).count()) < 60);
      assert.deepEqual(p.errors, []);
    });

    it('sorts by a header (aria-sort) and filters, asking the host again from the top', async () => {
      await p.clearPosted();
      seen.n = 0;
      const margin = p.page.locator(`${grid} [role=columnheader][data-key=margin]`);
      await margin.locator('button').click();
      const asks = await answer(p, seen);
      assert.equal(asks[0].request.query.sort, 'margin');
      assert.equal(asks[0].request.query.descending, false, 'lowest margin first');
      assert.equal(asks[0].request.offset, 0);
      assert.equal(await margin.getAttribute('aria-sort'), 'ascending');
      assert.equal(await p.page.locator(`${grid} [role=columnheader][data-key=row]`).getAttribute('aria-sort'), 'none');
      await p.page.locator('[data-testid=rows-mismatch]').check();
      const filtered = await answer(p, seen);
      assert.ok(filtered.every((a) => a.request.query.mismatchOnly && a.request.query.sort === 'margin'));
    });

    it('moves focus with the arrow keys, selects with Space and Shift, and shows the pointed-at row\'s votes', async () => {
      await p.page.waitForTimeout(100);
      await p.page.locator(`${grid} [data-pos="0"]`).focus();
      await p.page.keyboard.press('ArrowDown');
      await p.page.keyboard.press('ArrowDown');
      assert.equal(await p.page.evaluate('document.activeElement.dataset.pos'), '2');
      await p.clearPosted();
      await p.page.keyboard.press('Space');
      await p.page.keyboard.press('Shift+ArrowDown');
      await p.page.keyboard.press('ArrowDown');
      await p.page.keyboard.press('Shift+Space');
      const selects = (await p.posted()).filter((m): m is Extract<PanelToHost, { type: 'selectRows' }> => m.type === 'selectRows');
      assert.deepEqual(selects.map((s) => s.rows), [[3], [3, 4, 5]]);
      assert.equal(await p.page.locator(`${grid} [aria-selected=true]`).count(), 3);
      const peek = (await p.waitForPosted((m) => m.type === 'peekRow', 3000)) as Extract<PanelToHost, { type: 'peekRow' }>;
      await p.send({ type: 'rowPeek', row: peek.row, votes: rowVotes(peek.row, 1, 0.3) });
      const box = p.page.locator('[data-testid=rows-peek]');
      assert.match(await box.innerText(), new RegExp(`Row ${peek.row}`));
      assert.equal(await p.page.locator('[data-testid=disagreement]').count(), 1, 'the peek does not pose as the disagreement view');
      await p.page.locator('[data-testid=rows-section]').scrollIntoViewIfNeeded();
      await p.screenshotOf('[data-testid=rows-section]', `rows-table-${theme}.png`);
      assert.deepEqual(p.errors, []);
    });
  });
}
