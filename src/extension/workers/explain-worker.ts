// Thread entry for explanations: holds one forest and answers one request at a time, in the order the
// client sends them (the client, not this thread, decides what goes first). The set-up arrives as the first
// message rather than as workerData, which a thread keeps for its whole life: a fit's per-row results are
// needed only until the interval index is built, and can then be freed.
import { parentPort } from 'node:worker_threads';
import { ExplainState, type ExplainReply, type ExplainRequest, type ExplainSetup } from './explainJobs';

let state: ExplainState | undefined;
let failed: string | undefined;

parentPort!.on('message', (msg: { setup: ExplainSetup } | { id: number; request: ExplainRequest }) => {
  if ('setup' in msg) {
    try {
      state = new ExplainState(msg.setup);
    } catch (e) {
      failed = e instanceof Error ? e.message : String(e);
    }
    return;
  }
  let reply: ExplainReply;
  try {
    if (!state) throw new Error(failed ?? 'The explanation thread has no forest.');
    reply = { id: msg.id, ok: true, result: state.handle(msg.request) };
  } catch (e) {
    reply = { id: msg.id, ok: false, name: e instanceof Error ? e.name : 'Error', message: e instanceof Error ? e.message : String(e) };
  }
  parentPort!.postMessage(reply);
});
