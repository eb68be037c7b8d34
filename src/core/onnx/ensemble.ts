// Both generations of the ai.onnx.ml tree operators read into one checked form: a node graph (nodes may be shared,
// as BRANCH_EQ chains share their target) with every index inside its arrays, plus how leaf weights combine.
// TreeEnsembleClassifier/Regressor (operator sets 1 to 4) name nodes by (tree id, node id) and keep leaves as
// LEAF nodes; TreeEnsemble (operator set 5) keeps interior nodes and leaves in separate lists.
import { MAX_CLASSES_STORED, MAX_FEATURES, MAX_TREES } from '../limits';
import { Attributes, type Fail } from './attributes';
import { readBase } from './base-values';

export const MODE = { LEQ: 0, LT: 1, GTE: 2, GT: 3, EQ: 4, NEQ: 5, MEMBER: 6, LEAF: 7 } as const;
const MODE_NAMES = ['BRANCH_LEQ', 'BRANCH_LT', 'BRANCH_GTE', 'BRANCH_GT', 'BRANCH_EQ', 'BRANCH_NEQ', 'BRANCH_MEMBER', 'LEAF'];

export interface Limits {
  /** Most bytes a file may have. */
  readonly maxBytes: number;
  readonly maxTrees: number;
  /** Most nodes (interior and leaves) the file may list. */
  readonly maxNodes: number;
  /** Most nodes the converted forest may have: shared subtrees are copied, and set tests become several splits. */
  readonly maxForestNodes: number;
  readonly maxFeatures: number;
  readonly maxOutputs: number;
}

export const DEFAULT_LIMITS: Limits = {
  maxBytes: 512 * 2 ** 20,
  maxTrees: MAX_TREES,
  maxNodes: 20_000_000,
  maxForestNodes: 20_000_000,
  maxFeatures: MAX_FEATURES,
  maxOutputs: MAX_CLASSES_STORED,
};

export interface Ensemble {
  readonly operator: 'TreeEnsembleClassifier' | 'TreeEnsembleRegressor' | 'TreeEnsemble';
  readonly nodes: number;
  readonly mode: Uint8Array;
  readonly feature: Int32Array;
  readonly split: Float64Array;
  readonly trueNext: Int32Array;
  readonly falseNext: Int32Array;
  readonly missingTrue: Uint8Array;
  /** Per node, when the file gives one for every node (interior and leaf). */
  readonly hitRate?: Float64Array;
  /** BRANCH_MEMBER nodes: their set is members[memberStart[n] .. memberStart[n] + memberCount[n]). */
  readonly memberStart: Int32Array;
  readonly memberCount: Int32Array;
  readonly members: Float64Array;
  /** Leaf weights, grouped by node: entries weightStart[n] .. weightStart[n + 1]. */
  readonly weightStart: Int32Array;
  readonly weightTarget: Int32Array;
  readonly weightValue: Float64Array;
  readonly roots: Int32Array;
  /** Classes (classifier) or targets. */
  readonly outputs: number;
  readonly classLabels?: readonly string[];
  /** How the runtime combines the trees: the sum or the mean of their weights, plus base values. */
  readonly aggregate: 'sum' | 'average';
  /** post_transform: NONE, or the link of a boosted classifier (LOGISTIC, SOFTMAX). */
  readonly transform: 'NONE' | 'LOGISTIC' | 'SOFTMAX';
  readonly base: Float64Array;
  /** Largest feature index used, plus one. */
  readonly featuresUsed: number;
  readonly ignored: readonly string[];
  readonly notes: readonly string[];
}

function checkCount(fail: Fail, what: string, n: number, max: number): void {
  if (n > max) fail(`${what} (${n}) is more than the limit of ${max}`);
}

function sameLength(fail: Fail, where: string, n: number, lists: Record<string, ArrayLike<unknown> | undefined>): void {
  for (const [name, list] of Object.entries(lists)) {
    if (list && list.length !== n) fail(`${where} attribute "${name}" has ${list.length} entries where the node lists have ${n}`);
  }
}

function postTransform(fail: Fail, where: string, value: string): Ensemble['transform'] {
  if (value === 'NONE' || value === 'LOGISTIC' || value === 'SOFTMAX') return value;
  return fail(`${where} applies post_transform ${value}; Copse reads NONE, and LOGISTIC or SOFTMAX on a classifier's summed scores`);
}

