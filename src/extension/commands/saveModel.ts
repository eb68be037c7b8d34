// "Copse: Save the forest": writes the active forest in core's model format (atomically).

import * as path from 'node:path';
import * as vscode from 'vscode';
import { refuseInputAsOutput, saveModel } from '../engine';
import { guarded } from '../fit/fitFlow';
import { COMMANDS, type Host } from './host';

/** Suggested name: beside the CSV, naming the target, so several forests on one file stay apart. */
export function suggestedModelPath(csvPath: string, target: string): string {
  const base = path.basename(csvPath).replace(/\.[^.]+$/, '');
  const safe = target.replace(/[^\w.-]+/g, '_');
  return path.join(path.dirname(csvPath), `${base}.${safe}.forest.json`);
}

export function registerSaveModel(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.saveModel, () =>
    guarded(host.ctx, 'Save', async () => {
      const s = host.ctx.session;
      if (!s) {
        void vscode.window.showInformationMessage('Copse: there is no forest to save yet; fit one on a CSV first.');
        return;
      }
      const uri = await vscode.window.showSaveDialog({
        title: 'Copse: save the forest',
        defaultUri: vscode.Uri.file(suggestedModelPath(s.source.path, s.forest.schema.target.name)),
        filters: { 'Copse forest': ['json'] },
      });
      if (!uri) return;
      if (uri.scheme !== 'file') throw new RangeError('Copse saves forests to local files only.');
      await refuseInputAsOutput(uri.fsPath, 'model', [{ file: s.source.path, what: `the CSV file the forest is shown on` }]);
      await saveModel(uri.fsPath, s.forest);
      host.ctx.log.info(`Saved the forest (${s.forest.trees.length} trees) to ${uri.fsPath}.`);
      void vscode.window.showInformationMessage(`Copse: saved the forest to ${path.basename(uri.fsPath)}.`);
    }),
  );
}
