// Worker thread entry for scoring: holds one forest and answers predict requests.
import { parentPort, workerData } from 'node:worker_threads';
import type { Forest } from './forest';
import { predictEncoded, type Membership, type Prediction } from './predict';

const forest = workerData as Forest;

function buffersOf(p: Prediction): ArrayBuffer[] {
  return [p.proba, p.value, p.predicted, p.votes, p.agreement, p.spread, p.oob?.proba, p.oob?.predicted, p.oob?.trees]
    .filter((a): a is NonNullable<typeof a> => a !== undefined)
    .map((a) => a.buffer as ArrayBuffer)
    .filter((b, i, all) => all.indexOf(b) === i);
}

parentPort!.on('message', (msg: { id: number; x: Float64Array; rows: number; membership?: Membership }) => {
  try {
    const prediction = predictEncoded(forest, msg.x, msg.rows, msg.membership);
    parentPort!.postMessage({ id: msg.id, ok: true, prediction }, buffersOf(prediction));
  } catch (e) {
    parentPort!.postMessage({ id: msg.id, ok: false, error: e instanceof Error ? e.message : String(e) });
  }
});