/** TreeEnsembleClassifier or TreeEnsembleRegressor, operator sets 1 to 4. */
export function readLegacy(attrs: Attributes, classifier: boolean, fail: Fail, where: string, limits: Limits): Ensemble {
  const treeIds = attrs.ints('nodes_treeids')!;
  const n = treeIds.length;
  if (n === 0) fail(`${where} has no nodes`);
  checkCount(fail, 'The node count', n, limits.maxNodes);
  const nodeIds = attrs.ints('nodes_nodeids')!;
  const featureIds = attrs.ints('nodes_featureids')!;
  const modes = attrs.strings('nodes_modes');
  if (!modes) fail(`${where} has no attribute "nodes_modes"`);
  const values = attrs.floatsOrTensor('nodes_values') ?? [];
  const trueIds = attrs.ints('nodes_truenodeids')!;
  const falseIds = attrs.ints('nodes_falsenodeids')!;
  const tracks = attrs.ints('nodes_missing_value_tracks_true', false);
  const hit = attrs.floatsOrTensor('nodes_hitrates');
  sameLength(fail, where, n, {
    nodes_nodeids: nodeIds,
    nodes_featureids: featureIds,
    nodes_modes: modes,
    nodes_values: values,
    nodes_truenodeids: trueIds,
    nodes_falsenodeids: falseIds,
    nodes_missing_value_tracks_true: tracks,
    nodes_hitrates: hit,
  });

  // Trees in ascending id order; node ids of each must run 0..size-1, which the operator requires.
  const treeIndex = new Map<number, number>();
  const sorted = [...new Set(treeIds)].sort((a, b) => a - b);
  checkCount(fail, 'The tree count', sorted.length, limits.maxTrees);
  sorted.forEach((id, i) => treeIndex.set(id, i));
  const sizes = new Int32Array(sorted.length);
  for (const id of treeIds) sizes[treeIndex.get(id)!]++;
  const offset = new Int32Array(sorted.length + 1);
  for (let t = 0; t < sorted.length; t++) offset[t + 1] = offset[t] + sizes[t];
  const at = new Int32Array(n).fill(-1);
  const position = (tree: number, node: number, what: string): number => {
    const t = treeIndex.get(tree);
    if (t === undefined) return fail(`${what} names tree ${tree}, which has no nodes`);
    if (!(node >= 0 && node < sizes[t])) fail(`${what} names node ${node} of tree ${tree}, whose node ids run 0 to ${sizes[t] - 1}`);
    return offset[t] + node;
  };
  const firstListed = new Int32Array(sorted.length).fill(-1);
  for (let i = 0; i < n; i++) {
    const u = position(treeIds[i], nodeIds[i], `node entry ${i}`);
    if (at[u] >= 0) fail(`tree ${treeIds[i]} lists node ${nodeIds[i]} twice`);
    at[u] = i;
    const t = treeIndex.get(treeIds[i])!;
    if (firstListed[t] < 0) firstListed[t] = nodeIds[i];
  }
  const otherStart = sorted.filter((_, t) => firstListed[t] !== 0);

  const mode = new Uint8Array(n);
  const feature = new Int32Array(n);
  const split = new Float64Array(n);
  const trueNext = new Int32Array(n);
  const falseNext = new Int32Array(n);
  const missingTrue = new Uint8Array(n);
  const hitRate = hit ? new Float64Array(n) : undefined;
  let featuresUsed = 0;
  for (let u = 0; u < n; u++) {
    const i = at[u];
    const m = MODE_NAMES.indexOf(modes[i]);
    if (m < 0 || m === MODE.MEMBER) fail(`node entry ${i} has the mode "${modes[i]}", which the operator does not define`);
    mode[u] = m;
    if (hitRate) hitRate[u] = hit![i];
    if (m === MODE.LEAF) continue;
    const f = featureIds[i];
    if (f < 0 || f >= limits.maxFeatures) fail(`node entry ${i} tests feature ${f}, outside 0 to ${limits.maxFeatures - 1}`);
    feature[u] = f;
    if (f + 1 > featuresUsed) featuresUsed = f + 1;
    split[u] = values[i];
    trueNext[u] = position(treeIds[i], trueIds[i], `node entry ${i}'s true branch`);
    falseNext[u] = position(treeIds[i], falseIds[i], `node entry ${i}'s false branch`);
    const tr = tracks ? tracks[i] : 0;
    if (tr !== 0 && tr !== 1) fail(`node entry ${i} has nodes_missing_value_tracks_true ${tr}, not 0 or 1`);
    missingTrue[u] = tr;
  }

  const prefix = classifier ? 'class' : 'target';
  const wTree = attrs.ints(`${prefix}_treeids`)!;
  const wNode = attrs.ints(`${prefix}_nodeids`)!;
  const wId = attrs.ints(`${prefix}_ids`)!;
  const wValue = attrs.floatsOrTensor(`${prefix}_weights`);
  if (!wValue) fail(`${where} has no attribute "${prefix}_weights"`);
  const w = wTree.length;
  checkCount(fail, 'The leaf weight count', w, limits.maxNodes);
  if (wNode.length !== w || wId.length !== w || wValue.length !== w) fail(`${where} has ${prefix}_* lists of different lengths`);

  let outputs: number;
  let classLabels: string[] | undefined;
  let aggregate: 'sum' | 'average' = 'sum';
  if (classifier) {
    const strings = attrs.strings('classlabels_strings');
    const numbers = attrs.ints('classlabels_int64s', false);
    if ((strings && strings.length) && (numbers && numbers.length)) fail(`${where} gives both classlabels_strings and classlabels_int64s`);
    classLabels = strings && strings.length ? strings : numbers ? numbers.map(String) : undefined;
    if (!classLabels || classLabels.length === 0) fail(`${where} names no classes (classlabels_strings or classlabels_int64s)`);
    outputs = classLabels.length;
  } else {
    outputs = attrs.int('n_targets', 1);
    const fn = attrs.text('aggregate_function', 'SUM');
    if (fn === 'AVERAGE') aggregate = 'average';
    else if (fn !== 'SUM') fail(`${where} combines trees by ${fn}; Copse can only take a SUM or an AVERAGE`);
  }
  if (!(outputs >= 1 && outputs <= limits.maxOutputs)) fail(`${where} has ${outputs} outputs, outside 1 to ${limits.maxOutputs}`);
  const transform = postTransform(fail, where, attrs.text('post_transform', 'NONE'));

  const weightStart = new Int32Array(n + 1);
  const owner = new Int32Array(w);
  for (let j = 0; j < w; j++) {
    const u = position(wTree[j], wNode[j], `${prefix} weight ${j}`);
    if (mode[u] !== MODE.LEAF) fail(`${prefix} weight ${j} is on node ${wNode[j]} of tree ${wTree[j]}, which is not a leaf`);
    if (!(wId[j] >= 0 && wId[j] < outputs)) fail(`${prefix} weight ${j} is for ${prefix} ${wId[j]}, outside 0 to ${outputs - 1}`);
    if (!Number.isFinite(wValue[j])) fail(`${prefix} weight ${j} is not a finite number`);
    owner[j] = u;
    weightStart[u + 1]++;
  }
  for (let u = 0; u < n; u++) weightStart[u + 1] += weightStart[u];
  const fill = weightStart.slice(0, n);
  const weightTarget = new Int32Array(w);
  const weightValue = new Float64Array(w);
  for (let j = 0; j < w; j++) {
    const k = fill[owner[j]]++;
    weightTarget[k] = wId[j];
    weightValue[k] = wValue[j];
  }
  const base = readBase(attrs.floatsOrTensor('base_values'), outputs, fail, where);
  return {
    operator: classifier ? 'TreeEnsembleClassifier' : 'TreeEnsembleRegressor',
    nodes: n,
    mode,
    feature,
    split,
    trueNext,
    falseNext,
    missingTrue,
    hitRate,
    memberStart: new Int32Array(n),
    memberCount: new Int32Array(n),
    members: new Float64Array(0),
    weightStart,
    weightTarget,
    weightValue,
    roots: offset.slice(0, sorted.length),
    outputs,
    classLabels,
    aggregate,
    transform,
    base,
    featuresUsed,
    ignored: attrs.unused(),
    notes: otherStart.length
      ? [`${otherStart.length === 1 ? 'Tree' : 'Trees'} ${otherStart.slice(0, 5).join(', ')}${otherStart.length > 5 ? ', ...' : ''} list another node before node 0; Copse starts each tree at node 0, as the operator's numbering implies, while onnxruntime starts at the first node listed.`]
      : [],
  };
}

