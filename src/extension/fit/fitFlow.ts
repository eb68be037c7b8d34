// The fit command from file to panel: read (offering a sample for big files), pick the target, fit in
// worker threads with a cancellable progress notification, then install the result as the active forest.

import { promises as fs, readFileSync } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { CopseContext, FitOrigin } from '../context';
import { crossValidate, findColumn, fitForest, loadCsv, Scorer, summarizeFit, targetDoubt, type CrossValidationSummary, type FitReport, type ForestParams, type Schema, type Table } from '../engine';
import { isAbort, isUserError, userMessage } from '../errors';
import { formatBytes, formatSeconds, formatShare } from '../engine';
import type { PanelHost } from '../panel/panelHost';
import { showCsv } from '../editor/showCsv';
import { readingOf, type LoadedCsv } from '../session/csvSource';
import { saveLastFit } from '../session/lastFit';
import { loadForForest } from '../session/loadFor';
import { ForestSession } from '../session/session';
import { ExplainClient } from '../workers/explainClient';
import { panelSummary } from '../summary/panel';
import { choicesFrom, paramsFor, type FitChoices } from './choices';
import { profileColumns } from './columnProfile';
import { adjustChoices, pickTarget } from './fitDialog';
import { fitLogLines } from './fitLog';

export type { LoadedCsv } from '../session/csvSource';

/** The CSV a command should work on: its argument, the active editor's file, or one the user picks. */
export async function resolveCsv(uri: vscode.Uri | undefined, title: string): Promise<vscode.Uri | undefined> {
  if (uri instanceof vscode.Uri) return uri;
  const doc = vscode.window.activeTextEditor?.document;
  if (doc && /\.(csv|tsv)$/i.test(doc.uri.path)) return doc.uri;
  const picked = await vscode.window.showOpenDialog({
    title,
    canSelectMany: false,
    filters: { Tables: ['csv', 'tsv', 'txt', 'gz', 'parquet'], 'All files': ['*'] },
  });
  return picked?.[0];
}

export function requireFile(uri: vscode.Uri): string {
  if (uri.scheme !== 'file') throw new RangeError(`Copse reads files from disk; save ${uri.path} to a local file first.`);
  return uri.fsPath;
}

/**
 * Reads a CSV under a cancellable progress notification. Above the size setting, offers a seeded random
 * sample of rows first; declining reads every row. Resolves undefined when the user backs out.
 */
export async function readCsv(
  ctx: CopseContext,
  file: string,
  opts: { target?: string; sample?: { rows: number; seed: number }; everyRow?: boolean; forest?: Schema } = {},
): Promise<LoadedCsv | undefined> {
  const settings = ctx.settings();
  const bytes = (await fs.stat(file)).size;
  const label = path.basename(file);
  let sample = opts.sample;
  if (!sample && !opts.everyRow && bytes > settings.data.sampleAboveMegabytes * 1024 * 1024) {
    const useSample = `Use ${settings.data.sampleRows.toLocaleString('en')} random rows`;
    const all = 'Read every row';
    const answer = await vscode.window.showWarningMessage(
      `${label} is ${formatBytes(bytes)}. Fit on a random sample of ${settings.data.sampleRows.toLocaleString('en')} rows? ` +
        'The results will say they come from a sample.',
      { modal: true },
      useSample,
      all,
    );
    if (!answer) return undefined;
    if (answer === useSample) sample = { rows: settings.data.sampleRows, seed: settings.training.seed };
  }
  return vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: `Copse: reading ${label}`, cancellable: true },
    async (_progress, token) => {
      const abort = new AbortController();
      const sub = token.onCancellationRequested(() => abort.abort());
      const started = performance.now();
      try {
        const options = { target: opts.target, sampleRows: sample?.rows, sampleSeed: sample?.seed, signal: abort.signal };
        const load = opts.forest ? await loadForForest((o) => loadCsv(file, o), opts.forest, options) : await loadCsv(file, options);
        const seconds = (performance.now() - started) / 1000;
        const sampled = !!sample && load.table.rowCount < load.rowsRead;
        return { path: file, load, sampled, sampleRows: sample?.rows, sampleSeed: sample?.seed, loadTarget: opts.target, seconds, bytes };
      } finally {
        sub.dispose();
      }
    },
  );
}

