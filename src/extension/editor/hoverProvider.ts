// Hovers on CSV rows. Three providers, because VS Code shows each provider's part as soon as it resolves
// (its hover operation merges providers in the order they answer, and renders again as more arrive): the
// votes part reads precomputed arrays and is there at once; a regression row's interval comes from an
// array filled in the background, or one quick request; the contributions part waits for the explanation
// thread, which for a deep regression forest takes a few hundred milliseconds a row.
//
// Parts are ordered by provider rank, and VS Code ranks providers with the same selector newest first, so
// the votes provider is registered last to come first.

import * as vscode from 'vscode';
import type { CopseContext } from '../context';
import type { ForestSession, ScoredFile } from '../session/session';
import { CSV_SELECTOR, lineReader, type CsvDocuments } from './csvDocuments';

export const SHOW_ROW_VOTES_COMMAND = 'copse.showRowVotes';

/** Longest a hover waits for contributions before it settles without them (the work goes on, cached). */
export const CONTRIBUTIONS_WAIT_MS = 15_000;

type HoverRow = { kind: 'fitted'; session: ForestSession; row: number } | { kind: 'other'; session: ForestSession; file: ScoredFile; row: number };

export function registerHover(ctx: CopseContext, docs: CsvDocuments): vscode.Disposable {
  let warned = '';
  const warnOnce = (what: string, e: unknown) => {
    if (e instanceof Error && e.name === 'AbortError') return;
    const text = `${what}: ${e instanceof Error ? e.message : String(e)}`;
    if (text !== warned) ctx.log.warn(text);
    warned = text;
  };

  /** The row under the pointer, when the forest can speak about it and hovers are on. */
  const rowAt = async (doc: vscode.TextDocument, position: vscode.Position): Promise<HoverRow | undefined> => {
    if (!ctx.settings().editor.hover) return undefined;
    const resolved = await docs.resolve(doc);
    if (!resolved || resolved.kind === 'stale') return undefined;
    const read = lineReader(doc);
    if (resolved.kind === 'fitted') {
      const row = resolved.session.rowAtLine(position.line + 1, read);
      if (row !== undefined) return { kind: 'fitted', session: resolved.session, row };
      const lone = await docs.loneLine(resolved.session, doc, position.line + 1);
      return lone ? { kind: 'other', session: resolved.session, file: lone, row: 0 } : undefined;
    }
    const row = resolved.file.lines.rowAt(position.line + 1, read);
    return row === undefined ? undefined : { kind: 'other', session: resolved.session, file: resolved.file, row };
  };

  const part = (text: string | undefined, doc: vscode.TextDocument, position: vscode.Position): vscode.Hover | undefined =>
    text === undefined ? undefined : new vscode.Hover(new vscode.MarkdownString(text, true), doc.lineAt(position.line).range);

  const contributions = vscode.languages.registerHoverProvider(CSV_SELECTOR, {
    async provideHover(doc, position, token) {
      const at = await rowAt(doc, position);
      if (!at || !at.session.explanations) return undefined;
      // A hover dismissed before its row reached the thread withdraws the request: skimming down a file
      // must not leave a queue of rows nobody is looking at any more.
      const gone = new AbortController();
      const sub = token.onCancellationRequested(() => gone.abort());
      const work = at.kind === 'fitted' ? at.session.hoverContributions(at.row, 'now', gone.signal) : at.session.hoverOtherContributions(at.file, at.row, gone.signal);
      try {
        return part(await untilCancelled(work, token, CONTRIBUTIONS_WAIT_MS), doc, position);
      } catch (e) {
        warnOnce('Hover contributions', e);
        return undefined;
      } finally {
        sub.dispose();
      }
    },
  });

  const interval = vscode.languages.registerHoverProvider(CSV_SELECTOR, {
    async provideHover(doc, position, token) {
      const at = await rowAt(doc, position);
      if (!at || !at.session.explanations?.regression) return undefined;
      const level = ctx.settings().explain.intervalLevel;
      const work = at.kind === 'fitted' ? at.session.hoverInterval(at.row, level) : at.session.hoverOtherInterval(at.file, at.row, level);
      try {
        return part(await untilCancelled(work, token, CONTRIBUTIONS_WAIT_MS), doc, position);
      } catch (e) {
        warnOnce('Hover interval', e);
        return undefined;
      }
    },
  });

  const votes = vscode.languages.registerHoverProvider(CSV_SELECTOR, {
    async provideHover(doc, position) {
      if (!ctx.settings().editor.hover) return undefined;
      const resolved = await docs.resolve(doc);
      if (!resolved) return undefined;
      const line = position.line + 1;
      const read = lineReader(doc);
      let text: string;
      if (resolved.kind === 'stale') {
        const row = resolved.session.rowAtLine(line, read);
        if (row === undefined) return undefined;
        text = '**Copse** · this file has changed since the forest was fitted, so its lines no longer match the rows. Fit again to see per-row votes.';
      } else if (resolved.kind === 'fitted') {
        const row = resolved.session.rowAtLine(line, read);
        if (row !== undefined) {
          text = resolved.session.hover(row, (dataRow) => commandLink(doc.uri, dataRow));
          // Completes the walkthrough's "hover a doubtful row" step.
          if (resolved.session.isDoubtful(row)) void vscode.commands.executeCommand('setContext', 'copse.hoveredDoubtfulRow', true);
        } else {
          const lone = await docs.loneLine(resolved.session, doc, line);
          if (!lone) return undefined;
          text = resolved.session.hoverOther(lone, 0);
        }
      } else {
        const row = resolved.file.lines.rowAt(line, read);
        if (row === undefined) return undefined;
        text = resolved.session.hoverOther(resolved.file, row);
      }
      const md = new vscode.MarkdownString(text, true);
      md.isTrusted = { enabledCommands: [SHOW_ROW_VOTES_COMMAND] };
      return new vscode.Hover(md, doc.lineAt(position.line).range);
    },
  });

  return vscode.Disposable.from(contributions, interval, votes);
}

/** The work's answer, or undefined once the hover is gone or the wait is over (the work itself goes on). */
function untilCancelled<T>(work: Promise<T>, token: vscode.CancellationToken, ms: number): Promise<T | undefined> {
  let timer: NodeJS.Timeout | undefined;
  let sub: vscode.Disposable | undefined;
  const gone = new Promise<undefined>((resolve) => {
    timer = setTimeout(() => resolve(undefined), ms);
    sub = token.onCancellationRequested(() => resolve(undefined));
  });
  return Promise.race([work, gone]).finally(() => {
    clearTimeout(timer);
    sub?.dispose();
  });
}

function commandLink(uri: vscode.Uri, dataRow: number): string {
  const args = encodeURIComponent(JSON.stringify([{ uri: uri.toString(), row: dataRow }]));
  return `command:${SHOW_ROW_VOTES_COMMAND}?${args}`;
}
