// One tree's whole job, the same in a worker thread or in-process: draw its sample, grow it, find the leaf of
// every training row, and measure its out-of-bag permutation importance.
import type { BinnedMatrix } from '../data/binning';
import { growTree, type GrowSettings, type TargetData } from '../tree/builder';
import type { FlatTree } from '../tree/tree';
import { binnedWalker, pathMasks } from './binned-walk';
import { argmaxAt } from '../metrics/scores';
import { drawSample } from './bootstrap';
import { stream } from './rng';

export interface TrainingJob {
  readonly data: BinnedMatrix;
  readonly edges: readonly (readonly number[])[];
  readonly target: TargetData;
  /** Per-row weight from class weights (1 when unweighted). */
  readonly rowWeight: Float64Array;
  readonly settings: GrowSettings;
  readonly seed: number;
  readonly sampleSize: number;
  readonly replace: boolean;
  readonly permutation: boolean;
  /** At most this many out-of-bag rows per tree enter permutation importance. */
  readonly permutationRows: number;
}

export interface TreeResult {
  readonly index: number;
  readonly tree: FlatTree;
  readonly impurity: Float64Array;
  /** Increase in this tree's out-of-bag error when each feature is permuted; null when not measured. */
  readonly permutation: Float64Array | null;
  /** Leaf node of every training row. */
  readonly rowLeaf: Int32Array;
  /** Times each row was drawn, capped at 255. */
  readonly inBag: Uint8Array;
}

export const DEFAULT_PERMUTATION_ROWS = 5000;

export function growOne(job: TrainingJob, t: number): TreeResult {
  const n = job.data.rows;
  const counts = drawSample(job.seed, t, n, job.sampleSize, job.replace);
  let inSample = 0;
  for (let i = 0; i < n; i++) if (counts[i] > 0) inSample++;
  const idx = new Int32Array(inSample);
  const w = new Float64Array(n);
  const inBag = new Uint8Array(n);
  for (let i = 0, j = 0; i < n; i++) {
    if (counts[i] > 0) {
      idx[j++] = i;
      w[i] = counts[i] * job.rowWeight[i];
      inBag[i] = Math.min(255, counts[i]);
    }
  }
  const rowLeaf = new Int32Array(n);
  const grown = growTree(job.data, job.edges, job.data.centres, job.target, w, idx, job.settings, stream(job.seed, 'split', t), rowLeaf);
  const walk = binnedWalker(grown.tree, grown.splitBin, job.data);
  for (let i = 0; i < n; i++) if (inBag[i] === 0) rowLeaf[i] = walk(i, -1, 0);
  const permutation = job.permutation ? permutationIncrease(job, t, grown.tree, walk, inBag, rowLeaf) : null;
  return { index: t, tree: grown.tree, impurity: grown.impurityDecrease, permutation, rowLeaf, inBag };
}

/**
 * Breiman's (2001) out-of-bag permutation importance for one tree: error after permuting a feature minus before.
 * Rows whose path never splits on the feature keep their leaf, so only the others are walked again.
 */
function permutationIncrease(
  job: TrainingJob,
  t: number,
  tree: FlatTree,
  walk: ReturnType<typeof binnedWalker>,
  inBag: Uint8Array,
  rowLeaf: Int32Array,
): Float64Array {
  const { data } = job;
  const p = data.features;
  const out = new Float64Array(p);
  const random = stream(job.seed, 'permute', t);
  let oob: number[] = [];
  for (let i = 0; i < data.rows; i++) if (inBag[i] === 0) oob.push(i);
  if (oob.length === 0) return out;
  if (oob.length > job.permutationRows) {
    for (let i = 0; i < job.permutationRows; i++) {
      const j = i + Math.floor(random() * (oob.length - i));
      const tmp = oob[i];
      oob[i] = oob[j];
      oob[j] = tmp;
    }
    oob = oob.slice(0, job.permutationRows);
  }
  const masks = pathMasks(tree);
  const used = new Uint8Array(p);
  for (let node = 0; node < tree.nodeCount; node++) if (tree.feature[node] >= 0) used[tree.feature[node]] = 1;
  const codes = new Uint8Array(oob.length);
  for (let f = 0; f < p; f++) {
    // A feature the tree never splits on cannot change its output: its increase is exactly zero.
    if (!used[f]) continue;
    for (let i = 0; i < oob.length; i++) codes[i] = data.bins[oob[i] * p + f];
    for (let i = codes.length - 1; i > 0; i--) {
      const j = Math.floor(random() * (i + 1));
      const tmp = codes[i];
      codes[i] = codes[j];
      codes[j] = tmp;
    }
    const bit = 1 << Math.min(f, 31);
    let delta = 0;
    for (let i = 0; i < oob.length; i++) {
      const r = oob[i];
      const before = rowLeaf[r];
      if ((masks[before] & bit) === 0) continue;
      const after = walk(r, f, codes[i]);
      if (after !== before) delta += rowError(job, tree, r, after) - rowError(job, tree, r, before);
    }
    out[f] = delta / oob.length;
  }
  return out;
}

/** 0/1 misclassification or squared error of one tree's leaf for row r. */
function rowError(job: TrainingJob, tree: FlatTree, r: number, leaf: number): number {
  const target = job.target;
  if (target.kind === 'classes') {
    return argmaxAt(tree.value, leaf * target.classes, target.classes) === target.y[r] ? 0 : 1;
  }
  const d = tree.value[leaf] - target.y[r];
  return d * d;
}