/**
 * Copse reads the file on disk, so unsaved edits would be left out of the fit and the rows would not line up
 * with what the editor shows. Offers to save first; resolves false when the user backs out.
 */
async function savedOrAccepted(uri: vscode.Uri): Promise<boolean> {
  const doc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
  if (!doc?.isDirty) return true;
  const save = 'Save and fit';
  const asIs = 'Fit the saved file';
  const answer = await vscode.window.showWarningMessage(
    `${path.basename(uri.path)} has unsaved changes. Copse fits the file as it is on disk.`,
    { modal: true },
    save,
    asIs,
  );
  if (answer === save) return doc.save();
  return answer === asIs;
}

/** Runs a command body, turning its errors into one readable notification; the host stays up. */
export async function guarded(ctx: CopseContext, what: string, body: () => Promise<void>): Promise<void> {
  try {
    await body();
  } catch (e) {
    if (isAbort(e)) {
      void vscode.window.showInformationMessage(`Copse: ${what} cancelled.`);
      return;
    }
    if (!isUserError(e)) ctx.log.error(`${what} failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
    else ctx.log.warn(`${what}: ${userMessage(e)}`);
    void vscode.window.showErrorMessage(userMessage(e));
  }
}

/** The "Fit a forest" command. */
export async function fitCommand(ctx: CopseContext, panel: PanelHost, uri?: vscode.Uri): Promise<void> {
  await guarded(ctx, 'Fit', async () => {
    if (ctx.busy) {
      void vscode.window.showInformationMessage('Copse: a fit is already running; cancel it from its notification first.');
      return;
    }
    const target = await resolveCsv(uri, 'Copse: choose a CSV file to fit a forest on');
    if (!target) return;
    if (!(await savedOrAccepted(target))) return;
    let loaded = await readCsv(ctx, requireFile(target));
    if (!loaded) return;
    const label = path.basename(loaded.path);
    const profiles = profileColumns(loaded.load.table, loaded.load.header, loaded.load.dropped);
    if (profiles.length === 0) throw new RangeError(`${label} has no columns to fit.`);
    const pick = await pickTarget(profiles, label);
    if (!pick) return;
    if (pick.profile.dropped) {
      // The loader left the chosen column out (an identifier, say); read again keeping it as the target.
      const again = await readCsv(ctx, loaded.path, {
        target: pick.profile.name,
        sample: loaded.sampleRows !== undefined ? { rows: loaded.sampleRows, seed: loaded.sampleSeed ?? 1 } : undefined,
      });
      if (!again) return;
      loaded = again;
    }
    const settings = ctx.settings();
    const column = findColumn(loaded.load.table, pick.profile.name);
    if (!column) throw new RangeError(`The column "${pick.profile.name}" could not be read as a target.`);
    const task = pick.task === 'regression' && column.kind !== 'numeric' ? 'classification' : pick.task;
    // The command line refuses such a target unless told to; here the user is asked once.
    const doubt = targetDoubt(column, task);
    if (doubt) {
      const go = 'Fit anyway';
      const answer = await vscode.window.showWarningMessage(`${doubt.message}. A forest fitted on it is unlikely to mean anything.`, { modal: true }, go);
      if (answer !== go) return;
    }
    let choices = choicesFrom(settings.training, pick.profile.name, task);
    if (pick.adjust) {
      const features = loaded.load.table.columns.map((c) => c.name).filter((n) => n !== choices.target);
      const adjusted = await adjustChoices(choices, { ...pick.profile, kind: column.kind }, features);
      if (!adjusted) return;
      choices = adjusted;
    }
    await runFit(ctx, panel, loaded, choices);
  });
}

/** A refit from the panel: same data and target, some columns left out, maybe another tree count. */
export async function refitCommand(ctx: CopseContext, panel: PanelHost, leaveOut: string[], trees: number | null): Promise<void> {
  await refitWith(ctx, panel, (c) => ({ ...c, exclude: [...new Set([...c.exclude, ...leaveOut])], trees: trees ?? c.trees }));
}

/** The sweep's one action: the same fit again with the count of features per split it found best. */
export async function refitFeaturesCommand(ctx: CopseContext, panel: PanelHost, featuresPerSplit: number): Promise<void> {
  await refitWith(ctx, panel, (c) => ({ ...c, featuresPerSplit }));
}

async function refitWith(ctx: CopseContext, panel: PanelHost, change: (c: FitChoices) => FitChoices): Promise<void> {
  await guarded(ctx, 'Refit', async () => {
    const origin = ctx.origin;
    if (!origin) throw new RangeError('There is no fit to repeat here; fit a forest on the CSV first.');
    if (ctx.busy) {
      void vscode.window.showInformationMessage('Copse: a fit is already running.');
      return;
    }
    await runFit(ctx, panel, origin, change(origin.choices));
  });
}

async function runFit(ctx: CopseContext, panel: PanelHost, loaded: LoadedCsv, choices: FitChoices): Promise<void> {
  const settings = ctx.settings();
  const label = path.basename(loaded.path);
  const { table } = loaded.load;
  const params = paramsFor(choices, settings.training);
  const work = Promise.resolve(vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: `Copse: fitting ${choices.trees} trees on ${label}`, cancellable: true },
    async (progress, token) => {
      const abort = new AbortController();
      const sub = token.onCancellationRequested(() => abort.abort());
      try {
        panel.status('working', `Fitting ${choices.trees} trees…`, 0);
        let reported = 0;
        const report = await fitForest(table, {
          target: choices.target,
          task: choices.task,
          params,
          exclude: [...choices.exclude],
          workers: settings.training.workers > 0 ? settings.training.workers : undefined,
          holdout: choices.holdout > 0 ? choices.holdout : undefined,
          signal: abort.signal,
          permutationImportance: settings.training.permutationImportance,
          fingerprint: loaded.load.fingerprint,
          dropped: [...loaded.load.dropped],
          // The session reads every draw at once; redrawing them here would block the extension host.
          keepInBag: true,
          onProgress: (done, total) => {
            const pct = (100 * done) / total;
            progress.report({ increment: pct - reported, message: `${done} of ${total} trees` });
            reported = pct;
            panel.status('working', `Fitting: ${done} of ${total} trees`, done / total);
          },
        });
        const cv = choices.folds && choices.folds >= 2 ? await crossValidation(table, choices, params, settings.training.workers, abort.signal, panel) : undefined;
        progress.report({ message: 'scoring rows for hovers and maps' });
        panel.status('working', 'Scoring rows for hovers and maps…', null);
        return await install(ctx, loaded, choices, report, abort.signal, cv);
      } catch (e) {
        panel.status(isAbort(e) ? 'idle' : 'error', isAbort(e) ? 'Fit cancelled.' : userMessage(e), null);
        throw e;
      } finally {
        sub.dispose();
      }
    },
  ));
  await ctx.whileBusy(work);
  await showCsv(loaded.path, loaded.bytes, loaded.load.format);
  panel.reveal(true);
}

/** Builds the session for a finished fit, makes it active, logs it, and keeps it for the next reload. */
/** The adjust step's cross-validation: K more forests with the fit's settings, with progress; cancelled with the fit. */
async function crossValidation(table: Table, c: FitChoices, params: Partial<ForestParams>, workers: number, signal: AbortSignal, panel: PanelHost): Promise<CrossValidationSummary> {
  panel.status('working', `Cross-validating (${c.folds} folds)…`, 0);
  const fit = { target: c.target, task: c.task, params, exclude: [...c.exclude], workers: workers > 0 ? workers : undefined, signal };
  return crossValidate(table, fit, {
    folds: c.folds!,
    onProgress: (done, total) => panel.status('working', `Cross-validating: fold ${Math.min(c.folds!, Math.floor((done - 1) / (total / c.folds!)) + 1)} of ${c.folds}, ${done} of ${total} trees`, done / total),
  });
}

async function install(ctx: CopseContext, loaded: LoadedCsv, choices: FitChoices, report: FitReport, signal: AbortSignal, cv?: CrossValidationSummary): Promise<void> {
  const settings = ctx.settings();
  const { load } = loaded;
  const forest = report.forest;
  const inBag = report.rows.inBag!;
  const label = path.basename(loaded.path);
  const tSummary = performance.now();
  const warnings: string[] = [];
  if (loaded.sampled) {
    warnings.push(
      `Fitted on a random sample of ${load.table.rowCount.toLocaleString('en')} of ${load.rowsRead.toLocaleString('en')} rows ` +
        `(the file is ${formatBytes(loaded.bytes)}; see copse.data.sampleAboveMegabytes). Scores describe the sample.`,
    );
  }
  for (const w of load.warnings) warnings.push(w); // not push(...): one argument per warning overflows on wide files
  const fitted = summarizeFit(report, load.table, { file: label, rowsRead: load.rowsRead, sampled: loaded.sampled, testFrom: 'holdout', warnings });
  const core = cv ? { ...fitted, cv } : fitted;
  const uri = vscode.Uri.file(loaded.path).toString();
  const summarySeconds = (performance.now() - tSummary) / 1000;

  const tScore = performance.now();
  const scorer = new Scorer(forest);
  let session: ForestSession;
  try {
    session = await ForestSession.create({
      forest,
      csv: loaded,
      text: () => readText(loaded.path),
      oob: { trainRows: report.trainRows, holdoutRows: report.holdoutRows, inBag },
      summary: (fit) => panelSummary(core, { fit, uri }),
      coreSummary: () => core,
      scorer,
      explainer: (setup) => new ExplainClient(setup),
      quantiles: { from: 'fit', report },
      intervalLevel: settings.explain.intervalLevel,
    });
  } catch (e) {
    await scorer.dispose();
    throw e;
  }
  if (signal.aborted) {
    await session.dispose();
    throw Object.assign(new Error('The fit was cancelled.'), { name: 'AbortError' });
  }
  const scoreSeconds = (performance.now() - tScore) / 1000;

  const origin: FitOrigin = { ...loaded, choices };
  ctx.setSession(session, origin);

  for (const line of fitLogLines({
    path: loaded.path,
    load,
    tableRows: load.table.rowCount,
    sampled: loaded.sampled,
    params: forest.params,
    exclude: choices.exclude,
    holdout: choices.holdout,
    workers: settings.training.workers,
    fitNotes: report.notes,
    summary: session.summary,
    seconds: { load: loaded.seconds, fit: report.seconds.fit, score: scoreSeconds, summary: summarySeconds },
  })) {
    ctx.log.info(line);
  }
  const oob = report.oob;
  const score =
    oob.kind === 'classification' ? `out-of-bag accuracy ${formatShare(oob.accuracy)}` : `out-of-bag R² ${oob.r2.toFixed(3)}`;
  ctx.log.info(`Fitted ${forest.trees.length} trees on ${label} in ${formatSeconds(report.seconds.fit)}: ${score}.`);

  // Kept for the next window reload; a failure here costs only the restore, so it is logged, not shown.
  void saveLastFit(
    ctx.storageDir,
    { forest, trainRows: report.trainRows, holdoutRows: report.holdoutRows },
    { csv: readingOf(loaded), fingerprint: load.fingerprint, summary: session.summary, choices },
  ).catch((e) => ctx.log.warn(`Could not keep the fit for the next reload: ${e instanceof Error ? e.message : String(e)}`));
}

/** The CSV's text, for renumbering rows; read synchronously because it is needed once, right after a fit. */
function readText(file: string): string {
  return readFileSync(file, 'utf8');
}
