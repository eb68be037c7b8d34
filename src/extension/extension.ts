// Entry point: wires the context, commands, editor features and panel together. All logic lives elsewhere.

import * as vscode from 'vscode';
import { registerExportOnnx } from './commands/exportOnnx';
import { registerFit } from './commands/fit';
import type { Host } from './commands/host';
import { registerOpenDemo } from './commands/openDemo';
import { registerOpenModel } from './commands/openModel';
import { registerPredictToFile } from './commands/predictToFile';
import { registerRevealRow, revealRow } from './commands/revealRow';
import { registerSaveModel } from './commands/saveModel';
import { registerSaveReport } from './commands/saveReport';
import { registerShowPanel } from './commands/showPanel';
import { registerShowRowVotes } from './commands/showRowVotes';
import { CopseContext } from './context';
import { CsvDocuments } from './editor/csvDocuments';
import { registerHover } from './editor/hoverProvider';
import { RowMarks } from './editor/rowMarks';
import { Scorer } from './engine';
import { refitCommand, refitFeaturesCommand } from './fit/fitFlow';
import { SweepRunner } from './fit/sweepFlow';
import { PanelHost } from './panel/panelHost';
import { restoreLastFit } from './session/restore';
import { registerStatusBar } from './statusBar';
import { ExplainClient } from './workers/explainClient';

let active: CopseContext | undefined;

export function activate(extension: vscode.ExtensionContext): { readonly context: CopseContext } {
  const ctx = new CopseContext(extension);
  extension.subscriptions.push(ctx);
  active = ctx;

  let restoring: Promise<void> | undefined;
  const panel: PanelHost = ctx.track(
    new PanelHost(ctx, {
      revealRow: (row) => revealRow(ctx, row, panel.viewColumn),
      refit: (leaveOut, trees) => refitCommand(ctx, panel, leaveOut, trees),
      restore: () => (restoring ??= restore(ctx).finally(() => (restoring = undefined))),
      sweep: () => sweeps.run(),
      cancelSweep: () => sweeps.cancel(),
      sweepResult: () => sweeps.resultForCurrent(),
      refitFeatures: (n) => refitFeaturesCommand(ctx, panel, n),
    }),
  );
  const sweeps = new SweepRunner(ctx, panel);
  ctx.track({ dispose: () => sweeps.cancel() });
  const host: Host = { ctx, panel };
  ctx.track(registerFit(host));
  ctx.track(registerOpenModel(host));
  ctx.track(registerPredictToFile(host));
  ctx.track(registerSaveModel(host));
  ctx.track(registerSaveReport(host));
  ctx.track(registerExportOnnx(host));
  ctx.track(registerShowPanel(host));
  ctx.track(registerRevealRow(host));
  ctx.track(registerShowRowVotes(host));
  ctx.track(registerOpenDemo(host));
  registerStatusBar(ctx);

  const docs = ctx.track(new CsvDocuments(ctx));
  ctx.track(registerHover(ctx, docs));
  ctx.track(new RowMarks(ctx, docs, panel));
  ctx.log.info(`Copse ${(extension.extension.packageJSON as { version?: string }).version ?? ''} ready.`);
  // package.json's capabilities say what Restricted Mode changes; the log says when it applies.
  if (!vscode.workspace.isTrusted) {
    ctx.log.info('Restricted Mode: this folder\'s own settings for trees, worker threads, sample sizes and panel detail are ignored; user settings apply.');
    ctx.track(vscode.workspace.onDidGrantWorkspaceTrust(() => ctx.log.info('The folder is trusted now: its Copse settings apply from the next fit.')));
  }
  return { context: ctx };
}

export function deactivate(): void {
  // The context is in extension.subscriptions; VS Code disposes it. Dropping our reference is enough.
  active = undefined;
}

/** Restores the last fit into a panel that VS Code brought back after a reload. */
async function restore(ctx: CopseContext): Promise<void> {
  try {
    const started = performance.now();
    const restored = await restoreLastFit(ctx.storageDir, (forest) => new Scorer(forest), {
      explainer: (setup) => new ExplainClient(setup),
      intervalLevel: ctx.settings().explain.intervalLevel,
    });
    if (!restored || ctx.session) {
      if (restored) await restored.session.dispose();
      return;
    }
    ctx.setSession(restored.session, restored.origin);
    ctx.log.info(`Restored the last fit on ${restored.session.source.path} in ${Math.round(performance.now() - started)} ms.`);
    if (restored.note) ctx.log.warn(restored.note);
  } catch (e) {
    ctx.log.warn(`Could not restore the last fit: ${e instanceof Error ? e.message : String(e)}`);
  }
}

/** For the integration suite: the live context of the running extension. */
export function activeContext(): CopseContext | undefined {
  return active;
}
