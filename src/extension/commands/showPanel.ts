// "Copse: Show the panel": also what the status bar item runs.

import * as vscode from 'vscode';
import { COMMANDS, type Host } from './host';

export function registerShowPanel(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.showPanel, () => host.panel.reveal(false));
}
