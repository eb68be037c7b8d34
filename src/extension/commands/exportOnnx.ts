// "Copse: Export the Forest to ONNX": the active forest as an ONNX tree ensemble, for any ONNX runtime to score.

import * as path from 'node:path';
import * as vscode from 'vscode';
import { refuseInputAsOutput, saveOnnxFile } from '../engine';
import { guarded } from '../fit/fitFlow';
import { suggestedModelPath } from './saveModel';
import { COMMANDS, type Host } from './host';

export function registerExportOnnx(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.exportOnnx, () =>
    guarded(host.ctx, 'Export', async () => {
      const s = host.ctx.session;
      if (!s) {
        void vscode.window.showInformationMessage('Copse: there is no forest to export yet; fit one on a CSV or open one first.');
        return;
      }
      const uri = await vscode.window.showSaveDialog({
        title: 'Copse: export the forest to ONNX',
        defaultUri: vscode.Uri.file(suggestedModelPath(s.source.path, s.forest.schema.target.name).replace(/\.json$/, '.onnx')),
        filters: { 'ONNX model': ['onnx'] },
      });
      if (!uri) return;
      if (uri.scheme !== 'file') throw new RangeError('Copse exports forests to local files only.');
      await refuseInputAsOutput(uri.fsPath, 'ONNX', [{ file: s.source.path, what: 'the CSV file the forest is shown on' }]);
      const bytes = await saveOnnxFile(uri.fsPath, s.forest);
      host.ctx.log.info(`Exported the forest (${s.forest.trees.length} trees, ${bytes} bytes) to ${uri.fsPath} as ONNX; the encoding is stated in the file's metadata.`);
      void vscode.window.showInformationMessage(`Copse: exported the forest to ${path.basename(uri.fsPath)}.`);
    }),
  );
}
