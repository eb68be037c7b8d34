// "Copse: Open a saved forest": load a model file (Copse's own, an XGBoost JSON model or an ONNX tree ensemble), then pick the CSV
// to look at it against.

import * as path from 'node:path';
import * as vscode from 'vscode';
import { encodeTable, knowsTraining, openModelFile, readHeader, Scorer, trainingRowsIn } from '../engine';
import { guarded, readCsv, requireFile } from '../fit/fitFlow';
import { showCsv } from '../editor/showCsv';
import { ForestSession } from '../session/session';
import { forestForTable, nameByHeader, openedSession, permutationOnTable, permutationSkipped, positionalNaming } from '../session/imported';
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
        filters: { 'Forest (Copse model, XGBoost JSON model or ONNX tree ensemble)': ['json', 'onnx'], 'All files': ['*'] },
      });
      modelUri = picked?.[0];
    }
    if (!modelUri) return;
    const modelPath = requireFile(modelUri);
    const opened = await openModelFile(modelPath);
    const modelLabel = path.basename(modelPath);
    let csvUri = csvGiven;
    if (!csvUri) {
      const picked = await vscode.window.showOpenDialog({
        title: `Copse: choose a CSV to inspect ${modelLabel} against`,
        canSelectMany: false,
        defaultUri: vscode.Uri.file(path.dirname(modelPath)),
        filters: { 'Delimited text': ['csv', 'tsv', 'txt'], 'All files': ['*'] },
      });
      csvUri = picked?.[0];
    }
    if (!csvUri) return;
    const csvPath = requireFile(csvUri);
    let named = opened.forest;
    // A foreign file may name no features; the CSV's columns can stand in, in order, once the user agrees.
    const { header } = await readHeader(csvPath);
    const naming = positionalNaming(opened.forest, opened.origin, header, path.basename(csvPath), modelLabel);
    if (naming) {
      const take = 'Take the columns in order';
      const answer = await vscode.window.showWarningMessage(naming.question, { modal: true }, take);
      if (answer !== take) return;
      named = nameByHeader(opened.forest, header, naming.target);
    }
    const loaded = await readCsv(ctx, csvPath, { forest: named.schema });
    if (!loaded) return;
    const label = path.basename(loaded.path);
    const imported = !knowsTraining(named);
    // Encoded once: for covers, permutation importance and the session alike.
    const x = encodeTable(named.schema, loaded.load.table, label);
    const forest = forestForTable(named, loaded.load.table, x);
    const warnings = [...loaded.load.warnings];
    if (loaded.sampled) {
      warnings.push(`Shown against a random sample of ${loaded.load.table.rowCount} of ${loaded.load.rowsRead} rows.`);
    }
    const scorer = new Scorer(forest);
    const started = performance.now();
    let session: ForestSession;
    try {
      const table = loaded.load.table;
      const training = trainingRowsIn(forest, table, loaded.load.fingerprint);
      const permutationMissing = permutationSkipped(forest, table, loaded.load.fingerprint);
      // Rescoring runs in the scorer's thread; the host only shuffles one column at a time. Cancelling skips it.
      const permutation = permutationMissing
        ? undefined
        : await vscode.window.withProgress(
            { location: vscode.ProgressLocation.Notification, title: `Copse: measuring permutation importance on ${label}`, cancellable: true },
            (_progress, token) => {
              const stop = new AbortController();
              token.onCancellationRequested(() => stop.abort());
              return permutationOnTable(forest, table, x, scorer, ctx.settings().training.seed, stop.signal).catch((e: unknown) => {
                if (stop.signal.aborted) return undefined;
                throw e;
              });
            },
          );
      session = await openedSession({
        forest,
        imported,
        origin: opened.origin,
        modelLabel,
        csv: { ...loaded, uri: csvUri.toString() },
        encoded: x,
        warnings,
        permutation,
        permutationMissing: permutation || permutationMissing ? permutationMissing : 'not measured: cancelled while it was being measured.',
        training,
        scorer,
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
    await showCsv(loaded.path, loaded.bytes, loaded.load.format);
    panel.reveal(true);
  });
}
