// A fitted forest as an ONNX graph: one ai.onnx.ml TreeEnsembleClassifier or TreeEnsembleRegressor (operator
// set 3, which ONNX 1.12 and every current runtime read) over a float tensor of encoded rows.
import { outputCount } from '../base/schema';
import type { Forest } from '../forest/forest';
import { levelCounts } from '../forest/predict';
import { ModelError } from '../model/validate';
import type { FlatTree } from '../tree/tree';
import { roundDown32 } from './float32';
import { boostedLeaves, type BoostedLeaves } from './boosted-export';
import { exportMetadata, INPUT_NAME } from './metadata';
import { ATTR, DTYPE, encodeModel, type OnnxAttribute, type OnnxModel, type OnnxNode, type OnnxValueInfo } from './proto';

/** ONNX IR version 8 and default-domain operator set 13: what ONNX 1.12's checker and onnxruntime both accept. */
const IR_VERSION = 8;
const OPSET = 13;
const ML_OPSET = 3;
/** Protocol buffers cannot hold a message of 2 GiB or more. */
const MAX_BYTES = 2 ** 31 - 1;
const F32_MAX = 3.4028234663852886e38;

const utf8 = new TextEncoder();

/** A list of numbers in a typed array that doubles when full: bytes per entry, not boxed numbers. */
class Column<T extends Int32Array | Float32Array | Uint8Array> {
  length = 0;
  constructor(private data: T) {}

