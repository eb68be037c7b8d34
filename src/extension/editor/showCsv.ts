// After a fit or an open from the explorer, the CSV should be on screen: its hovers and marks are half of what
// Copse shows, and the panel opens beside it.

import * as vscode from 'vscode';
import { samePath } from './csvDocuments';

/** Files above this size are left closed: the editor reads them whole, and such a file was fitted on a sample. */
export const SHOW_CSV_MAX_BYTES = 64 * 1024 * 1024;

/**
 * A Parquet or compressed file has no text the editor can show (opening it fails, and would end the command
 * before the panel opens); the panel's rows table is the way into its rows instead.
 */
export async function showCsv(file: string, bytes: number, format: 'text' | 'gzip' | 'parquet' = 'text'): Promise<void> {
  if (format !== 'text') return;
  const shown = vscode.window.visibleTextEditors.some((e) => e.document.uri.scheme === 'file' && samePath(e.document.uri.fsPath, file));
  if (shown || bytes > SHOW_CSV_MAX_BYTES) return;
  await vscode.window.showTextDocument(vscode.Uri.file(file), { viewColumn: vscode.ViewColumn.One, preview: true, preserveFocus: false });
}
