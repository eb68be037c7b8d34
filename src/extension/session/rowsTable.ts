// The session's rows table: core's model (src/core/summary/rows-table.ts) over the session's own scored rows,
// built on the first page asked for and kept while the session lives. Nothing is computed here but the mapping
// from training rows to the numbers the panel shows (data rows, and text lines where there are any).

import { RowsTable } from '../../core/summary/rows-table';
import type { RowsTablePage, RowsTableRequest } from '../../protocol/messages';
import type { ForestSession } from './session';

const tables = new WeakMap<ForestSession, RowsTable>();

/** The rows table of a session; a file without editable text lines (Parquet, gzip) gets no line numbers. */
export function rowsTableOf(session: ForestSession): RowsTable {
  let table = tables.get(session);
  if (!table) {
    const train = session.trainRows;
    const hasLines = session.source.load.format !== 'parquet' && session.source.load.format !== 'gzip';
    const classes = session.task === 'classification' ? session.classes : undefined;
    table = new RowsTable({
      rows: session.store.trainingResults(train),
      classes,
      dataRow: (i) => session.numbering.dataRow(train[i]),
      line: hasLines ? (i) => session.table.lineOfRow[train[i]] : () => null,
    });
    tables.set(session, table);
  }
  return table;
}

/** One page of the session's rows table; the request was checked by the protocol's guard. */
export function rowsPage(session: ForestSession, request: RowsTableRequest): RowsTablePage {
  return rowsTableOf(session).page(request);
}
