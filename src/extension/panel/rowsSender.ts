// The panel's rows table, host end: pages and row peeks are answered from the session that was active when
// they were asked for, and stamped with it, so a page of an earlier fit is never drawn into a newer one.

import type { HostMessage, PanelToHost } from '../../protocol/messages';
import { rowsPage } from '../session/rowsTable';
import type { ForestSession } from '../session/session';

type RowsAsk = Extract<PanelToHost, { type: 'rowsPage' | 'peekRow' }>;

/** The answer to a rows-table request: a page of the sorted, filtered view, or one row's votes. */
export function answerRows(session: ForestSession, msg: RowsAsk, intervalLevel: number): HostMessage {
  if (msg.type === 'rowsPage') return { type: 'rowsPage', query: msg.request.query, page: rowsPage(session, msg.request) };
  // The same votes the disagreement view draws for a selected row, so pointing at a row and selecting it agree.
  return { type: 'rowPeek', row: msg.row, votes: session.rowVotes([msg.row], intervalLevel)[0] ?? null };
}
