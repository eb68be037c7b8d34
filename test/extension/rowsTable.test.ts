// The host's rows table: the session's pages are the fit's own out-of-bag answers (the same margins, doubtful
// rows and order as core's model over the fit's RowResults), numbered as the editor numbers rows, and every
// message the host sends or receives for it passes the protocol's guards, which refuse malformed ones.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { RowsTable } from '../../src/core/summary/rows-table';
import { answerRows } from '../../src/extension/panel/rowsSender';
import { rowsPage, rowsTableOf } from '../../src/extension/session/rowsTable';
import { isHostToPanel, isPanelToHost, ROWS_PAGE_MAX, type RowsTableQuery } from '../../src/protocol/messages';
import { FIXTURES, fitFixture, type Fitted } from './helpers';

const byMargin: RowsTableQuery = { sort: 'margin', descending: false, doubtfulOnly: false, labelClass: null, mismatchOnly: false };

describe('rows table (host)', function () {
  this.timeout(120_000);
  let f: Fitted;
  let h: Fitted;

  before(async () => {
    f = await fitFixture(path.join(FIXTURES, 'wine.csv'), 'cultivar', { trees: 15, seed: 4 });
    h = await fitFixture(path.join(FIXTURES, 'friedman1.csv'), 'y', { trees: 10, seed: 5, minLeaf: 5 }, { holdout: 0.2 });
  });
  after(async () => {
    await f?.session.dispose();
    await h?.session.dispose();
  });

  it('pages the session\'s training rows in the same order, with the same margins, as the fit\'s own out-of-bag answers', () => {
    const s = f.session;
    const fromFit = new RowsTable({ rows: f.report.rows, classes: s.classes, dataRow: (i) => i + 1, line: () => null });
    const want = Array.from(fromFit.order(byMargin), (i) => s.numbering.dataRow(f.report.trainRows[i]));
    const got: number[] = [];
    for (let offset = 0; ; offset += 64) {
      const page = rowsPage(s, { query: byMargin, offset, limit: 64 });
      assert.equal(page.total, f.report.trainRows.length);
      if (page.rows.length === 0) break;
      for (const r of page.rows) {
        const i = f.report.trainRows.indexOf(s.numbering.tableRow(r.row)!);
        assert.equal(r.margin, Number.isNaN(f.report.rows.margin![i]) ? null : f.report.rows.margin![i], `margin of row ${r.row}`);
        // A text file: the row's line is the one the editor opens (header on line 1).
        assert.equal(r.line, s.table.lineOfRow[s.numbering.tableRow(r.row)!]);
      }
      got.push(...page.rows.map((r) => r.row));
    }
    assert.deepEqual(got, want);
    const doubtful = rowsPage(s, { query: { ...byMargin, doubtfulOnly: true }, offset: 0, limit: ROWS_PAGE_MAX });
    assert.deepEqual(doubtful.rows.map((r) => r.row), s.suspects(ROWS_PAGE_MAX).map((r) => r.row), 'the panel\'s doubtful rows, most doubtful first');
    assert.ok(doubtful.total > 0, 'the check needs doubtful rows');
    assert.equal(rowsTableOf(s), rowsTableOf(s), 'built once per session');
  });

  it('answers with messages the panel accepts: a page for its query, a peek with the row\'s votes', () => {
    const s = f.session;
    const request = { query: { ...byMargin, sort: 'agreement' as const, descending: true }, offset: 10, limit: 25 };
    assert.ok(isPanelToHost({ type: 'rowsPage', request }));
    const page = answerRows(s, { type: 'rowsPage', request }, 0.9);
    assert.ok(page.type === 'rowsPage' && page.page.rows.length === 25 && page.page.offset === 10);
    assert.ok(isHostToPanel(JSON.parse(JSON.stringify({ ...page, fit: s.id }))));
    const row = page.page.rows[0].row;
    const peek = answerRows(s, { type: 'peekRow', row }, 0.9);
    assert.ok(peek.type === 'rowPeek' && peek.votes?.row === row && peek.votes.lead === 'out-of-bag');
    assert.ok(isHostToPanel({ ...peek, fit: s.id }));
    const unknown = answerRows(s, { type: 'peekRow', row: 10_000 }, 0.9);
    assert.ok(unknown.type === 'rowPeek' && unknown.votes === null);
  });

  it('gives regression rows residuals and the report\'s scores, training rows only', () => {
    const s = h.session;
    const page = rowsPage(s, { query: { ...byMargin, sort: 'residual', descending: true }, offset: 0, limit: ROWS_PAGE_MAX });
    assert.equal(page.total, h.report.trainRows.length, 'held-out rows are not in the table');
    const first = page.rows[0];
    assert.ok(first.residual !== null && first.agreement === null && first.label !== null && first.predicted !== null);
    assert.ok(Math.abs(first.residual - (first.label - first.predicted)) < 1e-12);
    for (let k = 1; k < page.rows.length; k++) assert.ok((page.rows[k].residual ?? -Infinity) <= first.residual);
    const doubtful = rowsPage(s, { query: { ...byMargin, doubtfulOnly: true }, offset: 0, limit: ROWS_PAGE_MAX });
    assert.deepEqual(new Set(doubtful.rows.map((r) => r.row)), new Set(s.suspects(ROWS_PAGE_MAX).map((r) => r.row)));
  });

  it('refuses malformed rows-table messages at both ends', () => {
    const query = byMargin;
    const row = { row: 3, line: 4, label: 1, predicted: 0, agreement: 0.6, residual: null, margin: -0.2, doubtful: true };
    const page = { total: 10, offset: 0, rows: [row] };
    assert.ok(isHostToPanel({ type: 'rowsPage', fit: 'f', query, page }));
    assert.ok(!isHostToPanel({ type: 'rowsPage', query, page }), 'unstamped');
    assert.ok(!isHostToPanel({ type: 'rowsPage', fit: 'f', query, page: { ...page, offset: 10 } }), 'runs past the view');
    assert.ok(!isHostToPanel({ type: 'rowsPage', fit: 'f', query, page: { ...page, rows: [{ ...row, row: 0 }] } }), 'row 0');
    assert.ok(!isHostToPanel({ type: 'rowsPage', fit: 'f', query, page: { ...page, rows: [{ ...row, doubtful: 'yes' }] } }));
    assert.ok(!isHostToPanel({ type: 'rowsPage', fit: 'f', query: { ...query, sort: 'weight' }, page }), 'unknown sort key');
    assert.ok(!isHostToPanel({ type: 'rowPeek', fit: 'f', row: 3, votes: { row: 4 } }));
    assert.ok(isHostToPanel({ type: 'rowPeek', fit: 'f', row: 3, votes: null }));
    const request = { query, offset: 0, limit: ROWS_PAGE_MAX };
    assert.ok(isPanelToHost({ type: 'rowsPage', request }));
    assert.ok(!isPanelToHost({ type: 'rowsPage', request: { ...request, limit: ROWS_PAGE_MAX + 1 } }), 'more than a page');
    assert.ok(!isPanelToHost({ type: 'rowsPage', request: { ...request, offset: -1 } }));
    assert.ok(!isPanelToHost({ type: 'rowsPage', request: { ...request, query: { ...query, labelClass: 1.5 } } }));
    assert.ok(isPanelToHost({ type: 'selectRows', rows: [3, 9, 12], selected: 3 }));
    assert.ok(!isPanelToHost({ type: 'selectRows', rows: [3, 9, 12], selected: 2 }), 'fewer selected than sent');
    assert.ok(!isPanelToHost({ type: 'peekRow', row: 0 }));
  });
});
