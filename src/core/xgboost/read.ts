// Reading XGBoost's JSON model file (Booster.save_model("model.json"), versions 1.x and 2.x) into a boosted
// ensemble (forest/boosting.ts). The file is untrusted: its size, tree, node and output counts are bounded before
// anything is allocated for them, every index is checked, each tree is walked from its root with an explicit
// stack (no recursion, each node reached once, so a cycle or a shared node is refused), and the result passes the
// model file's validator. Every refusal is one ModelError sentence naming what is wrong.
import type { FeatureInfo, Schema } from '../base/schema';
import { storedLeaf, type Boosting, type Link } from '../forest/boosting';
import type { Forest } from '../forest/forest';
import { defaultParams } from '../forest/params';
import { checkForest } from '../model/file';
import { ModelError } from '../model/validate';
import { atMost32, prev32 } from '../onnx/float32';
import type { FlatTree } from '../tree/tree';

export interface XgboostLimits {
  readonly maxBytes: number;
  readonly maxTrees: number;
  /** Most nodes over all trees. */
  readonly maxNodes: number;
  /** Most stored leaf values (nodes times outputs): a multiclass ensemble keeps one per class per node. */
  readonly maxValues: number;
  readonly maxFeatures: number;
  readonly maxClasses: number;
}

export const XGBOOST_LIMITS: XgboostLimits = {
  maxBytes: 512 * 2 ** 20,
  maxTrees: 100_000,
  maxNodes: 20_000_000,
  maxValues: 100_000_000,
  maxFeatures: 100_000,
  maxClasses: 10_000,
};

/** Objectives Copse scores, and the link each one's raw score goes through. */
export const OBJECTIVES: Readonly<Record<string, Link>> = {
  'binary:logistic': 'logistic',
  'multi:softprob': 'softmax',
  'multi:softmax': 'softmax',
  'reg:squarederror': 'identity',
};

export interface XgboostImport {
  readonly forest: Forest;
  readonly names: 'file' | 'positions';
  readonly objective: string;
  /** XGBoost's version that wrote the file, "major.minor.patch". */
  readonly version: string;
  readonly notes: readonly string[];
}

type Json = Record<string, unknown>;

/** Whether parsed JSON looks like an XGBoost model (a "learner" object), so the caller can tell it from a Copse file. */
export function looksLikeXgboost(doc: unknown): boolean {
  return typeof doc === 'object' && doc !== null && !Array.isArray(doc) && typeof (doc as Json).learner === 'object';
}

