// A two-class forest's answers at a decision threshold other than the larger probability: the second class
// when its probability exceeds the threshold (src/core/metrics/thresholds.ts states the rule), for every
// row's all-trees answer and, on the training file, its out-of-bag answer.
import { decideAt } from '../metrics/thresholds';
import type { Prediction } from './predict';

export function withThreshold(p: Prediction, threshold: number): Prediction {
  if (!p.proba || p.proba.length !== p.rows * 2) throw new RangeError('A decision threshold is for forests of two classes.');
  const predicted = decideAt(p.proba, threshold);
  // Tree agreement is the share of trees whose own class is the forest's answer, so it follows the answer.
  const T = p.rows ? p.votes.length / p.rows : 0;
  const agreement = new Float64Array(p.rows);
  for (let t = 0; t < T; t++) for (let i = 0; i < p.rows; i++) if (p.votes[t * p.rows + i] === predicted[i]) agreement[i]++;
  if (T) for (let i = 0; i < p.rows; i++) agreement[i] /= T;
  const oob = p.oob?.proba ? { ...p.oob, predicted: decideAt(p.oob.proba, threshold, p.oob.predicted) } : p.oob;
  return { ...p, predicted, agreement: T ? agreement : p.agreement, oob };
}
