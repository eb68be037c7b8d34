// Turns one tree of a checked ONNX ensemble into a FlatTree. Copse's splits are "x <= t" on numbers and level sets
// on categorical features, each with one side for missing values; every ONNX node mode maps onto them exactly:
// - LEQ/LT/GTE/GT become one split, with the threshold that reproduces the runtime's own comparison (a float
//   input is rounded to float32 before it is compared, so the split sits where that rounding changes the answer);
// - EQ chains sharing one target, NEQ and MEMBER become a level set on a categorical feature, or on a numeric one
//   a small search over the equal values' intervals;
// - a node reached along several paths is copied once per path, so the result is a tree; a budget bounds that.
import { GrowableTree } from '../tree/growable';
import type { FlatTree } from '../tree/tree';
import type { Fail } from './attributes';
import { MODE, type Ensemble } from './ensemble';
import { atMost32, nextDown64, prev32 } from './float32';

export interface ExpandContext {
  readonly ensemble: Ensemble;
  /** Level count per feature: 0 for numeric features. */
  readonly levels: Int32Array;
  /** The graph input is float: values are rounded to float32 before each comparison. */
  readonly float32: boolean;
  /** Leaf value = scale * (sum of the leaf's weights per output) + base[output]. */
  readonly scale: number;
  readonly withCover: boolean;
  readonly fail: Fail;
  /** Nodes the whole conversion may still create. */
  budget: number;
  readonly maxNodes: number;
  /** Chain steps the whole conversion may still walk: a hostile graph can make chains long and share them. */
  steps: number;
}

/** Largest double threshold t with: x <= t exactly when the runtime finds x <= v. */
function atMost(ctx: ExpandContext, v: number): number {
  return ctx.float32 ? atMost32(Math.fround(v)) : v;
}

/** Largest double threshold t with: x <= t exactly when the runtime finds x < v. */
function below(ctx: ExpandContext, v: number): number {
  return ctx.float32 ? atMost32(prev32(Math.fround(v))) : nextDown64(v);
}

/** Copse's model file keeps finite thresholds; only an input of +-Infinity itself can tell the difference. */
function finite(t: number): number {
  return t > Number.MAX_VALUE ? Number.MAX_VALUE : t < -Number.MAX_VALUE ? -Number.MAX_VALUE : t;
}

/** The tree being converted, with a budget on the nodes the whole conversion may create. */
class Builder extends GrowableTree<Float64Array> {
  constructor(private readonly ctx: ExpandContext, outputs: number) {
    // Leaf weights are summed in doubles and rounded to float32 once, as the runtime's own sums are.
    super(outputs, (n) => new Float64Array(n), 64);
  }

  alloc(): number {
    if (--this.ctx.budget < 0) {
      this.ctx.fail(`it converts to more than ${this.ctx.maxNodes} nodes (nodes reached along several paths are copied, set tests become several splits)`);
    }
    return this.add();
  }

  split(id: number, f: number, threshold: number, missingLeft: boolean, cover: number): void {
    this.feature[id] = f;
    this.threshold[id] = threshold;
    this.missingLeft[id] = missingLeft ? 1 : 0;
    this.cover[id] = cover;
  }

  /** Children are allocated before this is called: allocating may replace the arrays. */
  link(id: number, left: number, right: number): void {
    this.left[id] = left;
    this.right[id] = right;
  }

  levelSet(levels: number, inSet: (code: number) => boolean): number {
    const at = this.addWords((levels + 31) >>> 5);
    for (let c = 0; c < levels; c++) if (inSet(c)) this.catBits[at + (c >>> 5)] |= 1 << (c & 31);
    return at;
  }
}

/** Work still to do: make slot `slot` the copy of ONNX node `node`, or a step of an interval search. */
type Task =
  | { kind: 'node'; node: number; slot: number }
  | { kind: 'search'; slot: number; f: number; lo: Float64Array; hi: Float64Array; a: number; b: number; inside: number; outside: number; nanInside: boolean; cover: number };

