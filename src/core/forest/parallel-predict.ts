// Scoring many rows on every core: rows are split into one contiguous chunk per scoring thread.
import type { Forest } from './forest';
import { defaultWorkers } from './pool';
import { predictEncoded, voteArray, type Prediction } from './predict';
import { Scorer } from './scorer';

/** Below this much work (rows × trees) starting threads costs more than it saves. */
const MIN_PARALLEL_WORK = 400_000;

export async function predictInWorkers(forest: Forest, x: Float64Array, rows: number, workers = defaultWorkers()): Promise<Prediction> {
  const T = forest.trees.length;
  const count = Math.min(workers, Math.ceil((rows * T) / MIN_PARALLEL_WORK));
  if (count <= 1) return predictEncoded(forest, x, rows);
  const p = forest.schema.features.length;
  const bounds = Array.from({ length: count + 1 }, (_, c) => Math.round((c * rows) / count));
  const scorers = Array.from({ length: count }, () => new Scorer(forest));
  try {
    const parts = await Promise.all(scorers.map((s, c) => s.predict(x.slice(bounds[c] * p, bounds[c + 1] * p), bounds[c + 1] - bounds[c])));
    return merge(forest, parts, bounds, rows);
  } finally {
    await Promise.all(scorers.map((s) => s.dispose()));
  }
}

function merge(forest: Forest, parts: Prediction[], bounds: number[], rows: number): Prediction {
  const T = forest.trees.length;
  const classification = forest.schema.target.task === 'classification';
  const K = classification ? forest.schema.target.classes!.length : 1;
  const votes = voteArray(classification, K, T * rows);
  const joined = (pick: (p: Prediction) => Float64Array | undefined, width: number): Float64Array | undefined => {
    if (!pick(parts[0])) return undefined;
    const out = new Float64Array(rows * width);
    parts.forEach((part, c) => out.set(pick(part)!, bounds[c] * width));
    return out;
  };
  parts.forEach((part, c) => {
    const n = part.rows;
    for (let t = 0; t < T; t++) votes.set(part.votes.subarray(t * n, (t + 1) * n), t * rows + bounds[c]);
  });
  const predicted = joined((p) => p.predicted, 1)!;
  return {
    rows,
    proba: joined((p) => p.proba, K),
    value: classification ? undefined : predicted,
    predicted,
    votes,
    agreement: joined((p) => p.agreement, 1),
    spread: joined((p) => p.spread, 1),
  };
}
