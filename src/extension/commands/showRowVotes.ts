// "Show a Row's Tree Votes": from the hover's link (with the row), or from the keyboard / palette on the
// row under the cursor in the fitted file. Opens the panel on that row's disagreement view.

import * as vscode from 'vscode';
import { lineReader, samePath } from '../editor/csvDocuments';
import { COMMANDS, type Host } from './host';

export function registerShowRowVotes(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.showRowVotes, async (arg: unknown) => {
    const session = host.ctx.session;
    if (!session) return;
    let row = typeof arg === 'object' && arg !== null ? (arg as { row?: unknown }).row : undefined;
    if (row === undefined) row = rowAtCursor(host);
    if (row === undefined) {
      await vscode.window.showInformationMessage(`Put the cursor on a data row of ${session.source.path} to see its tree votes.`);
      return;
    }
    if (typeof row !== 'number' || !Number.isInteger(row)) return;
    host.panel.reveal(true);
    host.panel.showRows([row]);
  });
}

/** The data row (as the panel and hovers number it) under the cursor, when the active editor shows the fitted file. */
function rowAtCursor(host: Host): number | undefined {
  const editor = vscode.window.activeTextEditor;
  const session = host.ctx.session;
  if (!editor || !session || editor.document.uri.scheme !== 'file' || !samePath(editor.document.uri.fsPath, session.source.path)) return undefined;
  const tableRow = session.rowAtLine(editor.selection.active.line + 1, lineReader(editor.document));
  return tableRow === undefined ? undefined : session.numbering.dataRow(tableRow);
}
