// What the panel shows of a boosted ensemble's rows: each tree's raw output and the running total (its trees do
// not vote), and contributions labelled with the raw-score scale they are in, the probability beside.
import type { BoostedTrees, RowContributions, RowVotes as PanelRowVotes } from '../../protocol/messages';
import { rawScoreName, treeOutputs, type Forest } from '../engine';

/** The class a boosted classifier's contributions explain: class 1's log-odds for two classes (class 0's raw score is fixed at 0). */
export function explainedClass(forest: Forest, predicted: number): number {
  return forest.boosting?.link === 'logistic' ? 1 : predicted;
}

/** The row's votes with its trees' raw outputs, for a boosted ensemble; unchanged for a forest. */
export function withBoostedTrees(forest: Forest, encoded: ArrayLike<number>, offset: number, votes: PanelRowVotes, proba: readonly number[] | undefined): PanelRowVotes {
  if (!forest.boosting) return votes;
  const o = treeOutputs(forest, encoded, offset);
  const predicted = votes.allPredicted;
  const boosted: BoostedTrees = {
    scale: rawScoreName(forest.boosting.link),
    output: Array.from(o.output),
    raw: Array.from(o.raw),
    cumulative: Array.from(o.cumulative),
    base: Array.from(o.base),
    total: Array.from(o.total),
    probability: proba ? proba[predicted] : null,
    shown: forest.schema.target.task === 'classification' ? explainedClass(forest, predicted) : 0,
  };
  return { ...votes, boosted };
}

/** Contributions with their raw-score scale and, for a class, its probability. */
export function withScale(forest: Forest, c: RowContributions, proba: readonly number[] | undefined): RowContributions {
  if (!forest.boosting) return c;
  const probability = c.output !== null && proba ? proba[c.output] : undefined;
  return { ...c, scale: rawScoreName(forest.boosting.link), ...(probability === undefined ? {} : { probability }) };
}
