// Grows one CART tree depth-first over binned rows. Rows are an index array that each split partitions in
// place, so a node is a range of it. Bootstrap duplicates are weights, not copies.
import type { Criterion } from '../base/task';
import type { BinnedMatrix } from '../data/binning';
import { sideScore } from './criterion';
import { emptyCandidate, HistogramSet, type SplitCandidate } from './splitter';
import { GrowableTree } from './growable';
import { NodeStack } from './node-stack';
import type { FlatTree } from './tree';

export type TargetData =
  | { readonly kind: 'classes'; readonly y: Int32Array; readonly classes: number }
  | { readonly kind: 'values'; readonly y: Float64Array };

export interface GrowSettings {
  readonly criterion: Criterion;
  readonly featuresPerSplit: number;
  readonly maxDepth: number;
  readonly minSplit: number;
  readonly minLeaf: number;
}

export interface GrownTree {
  readonly tree: FlatTree;
  /** The bin each split sends left at or below (numeric); -1 elsewhere. Kept to walk binned rows fast. */
  readonly splitBin: Int32Array;
  /** Weighted impurity decrease per feature, summed over the tree's splits. */
  readonly impurityDecrease: Float64Array;
}

const MISSING_LEFT = 1;

/** The builder's tree, plus the bin of each numeric split for walking binned rows. */
class NodeArrays extends GrowableTree {
  splitBin = new Int32Array(256);

  constructor(outputs: number) {
    super(outputs, (n) => new Float32Array(n), 256);
  }

  override add(): number {
    const id = super.add();
    this.splitBin[id] = -1;
    return id;
  }

  addLevelSet(set: Uint32Array, words: number): number {
    const at = this.addWords(words);
    this.catBits.set(set.subarray(0, words), at);
    return at;
  }

  protected override enlarge(capacity: number): void {
    super.enlarge(capacity);
    const splitBin = new Int32Array(capacity);
    splitBin.set(this.splitBin);
    this.splitBin = splitBin;
  }
}

/**
 * Grows a tree on the rows idx (each with weight w[row] > 0). `edges[f]` maps a numeric bin to its real
 * threshold; `random` draws the features tried at each split.
 */
export function growTree(
  data: BinnedMatrix,
  edges: readonly (readonly number[])[],
  centres: readonly (readonly number[])[],
  target: TargetData,
  w: Float64Array,
  idx: Int32Array,
  settings: GrowSettings,
  random: () => number,
  /** Filled with the leaf of every row in idx. */
  rowLeaf?: Int32Array,
): GrownTree {
  const p = data.features;
  const bins = data.bins;
  const channels = target.kind === 'classes' ? target.classes : 2;
  const outputs = target.kind === 'classes' ? target.classes : 1;
  const score = sideScore(settings.criterion);
  const gini = settings.criterion === 'gini';
  // The first `first` draws happen at every node whatever the scans find, so their histograms fill in one pass.
  const first = Math.max(1, Math.min(settings.featuresPerSplit, p));
  const hists = new HistogramSet(channels, first);
  const drawn = new Int32Array(first);
  const nodes = new NodeArrays(outputs);
  const impurityDecrease = new Float64Array(p);
  const order = new Int32Array(p);
  for (let f = 0; f < p; f++) order[f] = f;
  const best: SplitCandidate = emptyCandidate();
  const leftTotal = new Float64Array(channels);
  const rightTotal = new Float64Array(channels);
  const total = new Float64Array(channels);
  let majority = 0;
  const levelKey =
    target.kind === 'values'
      ? (ch: Float64Array, o: number) => (ch[o] > 0 ? ch[o + 1] / ch[o] : 0)
      : (ch: Float64Array, o: number) => {
          let s = 0;
          for (let k = 0; k < channels; k++) s += ch[o + k];
          return s > 0 ? ch[o + majority] / s : 0;
        };

  // Features are drawn without replacement until featuresPerSplit of them vary in the node.
  const draw = (j: number): number => {
    const r = j + Math.floor(random() * (p - j));
    const f = order[r];
    order[r] = order[j];
    order[j] = f;
    return f;
  };

  sumRows(target, w, idx, 0, idx.length, total);
  const stack = new NodeStack(channels);
  stack.push(nodes.add(), 0, idx.length, 0, total);

  while (stack.size > 0) {
    const id = stack.topId();
    const start = stack.topStart();
    const end = stack.topEnd();
    const depth = stack.topDepth();
    stack.pop(total);
    const count = end - start;
    writeValue(nodes, id, total, target.kind, outputs);
    let leaf = count < settings.minSplit || count < 2 * settings.minLeaf || depth >= settings.maxDepth || isPure(target, idx, start, end, total);
    if (!leaf) {
      best.score = -Infinity;
      best.feature = -1;
      if (target.kind === 'classes') {
        // Binary and multi-class targets order levels by the share of the node's most common class.
        majority = target.classes === 2 ? 1 : argmax(total);
      }
      let tried = 0;
      let j = 0;
      for (; j < first && j < p; j++) drawn[j] = draw(j);
      if (target.kind === 'classes') hists.addClasses(bins, p, drawn, j, idx, start, end, target.y, w);
      else hists.addValues(bins, p, drawn, j, idx, start, end, target.y, w);
      for (let i = 0; i < j; i++) {
        const f = drawn[i];
        const h = hists.lanes[i];
        if (h.scan(f, data.valueBins[f], data.categorical[f] === 1, total, count, settings.minLeaf, score, levelKey, best, gini)) tried++;
        h.clear();
      }
      // A feature constant in the node does not count; each further one is drawn and filled on its own.
      for (; j < p && tried < settings.featuresPerSplit; j++) {
        drawn[0] = draw(j);
        const f = drawn[0];
        if (target.kind === 'classes') hists.addClasses(bins, p, drawn, 1, idx, start, end, target.y, w);
        else hists.addValues(bins, p, drawn, 1, idx, start, end, target.y, w);
        const h = hists.lanes[0];
        if (h.scan(f, data.valueBins[f], data.categorical[f] === 1, total, count, settings.minLeaf, score, levelKey, best, gini)) tried++;
        h.clear();
      }
      if (best.feature < 0) leaf = true;
    }
    if (leaf) {
      if (rowLeaf) for (let j = start; j < end; j++) rowLeaf[idx[j]] = id;
      continue;
    }

    const f = best.feature;
    const mid = partition(bins, p, f, data.valueBins[f], best, idx, start, end);
    const lt = leftTotal;
    const rt = rightTotal;
    sumRows(target, w, idx, start, mid, lt);
    sumRows(target, w, idx, mid, end, rt);
    impurityDecrease[f] += best.score - score(total, 0, channels);
    nodes.feature[id] = f;
    // Where training rows gave no evidence, missing values later follow the heavier side.
    const missingLeft = best.sawMissing ? best.missingLeft : weightOf(lt, target.kind) >= weightOf(rt, target.kind);
    nodes.missingLeft[id] = missingLeft ? MISSING_LEFT : 0;
    if (best.categorical) {
      nodes.threshold[id] = nodes.addLevelSet(best.levelSet, (data.valueBins[f] + 31) >>> 5);
    } else {
      const e = edges[f];
      const bin = best.nextBin < 0 ? best.bin : middleEdge(e, centres[f], best.bin, best.nextBin);
      nodes.splitBin[id] = bin;
      // The last value bin has no upper edge: that split separates the values from the missing rows.
      nodes.threshold[id] = bin < e.length ? e[bin] : Number.MAX_VALUE;
    }
    const l = nodes.add();
    const r = nodes.add();
    nodes.left[id] = l;
    nodes.right[id] = r;
    stack.push(r, mid, end, depth + 1, rt);
    stack.push(l, start, mid, depth + 1, lt);
  }
  const tree = nodes.finish();
  return { tree, splitBin: nodes.splitBin.slice(0, tree.nodeCount), impurityDecrease };
}

