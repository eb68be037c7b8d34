// The hover's "show this row's tree votes" link: opens the panel on that row's disagreement view.

import * as vscode from 'vscode';
import { COMMANDS, type Host } from './host';

export function registerShowRowVotes(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.showRowVotes, (arg: unknown) => {
    const row = typeof arg === 'object' && arg !== null ? (arg as { row?: unknown }).row : undefined;
    if (typeof row !== 'number' || !Number.isInteger(row) || !host.ctx.session) return;
    host.panel.reveal(true);
    host.panel.showRows([row]);
  });
}
