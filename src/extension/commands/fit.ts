// "Copse: Fit a forest": from the explorer or editor title on a CSV, or the palette.

import * as vscode from 'vscode';
import { fitCommand } from '../fit/fitFlow';
import { COMMANDS, type Host } from './host';

export function registerFit(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.fit, (uri?: vscode.Uri) => fitCommand(host.ctx, host.panel, uri));
}