function sumRows(target: TargetData, w: Float64Array, idx: Int32Array, start: number, end: number, out: Float64Array): void {
  out.fill(0);
  if (target.kind === 'classes') {
    const y = target.y;
    for (let j = start; j < end; j++) out[y[idx[j]]] += w[idx[j]];
  } else {
    const y = target.y;
    for (let j = start; j < end; j++) {
      const r = idx[j];
      out[0] += w[r];
      out[1] += w[r] * y[r];
    }
  }
}

function writeValue(nodes: NodeArrays, id: number, total: Float64Array, kind: TargetData['kind'], outputs: number): void {
  if (kind === 'classes') {
    let s = 0;
    for (let k = 0; k < outputs; k++) s += total[k];
    for (let k = 0; k < outputs; k++) nodes.value[id * outputs + k] = s > 0 ? total[k] / s : 0;
    nodes.cover[id] = s;
  } else {
    nodes.value[id] = total[0] > 0 ? total[1] / total[0] : 0;
    nodes.cover[id] = total[0];
  }
}

function isPure(target: TargetData, idx: Int32Array, start: number, end: number, total: Float64Array): boolean {
  if (target.kind === 'classes') {
    let nonzero = 0;
    for (let k = 0; k < total.length; k++) if (total[k] > 0) nonzero++;
    return nonzero <= 1;
  }
  const y = target.y;
  const first = y[idx[start]];
  for (let j = start + 1; j < end; j++) if (y[idx[j]] !== first) return false;
  return true;
}

function weightOf(total: Float64Array, kind: TargetData['kind']): number {
  if (kind === 'values') return total[0];
  let s = 0;
  for (let k = 0; k < total.length; k++) s += total[k];
  return s;
}

function argmax(a: Float64Array): number {
  let b = 0;
  for (let k = 1; k < a.length; k++) if (a[k] > a[b]) b = k;
  return b;
}

/**
 * Between the last bin going left (lo) and the next one holding rows (hi) lie bins this node has no rows in.
 * Any edge from lo to hi - 1 splits the node alike; the one nearest the midpoint of the two bins' values
 * leaves unseen values to the nearer side, as a threshold halfway between neighbouring values does.
 */
function middleEdge(edges: readonly number[], centres: readonly number[], lo: number, hi: number): number {
  if (hi === lo + 1) return lo;
  const mid = (centres[lo] + centres[hi]) / 2;
  let a = lo;
  let b = hi - 1;
  while (a < b) {
    const m = (a + b) >>> 1;
    if (edges[m] < mid) a = m + 1;
    else b = m;
  }
  if (a > lo && Math.abs(edges[a - 1] - mid) <= Math.abs(edges[a] - mid)) return a - 1;
  return a;
}

/** Reorders idx[start..end) so rows going left come first; returns the first right position. */
function partition(bins: Uint8Array, p: number, f: number, missingCode: number, split: SplitCandidate, idx: Int32Array, start: number, end: number): number {
  let i = start;
  let j = end - 1;
  const { missingLeft, categorical, levelSet, bin } = split;
  while (i <= j) {
    const b = bins[idx[i] * p + f];
    const left = b === missingCode ? missingLeft : categorical ? (levelSet[b >>> 5] & (1 << (b & 31))) !== 0 : b <= bin;
    if (left) i++;
    else {
      const t = idx[i];
      idx[i] = idx[j];
      idx[j] = t;
      j--;
    }
  }
  return i;
}
