// "Copse: Open a saved forest": load a model file, then pick the CSV to look at it against.

import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { loadModel, Scorer } from '../engine';
import { guarded, readCsv, requireFile } from '../fit/fitFlow';
import { ForestSession } from '../session/session';
import { ExplainClient } from '../workers/explainClient';
import { openedSummary } from '../summary/openedSummary';
import { COMMANDS, type Host } from './host';

export function registerOpenModel(host: Host): vscode.Disposable {
  return vscode.commands.registerCommand(COMMANDS.openModel, (uri?: vscode.Uri) => openModelCommand(host, uri));
}

async function openModelCommand(host: Host, uri?: vscode.Uri): Promise<void> {
  const { ctx, panel } = host;
  await guarded(ctx, 'Open forest', async () => {
    // From a CSV's menu the CSV is known and the model is asked for; otherwise model first, then CSV.
    const given = uri instanceof vscode.Uri ? uri : undefined;
    const csvGiven = given && /\.(csv|tsv)$/i.test(given.path) ? given : undefined;
    let modelUri = given && !csvGiven ? given : undefined;
    if (!modelUri) {
      const picked = await vscode.window.showOpenDialog({
        title: 'Copse: open a saved forest',
        canSelectMany: false,
        defaultUri: csvGiven ? vscode.Uri.file(path.dirname(csvGiven.fsPath)) : undefined,
        filters: { 'Copse forest': ['json'], 'All files': ['*'] },
      });
      modelUri = picked?.[0];
    }
    if (!modelUri) return;
    const modelPath = requireFile(modelUri);
    const forest = await loadModel(modelPath);
    let csvUri = csvGiven;
    if (!csvUri) {
      const picked = await vscode.window.showOpenDialog({
        title: `Copse: choose a CSV to inspect ${path.basename(modelPath)} against`,
        canSelectMany: false,
        defaultUri: vscode.Uri.file(path.dirname(modelPath)),
        filters: { 'Delimited text': ['csv', 'tsv', 'txt'], 'All files': ['*'] },
      });
      csvUri = picked?.[0];
    }
    if (!csvUri) return;
    const loaded = await readCsv(ctx, requireFile(csvUri), { forest: forest.schema });
    if (!loaded) return;
    const label = path.basename(loaded.path);
    const warnings = [...loaded.load.warnings];
    if (loaded.sampled) {
      warnings.push(`Shown against a random sample of ${loaded.load.table.rowCount} of ${loaded.load.rowsRead} rows.`);
    }
    const scorer = new Scorer(forest);
    const started = performance.now();
    let session: ForestSession;
    try {
      session = await ForestSession.create({
        forest,
        source: {
          path: loaded.path,
          label,
          delimiter: loaded.load.delimiter,
          fingerprint: loaded.load.fingerprint,
          rowsRead: loaded.load.rowsRead,
          sampleRows: loaded.sampleRows,
          sampleSeed: loaded.sampleSeed,
          header: loaded.load.header,
        },
        table: loaded.load.table,
        text: () => readFileSync(loaded.path, 'utf8'),
        summary: ({ prediction, truth }) =>
          openedSummary({
            forest,
            prediction,
            truth,
            dataset: { label, uri: csvUri.toString() },
            rowsRead: loaded.load.rowsRead,
            sampled: loaded.sampled,
            fingerprint: loaded.load.fingerprint,
            modelLabel: path.basename(modelPath),
            warnings,
          }),
        scorer,
        explainer: (setup) => new ExplainClient(setup),
        // Intervals need the forest's training rows: they are there when this CSV is its training file.
        quantiles: { from: 'table' },
        intervalLevel: ctx.settings().explain.intervalLevel,
      });
    } catch (e) {
      await scorer.dispose();
      throw e;
    }
    ctx.setSession(session);
    ctx.log.info(
      `Opened ${modelPath} (${forest.trees.length} trees predicting ${forest.schema.target.name}) against ${loaded.path}: ` +
        `${loaded.load.table.rowCount} rows read in ${Math.round(loaded.seconds * 1000)} ms, scored in ${Math.round(performance.now() - started)} ms.`,
    );
    panel.reveal(true);
  });
}
