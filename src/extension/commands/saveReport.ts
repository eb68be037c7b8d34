// "Copse: Save a Report of This Fit…": the fit on show as one self-contained HTML file, gathered and drawn by the
// same code as `copse fit --report` (src/report), so the editor and the command line give the same file.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { gatherReport, renderReport, writeFileAtomic } from '../engine';
import { guarded } from '../fit/fitFlow';
import { COMMANDS, type Host } from './host';
import { reportRefusal, suggestedReportPath } from './reportPath';

export function registerSaveReport(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.saveReport, () =>
    guarded(host.ctx, 'Report', async () => {
      const s = host.ctx.session;
      if (!s?.coreSummary) {
        void vscode.window.showInformationMessage('Copse: there is no fit on show to report; fit a forest on a CSV first.');
        return;
      }
      const uri = await vscode.window.showSaveDialog({
        title: 'Copse: save a report of this fit',
        defaultUri: vscode.Uri.file(suggestedReportPath(s.source.path)),
        filters: { 'HTML report': ['html'] },
      });
      if (!uri) return;
      if (uri.scheme !== 'file') throw new RangeError('Copse saves reports to local files only.');
      const refused = reportRefusal(uri.fsPath, [{ file: s.source.path, what: 'the data file' }]);
      if (refused) {
        void vscode.window.showErrorMessage(refused);
        return;
      }
      const summary = s.coreSummary;
      const bytes = await fs.stat(s.source.path).then((st) => st.size).catch(() => null);
      const version = (vscode.extensions.getExtension('copse.copse')?.packageJSON as { version?: string } | undefined)?.version ?? 'unknown';
      const html = await vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: 'Copse: drawing the report…' }, () =>
        // Maps, dependence and contributions are a few seconds of core work on the forest in memory.
        Promise.resolve().then(() =>
          renderReport(
            gatherReport({
              summary,
              forest: s.forest,
              encoded: s.encoded,
              rows: s.table.rowCount,
              trainRows: s.knowsMembership ? s.trainRows : null,
              truth: s.truth,
              file: { name: path.basename(s.source.path), bytes },
              model: s.model,
              version,
              chosen: host.panel.shownMap(s),
            }),
          ),
        ),
      );
      await writeFileAtomic(uri.fsPath, html);
      host.ctx.log.info(`Wrote the report of this fit to ${uri.fsPath} (${Math.round(Buffer.byteLength(html) / 1024)} KB).`);
      void vscode.window.showInformationMessage(`Copse: saved the report to ${path.basename(uri.fsPath)}.`);
    }),
  );
}
