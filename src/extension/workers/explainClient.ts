// The host's end of the explanation thread. One request runs at a time; the rest wait in a JobQueue so the
// most urgent goes next, and a request still waiting can be withdrawn. Answers are copied back (they are
// small), so nothing the thread keeps is ever detached.

import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import type { ExplainKind, ExplainReply, ExplainResults, ExplainSetup, RequestOf } from './explainJobs';
import { JobQueue, type Urgency } from './jobQueue';

export type { Urgency } from './jobQueue';

/** What the session asks of explanations; the thread-backed client in the extension, anything alike in tests. */
export interface ExplainerLike {
  run<K extends ExplainKind>(request: RequestOf<K>, urgency: Urgency, signal?: AbortSignal): Promise<ExplainResults[K]>;
  /** Hurries a request already queued (e.g. a row prefetched in the background that is now hovered). */
  raise?(promise: Promise<unknown>, urgency: Urgency): void;
  dispose(): Promise<void>;
}

interface Job {
  readonly id: number;
  readonly request: RequestOf<ExplainKind>;
  readonly resolve: (r: ExplainResults[ExplainKind]) => void;
  readonly reject: (e: Error) => void;
  promise?: Promise<unknown>;
}

function cancelled(): Error {
  return Object.assign(new Error('The explanation was withdrawn.'), { name: 'AbortError' });
}

export class ExplainClient implements ExplainerLike {
  private readonly worker: Worker;
  private readonly queue = new JobQueue<Job>();
  private running: Job | undefined;
  private nextId = 0;
  private failed?: Error;

  constructor(setup: ExplainSetup) {
    // Beside this file both when compiled by tsc (out/src/extension/workers) and when bundled (dist/).
    this.worker = new Worker(path.join(__dirname, 'explain-worker.js'));
    this.worker.postMessage({ setup });
    this.worker.on('message', (msg: ExplainReply) => this.settle(msg));
    this.worker.on('error', (e) => this.failAll(e));
    this.worker.on('exit', (code) => this.failAll(new Error(`The explanation thread stopped (exit code ${code}).`)));
    this.worker.unref();
  }

  run<K extends ExplainKind>(request: RequestOf<K>, urgency: Urgency, signal?: AbortSignal): Promise<ExplainResults[K]> {
    if (this.failed) return Promise.reject(this.failed);
    if (signal?.aborted) return Promise.reject(cancelled());
    let job!: Job;
    const promise = new Promise<ExplainResults[K]>((resolve, reject) => {
      job = { id: this.nextId++, request, resolve: resolve as Job['resolve'], reject };
    });
    job.promise = promise;
    if (signal) {
      const onAbort = () => {
        if (this.queue.remove(job)) job.reject(cancelled());
      };
      signal.addEventListener('abort', onAbort, { once: true });
      // Long-lived signals see many requests: take each listener off once its request is settled.
      const off = () => signal.removeEventListener('abort', onAbort);
      void promise.then(off, off);
    }
    this.queue.push(job, urgency);
    this.pump();
    return promise;
  }

  raise(promise: Promise<unknown>, urgency: Urgency): void {
    const job = this.queue.find((j) => j.promise === promise);
    if (job) this.queue.raise(job, urgency);
  }

  async dispose(): Promise<void> {
    this.failAll(new Error('The explanations were closed.'));
    await this.worker.terminate();
  }

  private pump(): void {
    if (this.running || this.failed) return;
    const job = this.queue.shift();
    if (!job) {
      this.worker.unref();
      return;
    }
    this.running = job;
    this.worker.ref();
    this.worker.postMessage({ id: job.id, request: job.request });
  }

  private settle(msg: ExplainReply): void {
    const job = this.running;
    if (!job || job.id !== msg.id) return;
    this.running = undefined;
    if (msg.ok) job.resolve(msg.result);
    else job.reject(Object.assign(new Error(msg.message), { name: msg.name }));
    this.pump();
  }

  private failAll(e: Error): void {
    this.failed ??= e;
    const jobs = this.queue.drain();
    if (this.running) jobs.push(this.running);
    this.running = undefined;
    for (const j of jobs) j.reject(this.failed);
  }
}
