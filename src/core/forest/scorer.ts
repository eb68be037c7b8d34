// Scoring off the calling thread: the editor's extension host must stay responsive while a grid or a file is scored.
import { Worker } from 'node:worker_threads';
import type { Forest } from './forest';
import { workerScript } from './pool';
import { sharedForest } from './shared';
import type { Membership, Prediction } from './predict';

type Reply = { id: number; ok: true; prediction: Prediction } | { id: number; ok: false; error: string };

export class Scorer {
  private readonly worker: Worker;
  private readonly waiting = new Map<number, { resolve: (p: Prediction) => void; reject: (e: Error) => void }>();
  private nextId = 0;
  private failed?: Error;

  constructor(readonly forest: Forest) {
    // Shared tree arrays: the thread reads the caller's copy rather than receiving its own.
    this.worker = new Worker(workerScript('score-worker.js'), { workerData: sharedForest(forest) });
    this.worker.on('message', (msg: Reply) => {
      const w = this.waiting.get(msg.id);
      if (!w) return;
      this.waiting.delete(msg.id);
      if (msg.ok) w.resolve(msg.prediction);
      else w.reject(new Error(msg.error));
    });
    this.worker.on('error', (e) => this.failAll(e));
    this.worker.on('exit', (code) => this.failAll(new Error(`The scoring thread stopped (exit code ${code}).`)));
    // An idle scorer must not keep a command-line process alive.
    this.worker.unref();
  }

  /** Scores rows; with a membership, each training row's out-of-bag answer too (see predictEncoded). */
  predict(x: Float64Array, rows: number, membership?: Membership): Promise<Prediction> {
    if (this.failed) return Promise.reject(this.failed);
    const id = this.nextId++;
    return new Promise<Prediction>((resolve, reject) => {
      this.waiting.set(id, { resolve, reject });
      this.worker.ref();
      this.worker.postMessage({ id, x, rows, membership });
    }).finally(() => {
      if (this.waiting.size === 0) this.worker.unref();
    });
  }

  async dispose(): Promise<void> {
    this.failed ??= new Error('The scorer was disposed.');
    await this.worker.terminate();
  }

  private failAll(e: Error): void {
    this.failed ??= e;
    for (const w of this.waiting.values()) w.reject(e);
    this.waiting.clear();
  }
}
