// Loading on a worker thread, for callers whose own thread must stay responsive (the editor's extension host).
import { Worker } from 'node:worker_threads';
import * as path from 'node:path';
import { DataError, type LoadOptions, type LoadResult } from './types';

type Reply = { ok: true; result: LoadResult } | { ok: false; name: string; message: string };

function cancelled(): Error {
  const e = new Error('The load was cancelled.');
  e.name = 'AbortError';
  return e;
}

function run(job: { path?: string; text?: string; label?: string }, options: LoadOptions = {}): Promise<LoadResult> {
  const { signal, ...rest } = options;
  if (signal?.aborted) return Promise.reject(cancelled());
  return new Promise<LoadResult>((resolve, reject) => {
    const worker = new Worker(path.join(__dirname, 'load-worker.js'), { workerData: { ...job, options: rest } });
    let done = false;
    const finish = (f: () => void) => {
      if (done) return;
      done = true;
      signal?.removeEventListener('abort', onAbort);
      void worker.terminate();
      f();
    };
    // A signal cannot cross to another thread; stopping the thread is the cancellation.
    const onAbort = () => finish(() => reject(cancelled()));
    signal?.addEventListener('abort', onAbort);
    worker.on('message', (msg: Reply) =>
      finish(() => {
        if (msg.ok) resolve(msg.result);
        else {
          const e = msg.name === 'DataError' ? new DataError(msg.message) : new Error(msg.message);
          if (msg.name !== 'DataError') e.name = msg.name;
          reject(e);
        }
      }),
    );
    worker.on('error', (e) => finish(() => reject(e)));
    worker.on('exit', (code) => finish(() => reject(new Error(`The loading thread stopped (exit code ${code}).`))));
  });
}

/** loadCsv, on a worker thread. */
export function loadCsvOffThread(file: string, options?: LoadOptions): Promise<LoadResult> {
  return run({ path: file }, options);
}

/** loadCsvText, on a worker thread. */
export function loadCsvTextOffThread(text: string, options?: LoadOptions, label = '<text>'): Promise<LoadResult> {
  return run({ text, label }, options);
}
