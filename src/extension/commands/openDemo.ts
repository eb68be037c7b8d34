// "Open the Demo Data" (the walkthrough's first step): copies the invented kite-flight log that ships with the
// extension into its own storage, so fitting it, hovering it or editing it never touches the installed
// extension, and opens it. An existing copy is kept: the user may have edited it.

import * as vscode from 'vscode';
import { COMMANDS, type Host } from './host';

const DEMO = 'kite-flights.csv';

export function registerOpenDemo(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.openDemo, async () => {
    const ext = host.ctx.extension;
    const source = vscode.Uri.joinPath(ext.extensionUri, 'demo', DEMO);
    const folder = vscode.Uri.joinPath(ext.globalStorageUri, 'demo');
    const target = vscode.Uri.joinPath(folder, DEMO);
    try {
      await vscode.workspace.fs.stat(target);
    } catch {
      await vscode.workspace.fs.createDirectory(folder);
      await vscode.workspace.fs.copy(source, target, { overwrite: false });
      host.ctx.log.info(`Copied the demo data to ${target.fsPath}.`);
    }
    await vscode.window.showTextDocument(target, { preview: false });
  });
}
