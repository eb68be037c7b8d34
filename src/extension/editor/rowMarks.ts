// Marks suspect rows in the fitted CSV, and follows the selection there so the panel can show the
// selected rows' tree votes and highlight them on the map.

import * as vscode from 'vscode';
import { LIMITS } from '../../protocol/messages';
import type { CopseContext } from '../context';
import type { PanelHost } from '../panel/panelHost';
import { lineReader, type CsvDocuments } from './csvDocuments';

/** Selections settle before we post: dragging a selection fires dozens of events a second. */
const SELECTION_SETTLE_MS = 120;

export class RowMarks implements vscode.Disposable {
  private readonly suspectStyle: vscode.TextEditorDecorationType;
  private readonly disposables: vscode.Disposable[] = [];
  private timer: NodeJS.Timeout | undefined;
  private lastPosted = '';

  constructor(
    private readonly ctx: CopseContext,
    private readonly docs: CsvDocuments,
    private readonly panel: PanelHost,
  ) {
    this.suspectStyle = vscode.window.createTextEditorDecorationType({
      isWholeLine: true,
      backgroundColor: new vscode.ThemeColor('copse.suspectRowBackground'),
      overviewRulerColor: new vscode.ThemeColor('copse.suspectRowRuler'),
      overviewRulerLane: vscode.OverviewRulerLane.Right,
    });
    this.disposables.push(
      this.suspectStyle,
      vscode.window.onDidChangeVisibleTextEditors(() => this.refresh()),
      ctx.onDidChangeSession(() => {
        this.lastPosted = '';
        this.refresh();
      }),
      vscode.workspace.onDidChangeTextDocument((e) => {
        if (this.docs.isFitted(e.document)) this.refresh();
      }),
      vscode.workspace.onDidChangeConfiguration((e) => {
        if (e.affectsConfiguration('copse.editor')) this.refresh();
      }),
      vscode.window.onDidChangeTextEditorSelection((e) => this.selectionChanged(e)),
    );
    this.refresh();
  }

  /** Re-applies suspect marks to every visible editor on the fitted file. */
  refresh(): void {
    const s = this.ctx.session;
    const settings = this.ctx.settings().editor;
    for (const editor of vscode.window.visibleTextEditors) {
      const fitted = this.docs.isFitted(editor.document);
      if (!s || !fitted || !settings.markSuspects || this.docs.isStale(editor.document)) {
        editor.setDecorations(this.suspectStyle, []);
        continue;
      }
      const marks = s.suspectLines(settings.suspectLimit).filter((m) => m.line <= editor.document.lineCount);
      editor.setDecorations(
        this.suspectStyle,
        marks.map((m) => ({ range: editor.document.lineAt(m.line - 1).range })),
      );
    }
  }

  private selectionChanged(e: vscode.TextEditorSelectionChangeEvent): void {
    if (!this.ctx.session || !this.docs.isFitted(e.textEditor.document)) return;
    if (this.docs.isStale(e.textEditor.document)) return;
    if (this.timer) clearTimeout(this.timer);
    const editor = e.textEditor;
    this.timer = setTimeout(() => {
      this.prefetch(editor);
      if (this.panel.isOpen) this.postSelection(editor);
    }, SELECTION_SETTLE_MS);
  }

  /** The row at the cursor is the likeliest next hover: start on its contributions, which take a while. */
  private prefetch(editor: vscode.TextEditor): void {
    const s = this.ctx.session;
    if (!s || !this.ctx.settings().editor.hover) return;
    const row = s.rowAtLine(editor.selection.active.line + 1, lineReader(editor.document));
    if (row !== undefined) s.prefetchContributions(row);
  }

  private postSelection(editor: vscode.TextEditor): void {
    const s = this.ctx.session;
    if (!s) return;
    const read = lineReader(editor.document);
    const tableRows = new Set<number>();
    for (const sel of editor.selections) {
      // A selection of whole lines ends at column 0 of the next line, which it does not really include.
      const endLine = sel.end.character === 0 && sel.end.line > sel.start.line ? sel.end.line - 1 : sel.end.line;
      for (const r of s.lines.rowsBetween(sel.start.line + 1, endLine + 1, read)) {
        tableRows.add(r);
        if (tableRows.size >= LIMITS.selectedRows) break;
      }
      if (tableRows.size >= LIMITS.selectedRows) break;
    }
    const dataRows = [...tableRows].map((r) => s.numbering.dataRow(r));
    const key = dataRows.join(',');
    if (key === this.lastPosted) return;
    this.lastPosted = key;
    if (dataRows.length === 0) this.panel.post({ type: 'highlight', rows: [] });
    else this.panel.showRows(dataRows);
  }

  dispose(): void {
    if (this.timer) clearTimeout(this.timer);
    for (const d of this.disposables.splice(0)) d.dispose();
  }
}
