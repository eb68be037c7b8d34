// Hovers on CSV rows: the editor seam over ForestSession.hover, which reads precomputed arrays.

import * as vscode from 'vscode';
import type { CopseContext } from '../context';
import { CSV_SELECTOR, lineReader, type CsvDocuments } from './csvDocuments';

export const SHOW_ROW_VOTES_COMMAND = 'copse.showRowVotes';

export function registerHover(ctx: CopseContext, docs: CsvDocuments): vscode.Disposable {
  return vscode.languages.registerHoverProvider(CSV_SELECTOR, {
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
        if (row === undefined) return undefined;
        text = resolved.session.hover(row, (dataRow) => commandLink(doc.uri, dataRow));
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
}

function commandLink(uri: vscode.Uri, dataRow: number): string {
  const args = encodeURIComponent(JSON.stringify([{ uri: uri.toString(), row: dataRow }]));
  return `command:${SHOW_ROW_VOTES_COMMAND}?${args}`;
}
