// "Tune features per split by out-of-bag error": refits the last fit's data with several counts (core's
// sweepFeaturesPerSplit, trees grown in worker threads) under a cancellable notification, reports progress
// to the panel, and keeps the result so the panel can show it again and offer a refit at the best count.

import * as vscode from 'vscode';
import type { SweepSummary } from '../../protocol/messages';
import type { CopseContext } from '../context';
import { sweepFeaturesPerSplit } from '../engine';
import { isAbort, isUserError, userMessage } from '../errors';
import { formatSeconds } from '../engine';
import type { PanelHost } from '../panel/panelHost';
import { featuresPerSplitOf, sweepKey, sweepOptions, sweepSummary } from './sweep';

export class SweepRunner {
  private abort: AbortController | undefined;
  private last: { key: string; result: SweepSummary } | undefined;

  constructor(
    private readonly ctx: CopseContext,
    private readonly panel: PanelHost,
  ) {}

  get running(): boolean {
    return this.abort !== undefined;
  }

  /** The last sweep's result if it describes the forest now shown, with `current` set to that forest's count. */
  resultForCurrent(): SweepSummary | undefined {
    const origin = this.ctx.origin;
    const session = this.ctx.session;
    if (!this.last || !origin || !session || sweepKey({ ...origin, fingerprint: origin.load.fingerprint }) !== this.last.key) return undefined;
    return { ...this.last.result, current: featuresPerSplitOf(session.forest) };
  }

  cancel(): void {
    this.abort?.abort();
  }

  async run(): Promise<void> {
    const { ctx, panel } = this;
    const origin = ctx.origin;
    if (!origin || !ctx.session) {
      panel.post({ type: 'sweep', state: 'error', progress: null, text: 'The sweep refits the last fit’s data: fit a forest on a CSV first.', result: null });
      return;
    }
    if (ctx.busy || this.abort) {
      panel.post({ type: 'sweep', state: 'error', progress: null, text: 'A fit or sweep is already running; wait for it or cancel it first.', result: null });
      return;
    }
    const settings = ctx.settings();
    const key = sweepKey({ ...origin, fingerprint: origin.load.fingerprint });
    const abort = (this.abort = new AbortController());
    const started = performance.now();
    const work = Promise.resolve(vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: 'Copse: trying features per split', cancellable: true },
      async (progress, token) => {
        const sub = token.onCancellationRequested(() => abort.abort());
        let reported = 0;
        try {
          panel.post({ type: 'sweep', state: 'running', progress: 0, text: 'Refitting…', result: null });
          const sweep = await sweepFeaturesPerSplit(origin.load.table, {
            ...sweepOptions(origin.choices, settings.training),
            signal: abort.signal,
            onProgress: (done, total) => {
              const share = done / total;
              progress.report({ increment: 100 * (share - reported), message: `${done} of ${total} trees` });
              reported = share;
              panel.post({ type: 'sweep', state: 'running', progress: share, text: `Refitting: ${done} of ${total} trees`, result: null });
            },
          });
          const points = sweep.points.filter((q) => Number.isFinite(q.oobError) && Number.isFinite(q.oobScore));
          if (points.length === 0) throw new RangeError('No tree left any row out of its sample, so there is no out-of-bag error to compare.');
          const session = ctx.session;
          const result = sweepSummary({ ...sweep, points }, session ? featuresPerSplitOf(session.forest) : null);
          this.last = { key, result };
          const seconds = (performance.now() - started) / 1000;
          panel.post({ type: 'sweep', state: 'done', progress: null, text: `${points.length} forests in ${formatSeconds(seconds)}.`, result: this.resultForCurrent() ?? result });
          ctx.log.info(
            `Features per split by out-of-bag error (${formatSeconds(seconds)}): ` +
              points.map((q) => `${q.featuresPerSplit} → ${q.oobError.toPrecision(4)}`).join(', ') +
              `; best ${result.best}.`,
          );
        } catch (e) {
          if (isAbort(e)) panel.post({ type: 'sweep', state: 'cancelled', progress: null, text: 'Sweep cancelled.', result: null });
          else {
            if (!isUserError(e)) ctx.log.error(`Sweep failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
            panel.post({ type: 'sweep', state: 'error', progress: null, text: userMessage(e), result: null });
          }
        } finally {
          sub.dispose();
        }
      },
    ));
    try {
      await ctx.whileBusy(work);
    } finally {
      this.abort = undefined;
    }
  }
}