const AGGREGATES = ['AVERAGE', 'SUM', 'MIN', 'MAX'];
const TRANSFORMS = ['NONE', 'SOFTMAX', 'LOGISTIC', 'SOFTMAX_ZERO', 'PROBIT'];

/** TreeEnsemble, operator set 5. */
export function readTreeEnsemble(attrs: Attributes, fail: Fail, where: string, limits: Limits): Ensemble {
  const featureIds = attrs.ints('nodes_featureids')!;
  const ni = featureIds.length;
  const leafTargets = attrs.ints('leaf_targetids')!;
  const nl = leafTargets.length;
  checkCount(fail, 'The node count', ni + nl, limits.maxNodes);
  if (nl === 0) fail(`${where} has no leaves`);
  const splits = attrs.tensor('nodes_splits', true)!.values;
  const modes = attrs.tensor('nodes_modes', true)!.values;
  const trueIds = attrs.ints('nodes_truenodeids')!;
  const trueLeaf = attrs.ints('nodes_trueleafs')!;
  const falseIds = attrs.ints('nodes_falsenodeids')!;
  const falseLeaf = attrs.ints('nodes_falseleafs')!;
  const tracks = attrs.ints('nodes_missing_value_tracks_true', false);
  sameLength(fail, where, ni, {
    nodes_splits: splits,
    nodes_modes: modes,
    nodes_truenodeids: trueIds,
    nodes_trueleafs: trueLeaf,
    nodes_falsenodeids: falseIds,
    nodes_falseleafs: falseLeaf,
    nodes_missing_value_tracks_true: tracks,
  });
  // Interior hit rates only: leaves have none in this generation, so no node gets a cover from them.
  attrs.tensor('nodes_hitrates', false);
  const leafWeights = attrs.tensor('leaf_weights', true)!.values;
  if (leafWeights.length !== nl) fail(`${where} has ${leafWeights.length} leaf weights for ${nl} leaf target ids`);
  const outputs = attrs.int('n_targets');
  if (!(outputs >= 1 && outputs <= limits.maxOutputs)) fail(`${where} has n_targets ${outputs}, outside 1 to ${limits.maxOutputs}`);
  const fn = attrs.int('aggregate_function', 1);
  if (fn !== 0 && fn !== 1) fail(`${where} combines trees by ${AGGREGATES[fn] ?? `function ${fn}`}; Copse can only take a SUM or an AVERAGE`);
  const post = attrs.int('post_transform', 0);
  const transform = postTransform(fail, where, TRANSFORMS[post] ?? `number ${post}`);
  const rootList = attrs.ints('tree_roots')!;
  if (rootList.length === 0) fail(`${where} has no trees`);
  checkCount(fail, 'The tree count', rootList.length, limits.maxTrees);

  const n = ni + nl;
  const mode = new Uint8Array(n).fill(MODE.LEAF, ni);
  const feature = new Int32Array(n);
  const split = new Float64Array(n);
  const trueNext = new Int32Array(n);
  const falseNext = new Int32Array(n);
  const missingTrue = new Uint8Array(n);
  const memberStart = new Int32Array(n);
  const memberCount = new Int32Array(n);
  const target = (id: number, leaf: number, i: number, side: string): number => {
    if (leaf !== 0 && leaf !== 1) fail(`node ${i} has nodes_${side}leafs ${leaf}, not 0 or 1`);
    const limit = leaf ? nl : ni;
    if (!(id >= 0 && id < limit)) fail(`node ${i}'s ${side} branch is ${leaf ? 'leaf' : 'node'} ${id}, outside 0 to ${limit - 1}`);
    return leaf ? ni + id : id;
  };
  let featuresUsed = 0;
  let memberNodes = 0;
  for (let i = 0; i < ni; i++) {
    const m = modes[i];
    if (!(Number.isInteger(m) && m >= 0 && m <= MODE.MEMBER)) fail(`node ${i} has mode ${m}, which the operator does not define`);
    mode[i] = m;
    if (m === MODE.MEMBER) memberNodes++;
    const f = featureIds[i];
    if (f < 0 || f >= limits.maxFeatures) fail(`node ${i} tests feature ${f}, outside 0 to ${limits.maxFeatures - 1}`);
    feature[i] = f;
    if (f + 1 > featuresUsed) featuresUsed = f + 1;
    split[i] = splits[i];
    trueNext[i] = target(trueIds[i], trueLeaf[i], i, 'true');
    falseNext[i] = target(falseIds[i], falseLeaf[i], i, 'false');
    const tr = tracks ? tracks[i] : 0;
    if (tr !== 0 && tr !== 1) fail(`node ${i} has nodes_missing_value_tracks_true ${tr}, not 0 or 1`);
    missingTrue[i] = tr;
  }
  // Sets follow each other in the order of their nodes, each ended by a NaN.
  const values = memberNodes ? attrs.tensor('membership_values', true)!.values : (attrs.tensor('membership_values', false)?.values ?? []);
  const members = Float64Array.from(values);
  let cursor = 0;
  for (let i = 0; i < ni && memberNodes > 0; i++) {
    if (mode[i] !== MODE.MEMBER) continue;
    if (cursor >= members.length) fail(`${where} has fewer membership sets than BRANCH_MEMBER nodes`);
    memberStart[i] = cursor;
    while (cursor < members.length && !Number.isNaN(members[cursor])) cursor++;
    memberCount[i] = cursor - memberStart[i];
    cursor++;
  }
  const weightStart = new Int32Array(n + 1);
  const weightTarget = new Int32Array(nl);
  const weightValue = new Float64Array(nl);
  for (let j = 0; j < nl; j++) {
    const k = leafTargets[j];
    if (!(k >= 0 && k < outputs)) fail(`leaf ${j} is for target ${k}, outside 0 to ${outputs - 1}`);
    if (!Number.isFinite(leafWeights[j])) fail(`leaf ${j}'s weight is not a finite number`);
    weightTarget[j] = k;
    weightValue[j] = leafWeights[j];
  }
  for (let u = 0; u < n; u++) weightStart[u + 1] = weightStart[u] + (u >= ni ? 1 : 0);
  const roots = Int32Array.from(rootList, (r, t) => {
    if (!(r >= 0 && r < ni)) fail(`tree ${t}'s root is node ${r}, outside 0 to ${ni - 1}`);
    return r;
  });
  return {
    operator: 'TreeEnsemble',
    nodes: n,
    mode,
    feature,
    split,
    trueNext,
    falseNext,
    missingTrue,
    memberStart,
    memberCount,
    members,
    weightStart,
    weightTarget,
    weightValue,
    roots,
    outputs,
    aggregate: fn === 0 ? 'average' : 'sum',
    transform,
    base: new Float64Array(outputs),
    featuresUsed,
    ignored: attrs.unused(),
    notes: [],
  };
}

/** Refuses a cycle anywhere below the roots (a walk would never end); linear time, no recursion. */
export function checkAcyclic(e: Ensemble, fail: Fail): void {
  const state = new Uint8Array(e.nodes); // 0 unseen, 1 on the current path, 2 done
  const stack = new Int32Array(e.nodes);
  const branch = new Uint8Array(e.nodes); // children already pushed: 0, 1 or 2
  for (const root of e.roots) {
    if (state[root] === 2) continue;
    let top = 0;
    stack[0] = root;
    state[root] = 1;
    branch[root] = 0;
    while (top >= 0) {
      const u = stack[top];
      if (e.mode[u] === MODE.LEAF || branch[u] === 2) {
        state[u] = 2;
        top--;
        continue;
      }
      const c = branch[u]++ === 0 ? e.trueNext[u] : e.falseNext[u];
      if (state[c] === 1) fail(`its node graph has a cycle through node ${c}`);
      if (state[c] === 0) {
        state[c] = 1;
        branch[c] = 0;
        stack[++top] = c;
      }
    }
  }
}
