// Worker thread entry: grows the trees it is asked for, one message per tree.
import { parentPort, workerData } from 'node:worker_threads';
import { growOne, type TrainingJob, type TreeResult } from './grow-task';

const job = workerData as TrainingJob;

function buffersOf(r: TreeResult): ArrayBuffer[] {
  const t = r.tree;
  const arrays = [t.left, t.right, t.feature, t.threshold, t.missingLeft, t.value, t.cover, t.catBits, r.impurity, r.rowLeaf, r.inBag];
  if (r.permutation) arrays.push(r.permutation);
  return arrays.map((a) => a.buffer as ArrayBuffer);
}

parentPort!.on('message', (msg: { tree: number }) => {
  try {
    const result = growOne(job, msg.tree);
    parentPort!.postMessage({ ok: true, result }, buffersOf(result));
  } catch (e) {
    parentPort!.postMessage({ ok: false, error: e instanceof Error ? e.stack ?? e.message : String(e) });
  }
});