/** The start of a file: JSON whose first key is "learner" or "version" (XGBoost writes them in that order) and no Copse format name. */
export function looksLikeXgboostStart(head: string): boolean {
  return /^\s*\{\s*"(learner|version)"\s*:/.test(head) && !head.includes('"copse-forest"');
}

export function readXgboost(text: string, label = 'the XGBoost model', limits: XgboostLimits = XGBOOST_LIMITS): XgboostImport {
  const fail = (why: string): never => {
    throw new ModelError(`${label} is not a usable XGBoost model: ${why}.`);
  };
  if (text.length > limits.maxBytes) fail(`it has ${text.length} characters, more than the limit of ${limits.maxBytes}`);
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch {
    return fail('it is not JSON (XGBoost\'s binary and UBJSON formats are not read; save the model as "model.json")');
  }
  if (!looksLikeXgboost(doc)) fail('it has no "learner" object');
  const obj = (v: unknown, what: string): Json => (typeof v === 'object' && v !== null && !Array.isArray(v) ? (v as Json) : fail(`${what} should be an object`));
  const root = doc as Json;
  const learner = obj(root.learner, '"learner"');
  const version = Array.isArray(root.version) ? root.version.map(Number).join('.') : 'unknown';
  const major = Array.isArray(root.version) ? Number(root.version[0]) : NaN;
  if (Number.isFinite(major) && (major < 1 || major > 2)) fail(`it was written by XGBoost ${version}; Copse reads files from versions 1 and 2`);

  const objective = obj(learner.objective, '"learner.objective"');
  const name = String(objective.name);
  const link = OBJECTIVES[name];
  if (!link) fail(`its objective is ${name}; Copse reads ${Object.keys(OBJECTIVES).join(', ')}`);
  const booster = obj(learner.gradient_booster, '"learner.gradient_booster"');
  if (booster.name !== 'gbtree') fail(`its booster is ${String(booster.name)}; Copse reads gbtree (dart and linear boosters are not read)`);
  const model = obj(booster.model, 'the gbtree "model"');
  const param = obj(learner.learner_model_param, '"learner_model_param"');

  const p = whole(param.num_feature, 'num_feature', 1, limits.maxFeatures, fail);
  const numClass = whole(param.num_class ?? '0', 'num_class', 0, limits.maxClasses, fail);
  const numTarget = whole(param.num_target ?? '1', 'num_target', 1, 1, fail);
  void numTarget;
  const classes = link === 'softmax' ? numClass : link === 'logistic' ? 2 : 1;
  if (link === 'softmax' && numClass < 2) fail(`its objective ${name} needs at least two classes, and num_class is ${numClass}`);
  const baseScore = parseBaseScore(param.base_score, fail);
  // XGBoost keeps base_score on the prediction's scale and turns it into a margin (ProbToMargin) for the logistic.
  if (link === 'logistic' && !(baseScore > 0 && baseScore < 1)) fail(`its base_score ${baseScore} is not a probability strictly between 0 and 1`);
  const baseMargin = link === 'logistic' ? -Math.log(1 / baseScore - 1) : baseScore;

  const trees = Array.isArray(model.trees) ? (model.trees as unknown[]) : fail('the gbtree model has no "trees" list');
  const T = trees.length;
  if (T === 0) fail('it has no trees');
  if (T > limits.maxTrees) fail(`it has ${T} trees, more than the limit of ${limits.maxTrees}`);
  const info = Array.isArray(model.tree_info) ? (model.tree_info as unknown[]) : fail('the gbtree model has no "tree_info" list');
  if (info.length !== T) fail(`its tree_info lists ${info.length} entries for ${T} trees`);
  const treeOutput = info.map((c, t) => {
    const k = Number(c);
    if (!(Number.isInteger(k) && k >= 0 && k < Math.max(1, numClass))) fail(`tree ${t} is for class ${String(c)}, outside 0 to ${Math.max(1, numClass) - 1}`);
    return link === 'logistic' ? 1 : k;
  });
  const K = classes;
  const base = Array.from({ length: K }, (_, k) => (link === 'logistic' ? (k === 1 ? baseMargin : 0) : baseMargin));

  let nodes = 0;
  for (let t = 0; t < T; t++) {
    const tree = obj(trees[t], `tree ${t}`);
    const left = tree.left_children;
    if (!Array.isArray(left)) fail(`tree ${t} has no "left_children" list`);
    nodes += (left as unknown[]).length;
  }
  if (nodes > limits.maxNodes) fail(`it has ${nodes} nodes, more than the limit of ${limits.maxNodes}`);
  if (nodes * K > limits.maxValues) fail(`its ${nodes} nodes for ${K} outputs need ${nodes * K} stored values, more than the limit of ${limits.maxValues}`);

  const featureNames = Array.isArray(learner.feature_names) ? (learner.feature_names as unknown[]) : [];
  if (featureNames.length !== 0 && featureNames.length !== p) fail(`it names ${featureNames.length} features but reads ${p}`);
  const types = Array.isArray(learner.feature_types) ? (learner.feature_types as unknown[]) : [];
  const categorical = types.map((v, j) => (v === 'c' ? j : -1)).filter((j) => j >= 0);
  const flat = trees.map((tr, t) => convertTree(tr as Json, t, p, K, T, treeOutput[t], base, fail));
  const features: FeatureInfo[] = Array.from({ length: p }, (_, j) => ({
    name: featureNames.length ? String(featureNames[j]) : `f${j}`,
    kind: 'numeric',
    edges: [],
    hadMissing: false,
    reference: NaN,
  }));
  const task = link === 'identity' ? 'regression' : 'classification';
  const schema: Schema = {
    features,
    target: task === 'regression' ? { name: 'target', task } : { name: 'target', task, classes: Array.from({ length: K }, (_, k) => String(k)) },
  };
  const boosting: Boosting = { link, base, treeOutput, source: 'xgboost' };
  let checked: Forest;
  try {
    checked = checkForest({ schema, params: defaultParams(task, { trees: T }), trees: flat, training: { rows: 0, fingerprint: '', dropped: [] } }, label);
  } catch (e) {
    if (e instanceof ModelError) throw new ModelError(`${e.message.replace(/\.$/, '')} (after converting it from XGBoost).`);
    throw e;
  }
  const notes: string[] = [];
  if (categorical.length) notes.push(`Features ${categorical.join(', ')} are marked categorical, but no tree splits on a category set.`);
  const parallel = Number(obj(model.gbtree_model_param ?? {}, '"gbtree_model_param"').num_parallel_tree ?? 1);
  if (parallel > 1) notes.push(`It grows ${parallel} trees per round (random-forest mode); their raw scores add up like every other tree's.`);
  return { forest: { ...checked, boosting }, names: featureNames.length ? 'file' : 'positions', objective: name, version, notes };
}

function whole(v: unknown, what: string, min: number, max: number, fail: (why: string) => never): number {
  const n = Number(v);
  if (!(Number.isInteger(n) && n >= min && n <= max)) fail(`its ${what} is ${String(v)}, not a whole number from ${min} to ${max}`);
  return n;
}

/** "5E-1" in 1.x and 2.0; "[5E-1]" (a list with one entry per target) in later 2.x files. */
function parseBaseScore(v: unknown, fail: (why: string) => never): number {
  if (v !== undefined && typeof v !== 'string' && typeof v !== 'number') fail('its base_score is neither text nor a number');
  const text = (v === undefined ? '0.5' : String(v)).trim().replace(/^\[(.*)\]$/, '$1');
  const parts = text.split(',');
  if (parts.length !== 1) fail(`its base_score has ${parts.length} entries; Copse reads models with one target`);
  const n = Number(parts[0]);
  if (parts[0].trim() === '' || !Number.isFinite(n)) fail(`its base_score "${text}" is not a number`);
  return Math.fround(n);
}

function numbers(tree: Json, key: string, n: number, t: number, fail: (why: string) => never): number[] {
  const a = tree[key];
  if (!Array.isArray(a)) return fail(`tree ${t} has no "${key}" list`);
  if (a.length !== n) fail(`tree ${t}'s "${key}" has ${a.length} entries for ${n} nodes`);
  for (let i = 0; i < n; i++) if (typeof a[i] !== 'number' || !Number.isFinite(a[i])) fail(`tree ${t}'s "${key}" entry ${i} is not a finite number`);
  return a as number[];
}

/**
 * One XGBoost tree as a Copse tree. Nodes are renumbered from the root with an explicit stack, children after
 * their parent; XGBoost's `x < split` on float32 values becomes Copse's `x <= threshold` on doubles.
 */
function convertTree(tree: Json, t: number, p: number, K: number, T: number, output: number, base: readonly number[], fail: (why: string) => never): FlatTree {
  const left = tree.left_children as unknown[];
  const n = left.length;
  if (n === 0) fail(`tree ${t} has no nodes`);
  const l = numbers(tree, 'left_children', n, t, fail);
  const r = numbers(tree, 'right_children', n, t, fail);
  const split = numbers(tree, 'split_indices', n, t, fail);
  const cond = numbers(tree, 'split_conditions', n, t, fail);
  const dflt = numbers(tree, 'default_left', n, t, fail);
  const hess = numbers(tree, 'sum_hessian', n, t, fail);
  const kind = Array.isArray(tree.split_type) ? numbers(tree, 'split_type', n, t, fail) : undefined;

  const newId = new Int32Array(n).fill(-1);
  const order = new Int32Array(n); // order[new id] = old id
  const outLeft = new Int32Array(n);
  const outRight = new Int32Array(n);
  const feature = new Int32Array(n);
  const threshold = new Float64Array(n);
  const missingLeft = new Uint8Array(n);
  const cover = new Float32Array(n);
  let count = 1;
  newId[0] = 0;
  const stack = new Int32Array(n);
  let top = 0;
  stack[0] = 0;
  let seen = 1;
  while (top >= 0) {
    const u = stack[top--];
    const id = newId[u];
    order[id] = u;
    cover[id] = hess[u];
    const a = l[u];
    const b = r[u];
    if (a === -1 && b === -1) {
      outLeft[id] = -1;
      outRight[id] = -1;
      feature[id] = -1;
      continue;
    }
    for (const c of [a, b]) {
      if (!(Number.isInteger(c) && c > 0 && c < n)) fail(`tree ${t}'s node ${u} has child ${c}, outside 1 to ${n - 1}`);
      if (newId[c] >= 0) fail(`tree ${t}'s node ${c} is reached twice (a cycle or a shared node)`);
    }
    if (kind && kind[u] !== 0) fail(`tree ${t}'s node ${u} splits on a set of categories; Copse reads numeric splits only (train with numeric codes or one-hot columns)`);
    const f = split[u];
    if (!(Number.isInteger(f) && f >= 0 && f < p)) fail(`tree ${t}'s node ${u} tests feature ${f}, outside 0 to ${p - 1}`);
    newId[a] = count++;
    newId[b] = count++;
    seen += 2;
    outLeft[id] = newId[a];
    outRight[id] = newId[b];
    feature[id] = f;
    threshold[id] = atMost32(prev32(Math.fround(cond[u])));
    missingLeft[id] = dflt[u] ? 1 : 0;
    stack[++top] = b;
    stack[++top] = a;
  }
  // Nodes no path reaches (XGBoost marks pruned ones deleted) are left out.
  const used = seen;
  const value = new Float32Array(used * K);
  for (let id = used - 1; id >= 0; id--) {
    const o = id * K;
    if (outLeft[id] < 0) {
      for (let k = 0; k < K; k++) value[o + k] = base[k];
      value[o + output] = storedLeaf(cond[order[id]], T, base[output]);
      continue;
    }
    // Interior nodes hold their children's cover-weighted mean: what the tree expects below them.
    const cl = cover[outLeft[id]];
    const cr = cover[outRight[id]];
    const wl = cl + cr > 0 ? cl / (cl + cr) : 0.5;
    for (let k = 0; k < K; k++) value[o + k] = Math.fround(wl * value[outLeft[id] * K + k] + (1 - wl) * value[outRight[id] * K + k]);
  }
  return {
    nodeCount: used,
    left: outLeft.slice(0, used),
    right: outRight.slice(0, used),
    feature: feature.slice(0, used),
    threshold: threshold.slice(0, used),
    missingLeft: missingLeft.slice(0, used),
    value,
    cover: cover.slice(0, used),
    catBits: new Uint32Array(0),
  };
}