  push(v: number): void {
    if (this.length === this.data.length) {
      const bigger = new (this.data.constructor as new (n: number) => T)(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = v;
  }

  /** protobufjs writes any indexable list of numbers. */
  values(): T {
    return this.data.subarray(0, this.length) as T;
  }
}

const MODES = [utf8.encode('BRANCH_LEQ'), utf8.encode('BRANCH_EQ'), utf8.encode('LEAF')];
const LEQ = 0;
const EQ = 1;
const LEAF = 2;

/** Node lists of the whole ensemble, in the operator's attribute layout. */
class EnsembleLists {
  readonly treeIds = new Column(new Int32Array(1024));
  readonly nodeIds = new Column(new Int32Array(1024));
  readonly featureIds = new Column(new Int32Array(1024));
  readonly values = new Column(new Float32Array(1024));
  readonly modes = new Column(new Uint8Array(1024));
  readonly trueIds = new Column(new Int32Array(1024));
  readonly falseIds = new Column(new Int32Array(1024));
  readonly missingTrue = new Column(new Uint8Array(1024));
  readonly hitRates = new Column(new Float32Array(1024));
  readonly weightTree = new Column(new Int32Array(1024));
  readonly weightNode = new Column(new Int32Array(1024));
  readonly weightTarget = new Column(new Int32Array(1024));
  readonly weightValue = new Column(new Float32Array(1024));

  node(tree: number, id: number, mode: number, feature: number, value: number, t: number, f: number, missingTrue: number, cover: number): void {
    this.treeIds.push(tree);
    this.nodeIds.push(id);
    this.modes.push(mode);
    this.featureIds.push(feature);
    this.values.push(value);
    this.trueIds.push(t);
    this.falseIds.push(f);
    this.missingTrue.push(missingTrue);
    this.hitRates.push(cover);
  }

  weight(tree: number, id: number, target: number, w: number): void {
    this.weightTree.push(tree);
    this.weightNode.push(id);
    this.weightTarget.push(target);
    this.weightValue.push(w);
  }
}

/** Serialises the forest as an ONNX model; see src/core/onnx/README.md for the encoding. */
export function exportOnnx(forest: Forest): Uint8Array {
  const { schema, trees } = forest;
  const classification = schema.target.task === 'classification';
  const K = outputCount(schema.target);
  const T = trees.length;
  if (T === 0) throw new ModelError('The forest has no trees to export.');
  const counts = levelCounts(schema);
  // Refuse before building anything: a large forest's lists alone would take gigabytes on the way to the refusal.
  const atLeast = minimumOnnxBytes(forest);
  if (atLeast > MAX_BYTES) throw tooLarge(atLeast);
  const lists = new EnsembleLists();
  const seen = new Uint8Array(K);
  const boosted = forest.boosting ? boostedLeaves(forest) : undefined;
  trees.forEach((tree, t) => addTree(lists, tree, t, counts, classification, K, T, seen, boosted));
  // A class no leaf votes for still needs one entry, or a runtime may infer fewer classes than the labels list.
  // A boosted two-class ensemble lists class id 0 only: onnxruntime's one-score form, which its LOGISTIC reads.
  for (let k = 0; k < (boosted?.single ? 1 : K); k++) if (!seen[k]) lists.weight(0, leafId(trees[0]), k, 0);

  const estimate = lists.treeIds.length * 36 + lists.weightTree.length * 13;
  if (estimate > MAX_BYTES) throw tooLarge(estimate);

  const prefix = classification ? 'class' : 'target';
  const attributes: OnnxAttribute[] = [
    ints('nodes_treeids', lists.treeIds.values()),
    ints('nodes_nodeids', lists.nodeIds.values()),
    ints('nodes_featureids', lists.featureIds.values()),
    floats('nodes_values', lists.values.values()),
    { name: 'nodes_modes', type: ATTR.STRINGS, strings: Array.from(lists.modes.values(), (m) => MODES[m]) },
    ints('nodes_truenodeids', lists.trueIds.values()),
    ints('nodes_falsenodeids', lists.falseIds.values()),
    ints('nodes_missing_value_tracks_true', lists.missingTrue.values()),
    floats('nodes_hitrates', lists.hitRates.values()),
    ints(`${prefix}_treeids`, lists.weightTree.values()),
    ints(`${prefix}_nodeids`, lists.weightNode.values()),
    ints(`${prefix}_ids`, lists.weightTarget.values()),
    floats(`${prefix}_weights`, lists.weightValue.values()),
    text('post_transform', boosted?.transform ?? 'NONE'),
    ...(boosted ? [floats('base_values', boosted.baseValues)] : []),
  ];
  const rows = { dim_param: 'rows' };
  const input: OnnxValueInfo = tensorInfo(INPUT_NAME, DTYPE.FLOAT, [rows, { dim_value: schema.features.length }]);
  let nodes: OnnxNode[];
  let outputs: OnnxValueInfo[];
  const initializer = [];
  if (classification) {
    const classes = schema.target.classes!;
    attributes.push({ name: 'classlabels_strings', type: ATTR.STRINGS, strings: classes.map((c) => utf8.encode(c)) });
    // The operator's own label output is left unused: for two classes runtimes disagree on how to derive it, while
    // ArgMax over the probabilities is the forest's vote everywhere.
    nodes = [
      { op_type: 'TreeEnsembleClassifier', domain: 'ai.onnx.ml', name: 'forest', input: [INPUT_NAME], output: ['ensemble_label', 'probabilities'], attribute: attributes },
      { op_type: 'ArgMax', domain: '', name: 'vote', input: ['probabilities'], output: ['class_index'], attribute: [int('axis', 1), int('keepdims', 0)] },
      { op_type: 'Gather', domain: '', name: 'class_name', input: ['class_names', 'class_index'], output: ['label'], attribute: [int('axis', 0)] },
    ];
    initializer.push({ name: 'class_names', data_type: DTYPE.STRING, dims: [K], string_data: classes.map((c) => utf8.encode(c)) });
    outputs = [tensorInfo('label', DTYPE.STRING, [rows]), tensorInfo('probabilities', DTYPE.FLOAT, [rows, { dim_value: K }])];
  } else {
    attributes.push(int('n_targets', 1), text('aggregate_function', boosted ? 'SUM' : 'AVERAGE'));
    nodes = [{ op_type: 'TreeEnsembleRegressor', domain: 'ai.onnx.ml', name: 'forest', input: [INPUT_NAME], output: ['value'], attribute: attributes }];
    outputs = [tensorInfo('value', DTYPE.FLOAT, [rows, { dim_value: 1 }])];
  }
  const model: OnnxModel = {
    ir_version: IR_VERSION,
    opset_import: [
      { domain: '', version: OPSET },
      { domain: 'ai.onnx.ml', version: ML_OPSET },
    ],
    producer_name: 'copse',
    doc_string: `${forest.boosting ? 'Boosted ensemble' : 'Random forest'} of ${T} trees (${schema.target.task} of "${schema.target.name}"), exported by Copse.`,
    graph: { name: 'copse_forest', node: nodes, input: [input], output: outputs, initializer },
    metadata_props: exportMetadata(forest),
  };
  const bytes = encodeModel(model);
  if (bytes.length > MAX_BYTES) throw tooLarge(bytes.length);
  return bytes;
}

/** Bytes of the varints 0..n-1: protocol buffers write small integers in fewer bytes. */
function varintBytesBelow(n: number): number {
  let total = 0;
  let from = 0;
  for (let bytes = 1, limit = 128; from < n; bytes++, limit *= 128) {
    total += (Math.min(n, limit) - from) * bytes;
    from = limit;
  }
  return total;
}

const varintBytes = (v: number) => varintBytesBelow(v + 1) - varintBytesBelow(v);

/**
 * What tree t with n nodes costs at least, were all its splits numeric and each leaf one weight: per node its tree
 * id, node id, feature (one byte at least), float value and hit rate, missing flag and mode text; per child its
 * id; per leaf two zero child ids and one weight entry.
 */
function minimumBytes(n: number, t: number): number {
  const leaves = (n + 1) / 2;
  const splits = n - leaves;
  const tree = varintBytes(t);
  return n * (tree + 1 + 4 + 4 + 1) + varintBytesBelow(n) * 2 - 1 + splits * (2 + 10) + leaves * (2 + 4 + 2) + leaves * (tree + 1 + 4);
}

/** A lower bound on the size of the forest's ONNX file, from its node counts alone. */
export function minimumOnnxBytes(forest: Forest): number {
  return forest.trees.reduce((sum, tree, t) => sum + minimumBytes(tree.nodeCount, t), 0);
}

function tooLarge(bytes: number): ModelError {
  return new ModelError(
    `The forest is too large for one ONNX file (about ${Math.round(bytes / 2 ** 20)} MiB; the format's limit is 2 GiB). ` +
      'Fewer trees, or a larger minimum leaf size, make smaller trees.',
  );
}

function addTree(lists: EnsembleLists, tree: FlatTree, t: number, counts: Int32Array, classification: boolean, K: number, T: number, seen: Uint8Array, boosted?: BoostedLeaves): void {
  const { left, right, feature, threshold, missingLeft, value, cover, catBits } = tree;
  // Chain nodes of level-set splits get ids after the tree's own nodes, so node i keeps id i and the root stays 0.
  let nextId = tree.nodeCount;
  for (let i = 0; i < tree.nodeCount; i++) {
    const c = cover[i];
    if (left[i] < 0) {
      lists.node(t, i, LEAF, 0, 0, 0, 0, 0, c);
      if (boosted) {
        boosted.add(lists, t, i, value);
        seen.fill(1);
      } else if (classification) {
        // The operator sums leaf weights over trees; dividing by T makes the sum the forest's average. Zero weights
        // are left out, except with two classes: onnxruntime treats a row that no weight of the second class
        // reached as a one-score binary case and reports [-p, p] instead of [p, 0].
        for (let k = 0; k < K; k++) {
          const w = value[i * K + k];
          if (w !== 0 || K === 2) {
            lists.weight(t, i, k, w / T);
            seen[k] = 1;
          }
        }
      } else {
        lists.weight(t, i, 0, value[i]);
        seen[0] = 1;
      }
      continue;
    }
    const f = feature[i];
    const levels = counts[f];
    if (levels === 0) {
      lists.node(t, i, LEQ, f, roundDown32(threshold[i]), left[i], right[i], missingLeft[i], c);
      continue;
    }
    // Chain the levels of the side missing values do not take; the chain's end is the missing side, so NaN and
    // any code outside the level list land where Copse sends them.
    const missingSide = missingLeft[i] === 1 ? left[i] : right[i];
    const otherSide = missingLeft[i] === 1 ? right[i] : left[i];
    const at = threshold[i];
    const chain: number[] = [];
    for (let l = 0; l < levels; l++) {
      const inSet = (catBits[at + (l >>> 5)] & (1 << (l & 31))) !== 0;
      if (inSet !== (missingLeft[i] === 1)) chain.push(l);
    }
    // No level on the other side: one test no code passes (-1) sends everything to the missing side.
    if (chain.length === 0) chain.push(-1);
    // onnxruntime 1.30 merges an EQ node with an EQ node on the same feature in its false branch into one set
    // test even when their true branches differ (ensembles of more than one output). When the missing side
    // splits on this feature again, a pass-through node (every value, NaN included, to the same child) keeps
    // the two chains apart.
    const passThrough = left[missingSide] >= 0 && feature[missingSide] === f;
    const exit = passThrough ? nextId++ : missingSide;
    let id = i;
    for (let j = 0; j < chain.length; j++) {
      const last = j === chain.length - 1;
      const next = last ? exit : nextId++;
      lists.node(t, id, EQ, f, chain[j], otherSide, next, 0, c);
      id = next;
    }
    // Listed after the chain: onnxruntime takes the first node it meets of each tree as the root.
    if (passThrough) lists.node(t, exit, LEQ, f, F32_MAX, missingSide, missingSide, 1, cover[missingSide]);
  }
}

function leafId(tree: FlatTree): number {
  for (let i = 0; i < tree.nodeCount; i++) if (tree.left[i] < 0) return i;
  return 0;
}

function ints(name: string, values: ArrayLike<number>): OnnxAttribute {
  return { name, type: ATTR.INTS, ints: values as number[] };
}

function floats(name: string, values: ArrayLike<number>): OnnxAttribute {
  return { name, type: ATTR.FLOATS, floats: values as number[] };
}

function int(name: string, value: number): OnnxAttribute {
  return { name, type: ATTR.INT, i: value };
}

function text(name: string, value: string): OnnxAttribute {
  return { name, type: ATTR.STRING, s: utf8.encode(value) };
}

function tensorInfo(name: string, elemType: number, dims: Array<{ dim_value?: number; dim_param?: string }>): OnnxValueInfo {
  return { name, type: { tensor_type: { elem_type: elemType, shape: { dim: dims } } } };
}
