// The rows table's model: every training row's out-of-bag answer, sorted and filtered once per query and
// handed out a page at a time. The same definitions as the fit report (doubtful.ts) decide which rows are doubtful.

import { doubtfulByResidual } from '../forest/doubtful';
import type { RowResults } from '../forest/oob';
import { MAX_PAGE, type RowsTablePage, type RowsTableQuery, type RowsTableRequest, type RowsTableRow } from './rows-table-types';

export { MAX_PAGE };

export interface RowsTableSource {
  readonly rows: RowResults;
  /** Class names for classification; absent for regression. */
  readonly classes?: readonly string[];
  /** 1-based data row of training row i. */
  readonly dataRow: (i: number) => number;
  /** 1-based line of training row i, or null when the file has no text lines. */
  readonly line: (i: number) => number | null;
}

export class RowsTable {
  private readonly n: number;
  private readonly K: number;
  private readonly predicted: Float64Array;
  private readonly agreement: Float64Array | null;
  private readonly score: Float64Array;
  private readonly doubtful: Uint8Array;
  private cachedKey = '';
  private cachedOrder: Int32Array = new Int32Array(0);

  constructor(private readonly source: RowsTableSource) {
    const r = source.rows;
    this.n = r.count;
    this.K = source.classes?.length ?? 0;
    this.predicted = new Float64Array(this.n).fill(NaN);
    this.score = new Float64Array(this.n).fill(NaN);
    this.doubtful = new Uint8Array(this.n);
    if (this.K > 0) {
      const proba = r.oobProba as Float64Array;
      const agreement = new Float64Array(this.n).fill(NaN);
      for (let i = 0; i < this.n; i++) {
        if (r.oobTrees[i] === 0) continue;
        let best = 0;
        for (let k = 1; k < this.K; k++) if (proba[i * this.K + k] > proba[i * this.K + best]) best = k;
        this.predicted[i] = best;
        agreement[i] = proba[i * this.K + best];
        const m = r.margin?.[i] ?? NaN;
        this.score[i] = m;
        if (m < 0) this.doubtful[i] = 1;
      }
      this.agreement = agreement;
    } else {
      this.agreement = null;
      const value = r.oobValue as Float64Array;
      for (let i = 0; i < this.n; i++) if (r.oobTrees[i] > 0) this.predicted[i] = value[i];
      const { rows, scale } = doubtfulByResidual(r.truth, value);
      for (const d of rows) this.doubtful[d.index] = 1;
      // The modified z-score doubtful.ts cuts on: the residual less their median, in robust standard deviations.
      const finite = Array.from(r.truth, (y, i) => y - value[i]).filter(Number.isFinite).sort((a, b) => a - b);
      const h = finite.length >> 1;
      const centre = finite.length % 2 ? finite[h] : (finite[h - 1] + finite[h]) / 2;
      for (let i = 0; i < this.n; i++) {
        if (r.oobTrees[i] > 0 && scale > 0) this.score[i] = (r.truth[i] - value[i] - centre) / scale;
      }
    }
  }

  get rowCount(): number {
    return this.n;
  }

  /** The training row at each position of the query's view, cached for the last query (paging reuses it). */
  order(query: RowsTableQuery): Int32Array {
    const key = JSON.stringify(query);
    if (key === this.cachedKey) return this.cachedOrder;
    const truth = this.source.rows.truth;
    const keep: number[] = [];
    for (let i = 0; i < this.n; i++) {
      if (query.doubtfulOnly && this.doubtful[i] === 0) continue;
      if (query.labelClass !== null && truth[i] !== query.labelClass) continue;
      if (query.mismatchOnly && !(this.K > 0 && this.predicted[i] === this.predicted[i] && this.predicted[i] !== truth[i])) continue;
      keep.push(i);
    }
    const value = this.sortValue(query.sort);
    const sign = query.descending ? -1 : 1;
    // Missing values last in either direction; ties by row, so the order is the same every time.
    keep.sort((a, b) => {
      const va = value(a);
      const vb = value(b);
      const ma = va !== va;
      const mb = vb !== vb;
      if (ma || mb) return ma === mb ? a - b : ma ? 1 : -1;
      return va === vb ? a - b : sign * (va - vb);
    });
    this.cachedKey = key;
    this.cachedOrder = Int32Array.from(keep);
    return this.cachedOrder;
  }

  page(request: RowsTableRequest): RowsTablePage {
    const order = this.order(request.query);
    const offset = Math.max(0, Math.min(Math.floor(request.offset), order.length));
    const end = Math.min(order.length, offset + Math.max(0, Math.min(MAX_PAGE, Math.floor(request.limit))));
    const rows: RowsTableRow[] = [];
    for (let p = offset; p < end; p++) rows.push(this.rowAt(order[p]));
    return { total: order.length, offset, rows };
  }

  rowAt(i: number): RowsTableRow {
    const truth = this.source.rows.truth[i];
    const predicted = this.predicted[i];
    const has = (v: number) => (v === v ? v : null);
    return {
      row: this.source.dataRow(i),
      line: this.source.line(i),
      label: has(truth),
      predicted: has(predicted),
      agreement: this.agreement ? has(this.agreement[i]) : null,
      residual: this.K === 0 && predicted === predicted && truth === truth ? truth - predicted : null,
      margin: has(this.score[i]),
      doubtful: this.doubtful[i] === 1,
    };
  }

  private sortValue(key: RowsTableQuery['sort']): (i: number) => number {
    const truth = this.source.rows.truth;
    switch (key) {
      case 'label':
        return (i) => truth[i];
      case 'predicted':
        return (i) => this.predicted[i];
      case 'agreement':
        return (i) => (this.agreement ? this.agreement[i] : NaN);
      case 'residual':
        return (i) => (this.K === 0 ? truth[i] - this.predicted[i] : NaN);
      case 'margin':
        return (i) => this.score[i];
      default:
        return (i) => this.source.dataRow(i);
    }
  }
}
