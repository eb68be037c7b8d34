// Boosted ensembles: trees whose raw scores add up (plus a base score) and go through a link, where a forest
// averages its trees' votes. Copse stores a boosted ensemble of T trees with each leaf holding T times its raw
// score plus the base score, so the mean over trees that every forest walk computes (scoring, maps, partial
// dependence, TreeSHAP with its base value) is the summed raw score itself; only the last step differs: the link
// turns the raw scores into probabilities. The ONNX importer already folded SUM ensembles this way.
import type { Forest } from './forest';

/** How raw scores become the prediction: the value itself, a logistic of the log-odds, or a softmax over classes. */
export type Link = 'identity' | 'logistic' | 'softmax';

export interface Boosting {
  readonly link: Link;
  /** Raw score of each output before any tree (already inside every leaf; kept to recover each tree's own output). */
  readonly base: readonly number[];
  /** The output each tree adds to: its class for multiclass, class 1 for two classes, 0 for a value. */
  readonly treeOutput: readonly number[];
  /** Where the ensemble came from, for reports: 'xgboost' or 'onnx'. */
  readonly source: 'xgboost' | 'onnx';
}

export function isBoosted(forest: Pick<Forest, 'boosting'>): boolean {
  return forest.boosting !== undefined;
}

/**
 * Raw scores at a[offset .. offset + K) (the mean over trees of the stored leaves) become probabilities, in
 * place. Two classes keep class 0's raw score at 0, so the softmax of the pair is the logistic of class 1's
 * log-odds. Identity leaves the value as it is.
 */
export function applyLink(link: Link, a: Float64Array, offset: number, K: number): void {
  if (link === 'identity') return;
  let max = -Infinity;
  for (let k = 0; k < K; k++) if (a[offset + k] > max) max = a[offset + k];
  let sum = 0;
  for (let k = 0; k < K; k++) {
    const e = Math.exp(a[offset + k] - max);
    a[offset + k] = e;
    sum += e;
  }
  for (let k = 0; k < K; k++) a[offset + k] /= sum;
}

/** Tree t's own raw score at a leaf: what the library's tree adds to the margin of the output it serves. */
export function treeRawOutput(forest: Forest, t: number, leaf: number, K: number): number {
  const b = forest.boosting!;
  const k = b.treeOutput[t];
  return (forest.trees[t].value[leaf * K + k] - b.base[k]) / forest.trees.length;
}

/** Stores raw leaf scores the Copse way: T times the score plus the base score (rounded once, to float32). */
export function storedLeaf(raw: number, trees: number, base: number): number {
  return Math.fround(trees * raw + base);
}

/** How a report names the score contributions are in. */
export function rawScoreName(link: Link): string {
  return link === 'logistic' ? 'log-odds' : link === 'softmax' ? 'raw class score' : 'value';
}
