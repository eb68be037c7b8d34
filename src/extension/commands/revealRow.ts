// Opens the fitted CSV at a data row's first line (the panel's "go to row", and suspect rows).

import * as vscode from 'vscode';
import type { CopseContext } from '../context';
import { COMMANDS, type Host } from './host';

/**
 * Where to show the CSV: an editor already showing it, else a column other than the panel's, so going to a
 * row never covers the panel that asked for it.
 */
function columnFor(doc: vscode.TextDocument, panelColumn: vscode.ViewColumn | undefined): vscode.ViewColumn {
  const open = vscode.window.visibleTextEditors.find((e) => e.document === doc);
  if (open?.viewColumn) return open.viewColumn;
  return panelColumn === vscode.ViewColumn.One ? vscode.ViewColumn.Two : vscode.ViewColumn.One;
}

export async function revealRow(ctx: CopseContext, dataRow: number, panelColumn?: vscode.ViewColumn): Promise<void> {
  const s = ctx.session;
  if (!s) return;
  const t = s.numbering.tableRow(dataRow);
  if (t === undefined) {
    void vscode.window.showInformationMessage(`Copse: row ${dataRow} is not among the rows the forest was fitted on.`);
    return;
  }
  if (s.source.load.format === 'parquet' || s.source.load.format === 'gzip') {
    // No text lines to open (Parquet) or none the editor can show (compressed): the row's votes stand in.
    await vscode.commands.executeCommand(COMMANDS.showRowVotes, { row: dataRow });
    return;
  }
  const line = s.table.lineOfRow[t] - 1;
  const doc = await vscode.workspace.openTextDocument(vscode.Uri.file(s.source.path));
  const at = new vscode.Range(line, 0, line, 0);
  const editor = await vscode.window.showTextDocument(doc, { viewColumn: columnFor(doc, panelColumn), selection: at, preserveFocus: false });
  editor.revealRange(doc.lineAt(line).range, vscode.TextEditorRevealType.InCenterIfOutsideViewport);
}

export function registerRevealRow(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.revealRow, (dataRow: unknown) => {
    if (typeof dataRow === 'number' && Number.isInteger(dataRow)) return revealRow(host.ctx, dataRow, host.panel.viewColumn);
  });
}
