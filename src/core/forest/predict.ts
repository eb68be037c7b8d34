// Scoring raw rows. Rows are first encoded into the model's feature space: one float per feature, the value
// for numeric columns and the level's code for categorical ones, NaN for missing or unseen.
import { outputCount, type Schema } from '../base/schema';
import { levelIndex } from '../data/binning';
import { cellText, type Column, type Table } from '../data/table';
import { argmaxAt } from '../metrics/scores';
import type { FlatTree } from '../tree/tree';
import { applyLink } from './boosting';
import type { Forest } from './forest';

export class SchemaMismatchError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SchemaMismatchError';
  }
}

export interface Prediction {
  readonly rows: number;
  /** classification: rows * K, the soft vote (class probabilities averaged over trees). */
  readonly proba?: Float64Array;
  /** regression: the mean over trees. */
  readonly value?: Float64Array;
  /** Class code (argmax of proba) or value. */
  readonly predicted: Float64Array;
  /** Tree-major: votes[t * rows + i] is tree t's own class (argmax of its leaf) or value for row i. */
  readonly votes: Uint8Array | Uint16Array | Float32Array;
  /** classification: share of trees whose own class equals the forest's. */
  readonly agreement?: Float64Array;
  /** regression: standard deviation of the trees' values. */
  readonly spread?: Float64Array;
  /** Scored with a membership: the same over each training row's out-of-bag trees only (NaN: none left it out). */
  readonly oob?: OutOfBagPrediction;
}

export interface OutOfBagPrediction {
  /** classification: rows * K, probabilities averaged over the out-of-bag trees. */
  readonly proba?: Float64Array;
  /** Class code or mean value; NaN outside training or where every tree drew the row. */
  readonly predicted: Float64Array;
  /** Out-of-bag trees per row (0 outside training). */
  readonly trees: Int32Array;
}

/** Which rows of a scored table the forest trained on, and how many times each tree drew them. */
export interface Membership {
  /** Per table row: its index among the training rows, or -1. */
  readonly trainPos: Int32Array;
  readonly trainCount: number;
  /** Tree-major: inBag[t * trainCount + i]; 0 means tree t never drew training row i. */
  readonly inBag: Uint8Array;
}

export function voteArray(classification: boolean, classes: number, length: number): Uint8Array | Uint16Array | Float32Array {
  if (!classification) return new Float32Array(length);
  return classes <= 256 ? new Uint8Array(length) : new Uint16Array(length);
}

/**
 * Checks that the table has every feature with a usable type; names every problem in one message.
 * `header` (the file's column names) lets the message name extra columns the loader left out.
 */
export function encodeTable(schema: Schema, table: Table, label = 'the data', header?: readonly string[]): Float64Array {
  const byName = new Map<string, Column>(table.columns.map((c) => [c.name, c]));
  const missing: string[] = [];
  const wrong: string[] = [];
  for (const f of schema.features) {
    const col = byName.get(f.name);
    if (!col) missing.push(f.name);
    else if (f.kind === 'numeric' && col.kind !== 'numeric') wrong.push(`"${f.name}" should be numeric but is ${col.kind}`);
  }
  if (missing.length || wrong.length) {
    const used = new Set(schema.features.map((f) => f.name));
    const extra = (header ?? table.columns.map((c) => c.name)).filter((n) => !used.has(n) && n !== schema.target.name);
    const parts: string[] = [];
    if (missing.length) parts.push(`missing column${missing.length > 1 ? 's' : ''} ${missing.map((m) => `"${m}"`).join(', ')}`);
    if (wrong.length) parts.push(`wrong type: ${wrong.join('; ')}`);
    if (extra.length) parts.push(`extra column${extra.length > 1 ? 's' : ''} (ignored) ${extra.map((m) => `"${m}"`).join(', ')}`);
    throw new SchemaMismatchError(`The columns of ${label} do not match the model: ${parts.join('; ')}.`);
  }
  const p = schema.features.length;
  const n = table.rowCount;
  const x = new Float64Array(n * p);
  schema.features.forEach((f, j) => {
    const col = byName.get(f.name)!;
    if (f.kind === 'numeric' && col.kind === 'numeric') {
      for (let i = 0; i < n; i++) x[i * p + j] = col.values[i];
      return;
    }
    // Levels are matched by their text, so a column read as numbers still finds levels such as "3".
    const index = levelIndex(f);
    if (col.kind === 'numeric') {
      for (let i = 0; i < n; i++) x[i * p + j] = index.get(cellText(col, i)) ?? NaN;
    } else {
      const remap = col.levels.map((l) => index.get(l) ?? NaN);
      for (let i = 0; i < n; i++) x[i * p + j] = col.codes[i] < 0 ? NaN : remap[col.codes[i]];
    }
  });
  return x;
}

