// Which open documents the active forest can speak about, and how their lines map to rows: the fitted CSV
// itself (with out-of-bag votes), or another CSV with the same columns (scored once, on first hover).

import * as path from 'node:path';
import * as vscode from 'vscode';
import type { CopseContext } from '../context';
import { loadCsvText } from '../engine';
import { loadForForest } from '../session/loadFor';
import { hasLoneLines, scoreLoneLine } from './loneLines';
import type { ForestSession, ScoredFile } from '../session/session';
import type { LineReader } from '../rows/lineMap';

export const CSV_SELECTOR: vscode.DocumentSelector = [
  { pattern: '**/*.csv' },
  { pattern: '**/*.tsv' },
];

export function isCsvUri(uri: vscode.Uri): boolean {
  return /\.(csv|tsv)$/i.test(uri.path);
}

/** 1-based line reader over a document, the form the pure line map wants. */
export function lineReader(doc: vscode.TextDocument): LineReader {
  return (line) => (line >= 1 && line <= doc.lineCount ? doc.lineAt(line - 1).text : undefined);
}

export function samePath(a: string, b: string): boolean {
  const norm = (p: string) => path.normalize(p).replace(/[\\/]+$/, '');
  return process.platform === 'win32' || process.platform === 'darwin'
    ? norm(a).toLowerCase() === norm(b).toLowerCase()
    : norm(a) === norm(b);
}

/** Lone lines kept scored: a screenful of hovers and then some, each one small. */
const LONE_LINES_KEPT = 256;

type Resolved =
  | { kind: 'fitted'; session: ForestSession }
  | { kind: 'other'; session: ForestSession; file: ScoredFile }
  | { kind: 'stale'; session: ForestSession }
  | undefined;

/** Tracks the fitted file's edits (rows no longer line up) and caches other files' scores per version. */
export class CsvDocuments implements vscode.Disposable {
  private readonly changedSinceFit = new Set<string>();
  private readonly others = new Map<string, { version: number; session: ForestSession; result: Promise<ScoredFile | undefined> }>();
  /** Lines of the fitted file outside its sampled table, scored one at a time; most recent last. */
  private readonly lone = new Map<string, Promise<ScoredFile | undefined>>();
  private readonly disposables: vscode.Disposable[] = [];

  constructor(private readonly ctx: CopseContext) {
    this.disposables.push(
      vscode.workspace.onDidChangeTextDocument((e) => {
        if (e.contentChanges.length === 0) return;
        const s = ctx.session;
        if (s && e.document.uri.scheme === 'file' && samePath(e.document.uri.fsPath, s.source.path)) {
          this.changedSinceFit.add(e.document.uri.toString());
        }
        this.others.delete(e.document.uri.toString());
        this.lone.clear();
      }),
      vscode.workspace.onDidCloseTextDocument((d) => this.others.delete(d.uri.toString())),
      ctx.onDidChangeSession(() => {
        this.changedSinceFit.clear();
        this.others.clear();
        this.lone.clear();
      }),
    );
  }

  /** Whether `doc` is the CSV the active forest was fitted on (or shown against). */
  isFitted(doc: vscode.TextDocument): boolean {
    const s = this.ctx.session;
    return !!s && doc.uri.scheme === 'file' && samePath(doc.uri.fsPath, s.source.path);
  }

  /** Editing the fitted file shifts lines under the rows; until the next fit it gets no per-row answers. */
  isStale(doc: vscode.TextDocument): boolean {
    return this.changedSinceFit.has(doc.uri.toString()) || (this.isFitted(doc) && doc.isDirty);
  }

  async resolve(doc: vscode.TextDocument): Promise<Resolved> {
    const session = this.ctx.session;
    if (!session || !isCsvUri(doc.uri)) return undefined;
    if (this.isFitted(doc)) return this.isStale(doc) ? { kind: 'stale', session } : { kind: 'fitted', session };
    const key = doc.uri.toString();
    let entry = this.others.get(key);
    if (!entry || entry.version !== doc.version || entry.session !== session) {
      entry = { version: doc.version, session, result: this.scoreOther(session, doc) };
      this.others.set(key, entry);
    }
    const file = await entry.result;
    return file && session === this.ctx.session ? { kind: 'other', session, file } : undefined;
  }

  /**
   * A line of the fitted file whose row the fit's sample left out, scored alone (and kept for the next hover):
   * undefined when the table holds every row, or the line is not a whole data record.
   */
  loneLine(session: ForestSession, doc: vscode.TextDocument, line: number): Promise<ScoredFile | undefined> {
    if (!hasLoneLines(session)) return Promise.resolve(undefined);
    const key = `${doc.version}:${line}`;
    let result = this.lone.get(key);
    if (!result) {
      result = scoreLoneLine(session, line, lineReader(doc), (text, o, label) => loadCsvText(text, o, label));
      this.lone.set(key, result);
      if (this.lone.size > LONE_LINES_KEPT) this.lone.delete(this.lone.keys().next().value!);
    }
    return result;
  }

  private async scoreOther(session: ForestSession, doc: vscode.TextDocument): Promise<ScoredFile | undefined> {
    const label = path.basename(doc.uri.path);
    const started = performance.now();
    try {
      const text = doc.getText();
      const { table, delimiter } = await loadForForest((o) => loadCsvText(text, o, label), session.forest.schema);
      const file = await session.scoreOther(table, delimiter, label, () => text);
      this.ctx.log.info(`Scored ${table.rowCount} rows of ${label} with the active forest in ${Math.round(performance.now() - started)} ms (for hovers).`);
      return file;
    } catch (e) {
      // Most CSVs in a workspace are not for this forest; say so once in the log, not in every hover.
      this.ctx.log.info(`No hovers on ${label}: ${e instanceof Error ? e.message : String(e)}`);
      return undefined;
    }
  }

  dispose(): void {
    for (const d of this.disposables.splice(0)) d.dispose();
  }
}
