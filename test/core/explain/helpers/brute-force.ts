// Reference computations written the slow, obvious way, to check the fast ones against.
//
// Shapley values (Shapley 1953, "A value for n-person games") by enumerating every feature subset, with the
// value of a subset S the tree's conditional expectation E[f(x) | x_S]: follow the row's branch at splits on
// features in S, average the two children weighted by their in-bag cover elsewhere. This is the game whose
// Shapley values path-dependent TreeSHAP computes (Lundberg et al. 2020, Nature Machine Intelligence).
// The routing below is restated here on purpose rather than imported, so the two do not share a mistake.
import type { Forest } from '../../../../src/core/forest/forest';
import { outputCount } from '../../../../src/core/base/schema';
import type { FlatTree } from '../../../../src/core/tree/tree';

function levelsOf(forest: Forest): number[] {
  return forest.schema.features.map((f) => (f.kind === 'numeric' ? 0 : f.levels!.length));
}

function rowGoesLeft(tree: FlatTree, node: number, levels: number, v: number): boolean {
  const missingSide = tree.missingLeft[node] === 1;
  if (v !== v) return missingSide;
  if (levels === 0) return v <= tree.threshold[node];
  if (!Number.isInteger(v) || v < 0 || v >= levels) return missingSide;
  const word = tree.catBits[tree.threshold[node] + Math.floor(v / 32)];
  return Math.floor(word / 2 ** (v % 32)) % 2 === 1;
}

/** E[f_tree(x) | x_S] for output k, S given as a bit mask over features. */
function expectation(tree: FlatTree, levels: number[], K: number, x: ArrayLike<number>, off: number, mask: number, node: number, k: number): number {
  if (tree.left[node] < 0) return tree.value[node * K + k];
  const f = tree.feature[node];
  if (mask & (1 << f)) {
    const next = rowGoesLeft(tree, node, levels[f], x[off + f]) ? tree.left[node] : tree.right[node];
    return expectation(tree, levels, K, x, off, mask, next, k);
  }
  const l = tree.left[node];
  const r = tree.right[node];
  const cl = tree.cover[l];
  const cr = tree.cover[r];
  const el = expectation(tree, levels, K, x, off, mask, l, k);
  const er = expectation(tree, levels, K, x, off, mask, r, k);
  return cl + cr > 0 ? (cl * el + cr * er) / (cl + cr) : (el + er) / 2;
}

/** Forest value of every subset: values[mask * K + k], the mean over trees. */
export function subsetValues(forest: Forest, x: ArrayLike<number>, off: number): Float64Array {
  const p = forest.schema.features.length;
  if (p > 16) throw new RangeError('brute force is for few features');
  const K = outputCount(forest.schema.target);
  const levels = levelsOf(forest);
  const values = new Float64Array((1 << p) * K);
  for (let mask = 0; mask < 1 << p; mask++) {
    for (const tree of forest.trees) for (let k = 0; k < K; k++) values[mask * K + k] += expectation(tree, levels, K, x, off, mask, 0, k);
    for (let k = 0; k < K; k++) values[mask * K + k] /= forest.trees.length;
  }
  return values;
}

/** phi_j = sum over S without j of |S|! (p - |S| - 1)! / p! * (v(S + j) - v(S)). */
export function bruteShapley(forest: Forest, x: ArrayLike<number>, off: number): { base: Float64Array; phi: Float64Array } {
  const p = forest.schema.features.length;
  const K = outputCount(forest.schema.target);
  const v = subsetValues(forest, x, off);
  const fact = [1];
  for (let i = 1; i <= p; i++) fact.push(fact[i - 1] * i);
  const phi = new Float64Array(p * K);
  for (let mask = 0; mask < 1 << p; mask++) {
    let size = 0;
    for (let j = 0; j < p; j++) if (mask & (1 << j)) size++;
    if (size === p) continue;
    const w = (fact[size] * fact[p - size - 1]) / fact[p];
    for (let j = 0; j < p; j++) {
      if (mask & (1 << j)) continue;
      const withJ = mask | (1 << j);
      for (let k = 0; k < K; k++) phi[j * K + k] += w * (v[withJ * K + k] - v[mask * K + k]);
    }
  }
  return { base: v.slice(0, K), phi };
}
