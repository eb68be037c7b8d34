// Hands trees to worker threads one at a time and delivers the results in tree order, so what the caller
// folds (out-of-bag sums, the error curve) is identical for any number of workers.
import { availableParallelism } from 'node:os';
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import type { TrainingJob, TreeResult } from './grow-task';

export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

export function workerScript(name: string): string {
  return path.join(__dirname, name);
}

export function abortError(): Error {
  const e = new Error('The fit was cancelled.');
  e.name = 'AbortError';
  return e;
}

export function growInWorkers(
  job: TrainingJob,
  trees: number,
  workers: number,
  onTree: (r: TreeResult) => void,
  signal?: AbortSignal,
): Promise<void> {
  if (signal?.aborted) return Promise.reject(abortError());
  const count = Math.max(1, Math.min(workers, trees));
  return new Promise<void>((resolve, reject) => {
    const pool: Worker[] = [];
    const pending = new Map<number, TreeResult>();
    let next = 0;
    let delivered = 0;
    let settled = false;
    const finish = (err?: Error) => {
      if (settled) return;
      settled = true;
      signal?.removeEventListener('abort', onAbort);
      // terminate() resolves once the thread is gone; nothing of a cancelled fit is kept.
      void Promise.all(pool.map((w) => w.terminate())).then(() => (err ? reject(err) : resolve()));
    };
    const onAbort = () => finish(abortError());
    signal?.addEventListener('abort', onAbort);
    const dispatch = (w: Worker) => {
      if (next < trees) w.postMessage({ tree: next++ });
    };
    for (let i = 0; i < count; i++) {
      const w = new Worker(workerScript('forest-worker.js'), { workerData: job });
      w.on('message', (msg: { ok: true; result: TreeResult } | { ok: false; error: string }) => {
        if (settled) return;
        if (!msg.ok) return finish(new Error(`A worker failed while growing a tree: ${msg.error}`));
        pending.set(msg.result.index, msg.result);
        dispatch(w);
        try {
          while (pending.has(delivered)) {
            const r = pending.get(delivered)!;
            pending.delete(delivered);
            delivered++;
            onTree(r);
          }
        } catch (e) {
          return finish(e instanceof Error ? e : new Error(String(e)));
        }
        if (delivered === trees) finish();
      });
      w.on('error', (e) => finish(e));
      w.on('exit', (code) => {
        if (!settled && code !== 0) finish(new Error(`A worker thread stopped unexpectedly (exit code ${code}).`));
      });
      pool.push(w);
      dispatch(w);
    }
  });
}