/** A set test: which values pass, where passing and failing values go, and where NaN goes. */
interface SetTest {
  readonly values: number[];
  readonly inside: number;
  readonly outside: number;
  readonly nanInside: boolean;
}

export function expandTree(ctx: ExpandContext, root: number): FlatTree {
  const e = ctx.ensemble;
  const K = e.outputs;
  const b = new Builder(ctx, K);
  const work: Task[] = [{ kind: 'node', node: root, slot: b.alloc() }];
  const child = (node: number): number => {
    const slot = b.alloc();
    work.push({ kind: 'node', node, slot });
    return slot;
  };
  while (work.length) {
    const task = work.pop()!;
    if (task.kind === 'search') {
      searchStep(b, task, work, child);
      continue;
    }
    const { node: u, slot } = task;
    const cover = ctx.withCover && e.hitRate ? e.hitRate[u] : 0;
    const m = e.mode[u];
    if (m === MODE.LEAF) {
      b.cover[slot] = cover;
      for (let j = e.weightStart[u]; j < e.weightStart[u + 1]; j++) b.value[slot * K + e.weightTarget[j]] += e.weightValue[j];
      for (let k = 0; k < K; k++) {
        const v = Math.fround(ctx.scale * b.value[slot * K + k] + e.base[k]);
        if (!Number.isFinite(v)) ctx.fail(`a leaf value overflows a float32 once the trees' weights are combined`);
        b.value[slot * K + k] = v;
      }
      continue;
    }
    // Both branches to one node (as a Copse export's pass-through nodes): nothing to decide, so no split.
    if (e.trueNext[u] === e.falseNext[u]) {
      if (--ctx.steps < 0) ctx.fail('its chains of pass-through nodes are too long or too often shared to convert');
      work.push({ kind: 'node', node: e.trueNext[u], slot });
      continue;
    }
    const f = e.feature[u];
    const v = e.split[u];
    const levels = ctx.levels[f];
    if (m <= MODE.GT) {
      if (Number.isNaN(v)) ctx.fail(`node ${u} compares with a threshold that is not a number`);
      const yes = e.trueNext[u];
      const no = e.falseNext[u];
      if (levels > 0) {
        const passes = (c: number) => (m === MODE.LEQ ? c <= v : m === MODE.LT ? c < v : m === MODE.GTE ? c >= v : c > v);
        categorical(b, slot, f, levels, { values: range(levels).filter(passes), inside: yes, outside: no, nanInside: e.missingTrue[u] === 1 }, cover, child);
        continue;
      }
      // "x >= v" is "not x < v" and "x > v" is "not x <= v": the same threshold with the branches swapped.
      const t = finite(m === MODE.LEQ || m === MODE.GT ? atMost(ctx, v) : below(ctx, v));
      const flip = m === MODE.GTE || m === MODE.GT;
      b.split(slot, f, t, (e.missingTrue[u] === 1) !== flip, cover);
      const l = child(flip ? no : yes);
      b.link(slot, l, child(flip ? yes : no));
      continue;
    }
    const test = setTest(ctx, u);
    if (levels > 0) categorical(b, slot, f, levels, test, cover, child);
    else {
      const [lo, hi] = intervals(ctx, test.values);
      work.push({ kind: 'search', slot, f, lo, hi, a: 0, b: lo.length - 1, inside: test.inside, outside: test.outside, nanInside: test.nanInside, cover });
    }
  }
  return b.finish();
}

/**
 * The set a node tests. A run of EQ nodes on one feature that all send equality to the same node is one set
 * (that is how level sets are written as EQ chains); walking it is linear, since the graph has no cycle.
 * NaN passes NEQ ("NaN != v" holds, and onnxruntime routes it so whatever the missing flag says).
 */