/** Leaf reached by the encoded row starting at x[offset]. */
export function leafOf(tree: FlatTree, levelCounts: Int32Array, x: ArrayLike<number>, offset: number): number {
  const { left, right, feature, threshold, missingLeft, catBits } = tree;
  let node = 0;
  let l: number;
  while ((l = left[node]) >= 0) {
    const f = feature[node];
    const v = x[offset + f];
    const levels = levelCounts[f];
    if (levels === 0) {
      const t = threshold[node];
      // NaN fails both comparisons: only missing values reach the third branch.
      if (v <= t) node = l;
      else if (v > t) node = right[node];
      else node = missingLeft[node] === 1 ? l : right[node];
    } else if (v >= 0 && v < levels) {
      node = (catBits[threshold[node] + (v >>> 5)] & (1 << (v & 31))) !== 0 ? l : right[node];
    } else {
      node = missingLeft[node] === 1 ? l : right[node];
    }
  }
  return node;
}

/** Number of levels of each categorical feature; 0 for numeric ones. */
export function levelCounts(schema: Schema): Int32Array {
  return Int32Array.from(schema.features.map((f) => (f.kind === 'numeric' ? 0 : (f.levels?.length ?? 0))));
}

/** Scores rows with every tree; with a membership, also with each training row's out-of-bag trees in the same walk. */
export function predictEncoded(forest: Forest, x: ArrayLike<number>, rows: number, membership?: Membership): Prediction {
  const { schema, trees } = forest;
  const p = schema.features.length;
  const classification = schema.target.task === 'classification';
  const K = outputCount(schema.target);
  const T = trees.length;
  const counts = levelCounts(schema);
  const votes = voteArray(classification, K, T * rows);
  const sums = new Float64Array(rows * K);
  const sq = classification ? null : new Float64Array(rows);
  const oobSums = membership ? new Float64Array(rows * K) : undefined;
  const oobTrees = membership ? new Int32Array(rows) : undefined;
  for (let t = 0; t < T; t++) {
    const tree = trees[t];
    const base = t * rows;
    for (let i = 0; i < rows; i++) {
      const leaf = leafOf(tree, counts, x, i * p);
      if (classification) {
        const o = leaf * K;
        for (let k = 0; k < K; k++) sums[i * K + k] += tree.value[o + k];
        votes[base + i] = argmaxAt(tree.value, o, K);
      } else {
        const v = tree.value[leaf];
        sums[i] += v;
        sq![i] += v * v;
        votes[base + i] = v;
      }
      if (membership) {
        const pos = membership.trainPos[i];
        if (pos < 0 || membership.inBag[t * membership.trainCount + pos] !== 0) continue;
        oobTrees![i]++;
        for (let k = 0; k < K; k++) oobSums![i * K + k] += tree.value[leaf * K + k];
      }
    }
  }
  const oob = membership ? outOfBagPart(oobSums!, oobTrees!, rows, K, classification) : undefined;
  const predicted = new Float64Array(rows);
  const link = forest.boosting?.link;
  if (classification) {
    const agreement = new Float64Array(rows);
    for (let i = 0; i < rows * K; i++) sums[i] /= T;
    // A boosted ensemble's mean is its raw score (boosting.ts); its trees do not vote, so no agreement is claimed.
    if (link) {
      for (let i = 0; i < rows; i++) applyLink(link, sums, i * K, K);
      for (let i = 0; i < rows; i++) predicted[i] = argmaxAt(sums, i * K, K);
      return { rows, proba: sums, predicted, votes, agreement: agreement.fill(NaN), oob };
    }
    for (let i = 0; i < rows; i++) predicted[i] = argmaxAt(sums, i * K, K);
    for (let t = 0; t < T; t++) for (let i = 0; i < rows; i++) if (votes[t * rows + i] === predicted[i]) agreement[i]++;
    for (let i = 0; i < rows; i++) agreement[i] /= T;
    return { rows, proba: sums, predicted, votes, agreement, oob };
  }
  const spread = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    const m = sums[i] / T;
    predicted[i] = m;
    spread[i] = link ? NaN : Math.sqrt(Math.max(0, sq![i] / T - m * m));
  }
  return { rows, value: predicted, predicted, votes, spread, oob };
}

function outOfBagPart(sums: Float64Array, trees: Int32Array, rows: number, K: number, classification: boolean): OutOfBagPrediction {
  const predicted = new Float64Array(rows).fill(NaN);
  for (let i = 0; i < rows; i++) {
    if (!trees[i]) continue;
    for (let k = 0; k < K; k++) sums[i * K + k] /= trees[i];
    predicted[i] = classification ? argmaxAt(sums, i * K, K) : sums[i];
  }
  return { proba: classification ? sums : undefined, predicted, trees };
}

export function predictTable(forest: Forest, table: Table, label?: string): Prediction {
  return predictEncoded(forest, encodeTable(forest.schema, table, label), table.rowCount);
}
