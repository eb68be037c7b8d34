// The rows table's model: sorting, the three filters and paging over every training row's out-of-bag answer.
import * as assert from 'node:assert/strict';
import { doubtfulByMargin, doubtfulByResidual } from '../../src/core/forest/doubtful';
import { fitForest } from '../../src/core/forest/fit';
import { MAX_PAGE, RowsTable } from '../../src/core/summary/rows-table';
import type { RowsTableQuery } from '../../src/core/summary/rows-table-types';
import { threeClass } from './helpers/synthetic';

const every: RowsTableQuery = { sort: 'row', descending: false, doubtfulOnly: false, labelClass: null, mismatchOnly: false };

describe('rows table', function () {
  this.timeout(120_000);

  it('sorts by margin with rows lacking out-of-bag trees last, filters as the fit report counts, and pages without gaps', async () => {
    const table = threeClass(900);
    const fit = await fitForest(table, { target: 'label', params: { trees: 12, seed: 3 }, workers: 1, permutationImportance: false });
    const rows = fit.rows;
    const t = new RowsTable({ rows, classes: ['a', 'b', 'c'], dataRow: (i) => i + 1, line: () => null });
    const byMargin = { ...every, sort: 'margin' as const };
    const order = t.order(byMargin);
    assert.equal(order.length, rows.count);
    const margins = Array.from(order, (i) => rows.margin![i]);
    const known = margins.filter((m) => !Number.isNaN(m));
    for (let k = 1; k < known.length; k++) assert.ok(known[k - 1] <= known[k], `margin order at ${k}`);
    assert.ok(margins.slice(known.length).every(Number.isNaN), 'rows no tree had out-of-bag come last');

    const doubtful = t.order({ ...byMargin, doubtfulOnly: true });
    assert.ok(doubtful.length > 0, 'the check needs doubtful rows');
    assert.deepEqual(Array.from(doubtful), doubtfulByMargin(rows.margin!).map((d) => d.index), 'the same rows, in the same order, as the report');

    const mismatch = t.order({ ...every, mismatchOnly: true });
    for (const i of mismatch) assert.notEqual(t.rowAt(i).predicted, rows.truth[i]);
    const classB = t.order({ ...every, labelClass: 1 });
    assert.equal(classB.length, rows.truth.filter((v) => v === 1).length);

    // Pages of 137 put back together are the whole view; no page exceeds the cap.
    const seen: number[] = [];
    for (let offset = 0; ; offset += 137) {
      const page = t.page({ query: byMargin, offset, limit: 137 });
      assert.equal(page.total, rows.count);
      if (page.rows.length === 0) break;
      seen.push(...page.rows.map((r) => r.row - 1));
    }
    assert.deepEqual(seen, Array.from(order));
    assert.equal(t.page({ query: every, offset: 0, limit: 100_000 }).rows.length, MAX_PAGE);
    const first = t.page({ query: byMargin, offset: 0, limit: 1 }).rows[0];
    assert.equal(first.margin, known[0]);
    assert.equal(first.line, null);
    assert.equal(first.doubtful, true);
  });

  it('gives residuals and the report\'s doubtful rows for regression', async () => {
    const table = threeClass(600);
    const value = { name: 'value', kind: 'numeric' as const, values: Float64Array.from({ length: 600 }, (_, i) => (i % 50 === 0 ? 40 : (i % 7) * 1.5)) };
    const fit = await fitForest({ ...table, columns: [...table.columns.filter((c) => c.name !== 'label'), value] }, { target: 'value', params: { trees: 10, seed: 2 }, workers: 1, permutationImportance: false });
    const rows = fit.rows;
    const t = new RowsTable({ rows, dataRow: (i) => i + 1, line: (i) => i + 2 });
    const report = doubtfulByResidual(rows.truth, rows.oobValue!).rows;
    assert.ok(report.length > 0, 'the check needs doubtful rows');
    assert.deepEqual(Array.from(t.order({ ...every, doubtfulOnly: true })), report.map((d) => d.index).sort((a, b) => a - b));
    for (const d of report) assert.ok(Math.abs(t.rowAt(d.index).margin! - d.score) < 1e-12, 'the same score as the report');
    const r = t.rowAt(0);
    assert.equal(r.line, 2);
    assert.equal(r.agreement, null);
    assert.equal(r.residual, rows.truth[0] - rows.oobValue![0]);
    const byResidual = t.order({ ...every, sort: 'residual', descending: true });
    const top = t.rowAt(byResidual[0]).residual!;
    assert.ok(Array.from({ length: rows.count }, (_, i) => t.rowAt(i).residual ?? -Infinity).every((v) => v <= top));
  });
});
