// "Copse: Predict into a new CSV": scores a CSV with the active forest and writes a copy with the
// prediction columns appended. The input is never overwritten.

import * as path from 'node:path';
import * as vscode from 'vscode';
import { encodeTable, predictionColumns, refuseInputAsOutput, writeScored } from '../engine';
import { guarded, readCsv, requireFile, resolveCsv } from '../fit/fitFlow';
import { COMMANDS, type Host } from './host';

export function suggestedOutputPath(input: string): string {
  // A compressed CSV is scored into plain CSV; Parquet into Parquet.
  if (/\.gz$/i.test(input)) input = input.slice(0, -3);
  const ext = path.extname(input) || '.csv';
  return path.join(path.dirname(input), `${path.basename(input, ext)}.predictions${ext}`);
}

export function registerPredictToFile(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.predictToFile, (uri?: vscode.Uri) =>
    guarded(host.ctx, 'Predict', async () => {
      const { ctx } = host;
      const session = ctx.session;
      if (!session) {
        const open = 'Open a saved forest…';
        const answer = await vscode.window.showInformationMessage('Copse: predictions need a forest. Fit one, or open a saved one.', open);
        if (answer === open) await vscode.commands.executeCommand(COMMANDS.openModel);
        return;
      }
      const input = await resolveCsv(uri, `Copse: choose a CSV to predict ${session.forest.schema.target.name} for`);
      if (!input) return;
      const inputPath = requireFile(input);
      const out = await vscode.window.showSaveDialog({
        title: 'Copse: write the predictions to',
        defaultUri: vscode.Uri.file(suggestedOutputPath(inputPath)),
        filters: /\.parquet$/i.test(inputPath) ? { Parquet: ['parquet'], 'Delimited text': ['csv'] } : { 'Delimited text': [path.extname(suggestedOutputPath(inputPath)).slice(1) || 'csv'], Parquet: ['parquet'] },
      });
      if (!out) return;
      const outPath = requireFile(out);
      // Through links too: the same check as the command line's (core/output-guard.ts).
      await refuseInputAsOutput(outPath, 'output', [
        { file: inputPath, what: 'the input file', refusal: `Copse writes predictions to a new file and never over its input ${path.basename(inputPath)}; choose another name.` },
        { file: session.source.path, what: "the forest's CSV file" },
      ]);
      const loaded = await readCsv(ctx, inputPath, { everyRow: true, forest: session.forest.schema });
      if (!loaded) return;
      const started = performance.now();
      const x = encodeTable(session.forest.schema, loaded.load.table, path.basename(inputPath));
      const prediction = await vscode.window.withProgress(
        { location: vscode.ProgressLocation.Notification, title: `Copse: predicting ${loaded.load.table.rowCount} rows` },
        () => session.scorer.predict(x, loaded.load.table.rowCount),
      );
      const { table, header, delimiter } = loaded.load;
      const added = predictionColumns(session.forest, prediction, header);
      // The same writer as `copse predict --out`: records copied as they stand, written atomically.
      const rowOf = new Map<number, number>();
      for (let i = 0; i < table.rowCount; i++) rowOf.set(table.rowNumber ? table.rowNumber[i] : i + 1, i);
      const textColumns = session.forest.schema.target.task === 'classification' ? [0] : [];
      await writeScored(inputPath, outPath, delimiter, added, textColumns, (k) => rowOf.get(k + 1) ?? -1);
      ctx.log.info(`Predicted ${prediction.rows} rows of ${inputPath} into ${outPath} (${added.names.join(', ')}) in ${Math.round(performance.now() - started)} ms.`);
      const openIt = 'Open';
      const answer = await vscode.window.showInformationMessage(`Copse: wrote ${prediction.rows} predictions to ${path.basename(outPath)}.`, openIt);
      if (answer === openIt) await vscode.commands.executeCommand('vscode.open', vscode.Uri.file(outPath));
    }),
  );
}