function setTest(ctx: ExpandContext, u: number): SetTest {
  const e = ctx.ensemble;
  const f = e.feature[u];
  if (e.mode[u] === MODE.NEQ) return { values: [e.split[u]], inside: e.falseNext[u], outside: e.trueNext[u], nanInside: false };
  if (e.mode[u] === MODE.MEMBER) {
    const s = e.memberStart[u];
    return { values: Array.from(e.members.subarray(s, s + e.memberCount[u])), inside: e.trueNext[u], outside: e.falseNext[u], nanInside: e.missingTrue[u] === 1 };
  }
  const inside = e.trueNext[u];
  const values: number[] = [];
  let nanInside = false;
  let cur = u;
  while (e.mode[cur] === MODE.EQ && e.feature[cur] === f && e.trueNext[cur] === inside) {
    if (--ctx.steps < 0) ctx.fail('its chains of BRANCH_EQ nodes are too long or too often shared to convert');
    values.push(e.split[cur]);
    // NaN fails every equality; it reaches the shared target only through a node whose flag sends it there.
    if (e.missingTrue[cur] === 1) nanInside = true;
    cur = e.falseNext[cur];
  }
  return { values, inside, outside: cur, nanInside };
}

function range(n: number): number[] {
  return Array.from({ length: n }, (_, i) => i);
}

/**
 * A level set over codes 0..levels-1. Copse sends a missing value and a code outside the list to one side; the
 * ONNX graph sends a code outside the list to `outside`. They differ only if NaN goes inside and a row carries a
 * code the schema does not list, which encoding a table never produces (such a level becomes NaN).
 */
function categorical(b: Builder, slot: number, f: number, levels: number, test: SetTest, cover: number, child: (node: number) => number): void {
  const codes = new Set(test.values.filter((c) => Number.isInteger(c) && c >= 0 && c < levels));
  b.split(slot, f, b.levelSet(levels, (c) => codes.has(c)), test.nanInside, cover);
  const l = child(test.inside);
  b.link(slot, l, child(test.outside));
}

/** The value intervals (lo, hi] the runtime counts as equal to one of the values, sorted and merged. */
function intervals(ctx: ExpandContext, values: number[]): [Float64Array, Float64Array] {
  const pairs = values
    .filter((v) => !Number.isNaN(v))
    .map((v) => [below(ctx, v), atMost(ctx, v)] as const)
    .sort((p, q) => p[0] - q[0]);
  const lo: number[] = [];
  const hi: number[] = [];
  for (const [l, h] of pairs) {
    if (lo.length && l <= hi[hi.length - 1]) hi[hi.length - 1] = Math.max(hi[hi.length - 1], h);
    else {
      lo.push(l);
      hi.push(h);
    }
  }
  return [Float64Array.from(lo, finite), Float64Array.from(hi, finite)];
}

/**
 * One step of a binary search over intervals a..b: "x <= lo[mid]" leads to the intervals before, otherwise
 * "x <= hi[mid]" means inside, else the intervals after. An empty range is outside. NaN follows the missing
 * sides to `inside` or, always going left, to an empty range and so outside.
 */
function searchStep(
  b: Builder,
  t: Extract<Task, { kind: 'search' }>,
  work: Task[],
  child: (node: number) => number,
): void {
  if (t.a > t.b) {
    work.push({ kind: 'node', node: t.outside, slot: t.slot });
    return;
  }
  const mid = (t.a + t.b) >>> 1;
  b.split(t.slot, t.f, t.lo[mid], !t.nanInside, t.cover);
  const before = b.alloc();
  const rest = b.alloc();
  b.link(t.slot, before, rest);
  work.push({ ...t, slot: before, b: mid - 1 });
  b.split(rest, t.f, t.hi[mid], true, t.cover);
  const inside = child(t.inside);
  const after = b.alloc();
  b.link(rest, inside, after);
  work.push({ ...t, slot: after, a: mid + 1 });
}
