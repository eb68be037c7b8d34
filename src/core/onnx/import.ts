// Reading an ONNX file that holds one tree ensemble into a Copse forest. The file is untrusted: its size, its node
// and tree counts and what the conversion may create are bounded, every index is checked, and every refusal is a
// ModelError naming what is wrong. The forest then passes the same validator as a saved model file.
import type { FeatureInfo, Schema } from '../base/schema';
import type { Forest, TrainingInfo } from '../forest/forest';
import { defaultParams, type ForestParams } from '../forest/params';
import { checkForest } from '../model/file';
import { ModelError } from '../model/validate';
import { Attributes, failWith, type Fail } from './attributes';
import { boostedEnsemble, boostingOf } from './boosted-import';
import { checkAcyclic, DEFAULT_LIMITS, readLegacy, readTreeEnsemble, type Ensemble, type Limits } from './ensemble';
import { expandTree, type ExpandContext } from './expand';
import { META, META_BOOSTING, META_FORMAT, META_VERSION } from './metadata';
import { decodeModel, DTYPE, type OnnxGraph, type OnnxModel, type OnnxNode } from './proto';

export { DEFAULT_LIMITS, type Limits } from './ensemble';

export interface ImportOptions {
  readonly limits?: Partial<Limits>;
}

export interface OnnxImport {
  readonly forest: Forest;
  /** Feature names, levels and classes came from Copse metadata in the file, or are positions: f0, f1, ... */
  readonly names: 'metadata' | 'positions';
  readonly operator: Ensemble['operator'];
  /** Version of the ai.onnx.ml operator set the file declares. */
  readonly mlOpset: number;
  readonly producer: string;
  /**
   * Whether the training facts are the forest's own (from Copse metadata). When false, training.rows is 0 and the
   * fingerprint empty: out-of-bag scores and bootstrap membership cannot be had, and nothing stands in for them.
   * The settings in params are then placeholders, apart from the task and the tree count.
   */
  readonly trainingKnown: boolean;
  /** What the reader should know: ignored graph nodes or attributes, how values were combined. */
  readonly notes: readonly string[];
}

const ENSEMBLES = new Set(['TreeEnsembleClassifier', 'TreeEnsembleRegressor', 'TreeEnsemble']);

/** The forest an ONNX file holds; see readOnnx for what else the import reports. */
export function importOnnx(bytes: Uint8Array, label = 'the ONNX file', options: ImportOptions = {}): Forest {
  return readOnnx(bytes, label, options).forest;
}

export function readOnnx(bytes: Uint8Array, label = 'the ONNX file', options: ImportOptions = {}): OnnxImport {
  const limits: Limits = { ...DEFAULT_LIMITS, ...options.limits };
  const fail: Fail = failWith(label);
  if (bytes.length > limits.maxBytes) fail(`it has ${bytes.length} bytes, more than the limit of ${limits.maxBytes}`);
  let model: OnnxModel;
  try {
    model = decodeModel(bytes);
  } catch (e) {
    throw new ModelError(`${label} is not a valid ONNX file: it does not decode as an ONNX model (truncated or damaged?): ${(e as Error).message}.`);
  }
  const graph = model.graph;
  if (!graph) fail('it has no graph');
  const mlOpset = (model.opset_import ?? []).find((o) => o.domain === 'ai.onnx.ml')?.version;
  const found = (graph.node ?? []).filter((n) => n.domain === 'ai.onnx.ml' && ENSEMBLES.has(n.op_type ?? ''));
  if (found.length === 0) fail('its graph holds no TreeEnsemble, TreeEnsembleClassifier or TreeEnsembleRegressor node');
  if (found.length > 1) fail(`its graph holds ${found.length} tree ensemble nodes; Copse imports a file with one`);
  if (mlOpset === undefined) fail('it does not declare the ai.onnx.ml operator set its ensemble belongs to');
  if (!Number.isSafeInteger(mlOpset) || mlOpset < 1) fail(`it declares ai.onnx.ml operator set ${mlOpset}, which does not exist`);
  const node = found[0];
  const op = node.op_type as Ensemble['operator'];
  if (op === 'TreeEnsemble' && mlOpset < 5) fail(`it uses TreeEnsemble, which ai.onnx.ml operator set ${mlOpset} does not have (it arrived in set 5)`);

  const input = checkInput(graph, node, fail);
  const where = `its ${op} node`;
  const attrs = new Attributes(node, fail, where);
  const read = op === 'TreeEnsemble' ? readTreeEnsemble(attrs, fail, where, limits) : readLegacy(attrs, op === 'TreeEnsembleClassifier', fail, where, limits);
  checkAcyclic(read, fail);
  const notes: string[] = [...read.notes];
  if (read.ignored.length) notes.push(`Attributes Copse does not read were ignored: ${read.ignored.join(', ')}.`);
  const meta = readMetadata(model, fail);
  const others = (graph.node ?? []).filter((n) => n !== node).map((n) => n.op_type ?? '?');
  // A Copse export's own ArgMax and Gather only turn probabilities into a label.
  if (others.length && !meta) notes.push(`The graph's other nodes (${[...new Set(others)].join(', ')}) were not imported; Copse reports the ensemble's own scores.`);
  if (op !== 'TreeEnsemble' && mlOpset >= 5) notes.push(`${op} is deprecated in ai.onnx.ml operator set ${mlOpset}; it was read as operator set 3 defines it.`);
  if (!input.float32) notes.push(`The graph input is ${input.typeName}, so values are compared as they are, not rounded to float32.`);

  const p = input.features ?? read.featuresUsed;
  if (p < 1) fail('its input has no features');
  if (p > limits.maxFeatures) fail(`its input has ${p} features, more than the limit of ${limits.maxFeatures}`);
  if (read.featuresUsed > p) fail(`it tests feature ${read.featuresUsed - 1}, but its input has ${p} features`);
  const classification = op === 'TreeEnsembleClassifier' || (op === 'TreeEnsemble' && read.outputs > 1);
  // A Copse export of a boosted regression says so in its metadata; SUM with NONE alone is also how forests are written.
  const { ensemble, link } = boostedEnsemble(read, classification, meta?.boosting?.link === 'identity', fail);
  if (link) notes.push(`A boosted ensemble: its trees' scores are summed${link === 'identity' ? '' : ` and turned into probabilities by ${read.transform}`}.`);
  if (op === 'TreeEnsembleRegressor' && ensemble.outputs > 1) fail(`it predicts ${ensemble.outputs} targets at once; a Copse forest predicts one`);
  if (classification && ensemble.outputs < 2) fail('its classifier has a single class, so there is nothing to predict');
  if (op === 'TreeEnsemble' && classification) {
    notes.push(`Its ${ensemble.outputs} targets were read as the scores of ${ensemble.outputs} classes, named by their position.`);
  }

  const T = ensemble.roots.length;
  const task = classification ? 'classification' : 'regression';
  const names = meta ? 'metadata' : 'positions';
  const schema = meta ? checkSchema(meta.schema, p, task, ensemble, fail) : positionalSchema(p, task, ensemble, node);
  const levels = Int32Array.from(schema.features, (f) => (f.kind === 'numeric' ? 0 : (f.levels?.length ?? 0)));
  // A faithful conversion stays within a small multiple of the file's own nodes; a graph built to explode when its
  // shared nodes are copied is stopped at that multiple, long before the absolute limit costs memory.
  const budget = Math.min(limits.maxForestNodes, 16 * (ensemble.nodes + ensemble.members.length) + 1024);
  // The runtime sums (or averages) over trees; Copse averages, so a summed ensemble's leaves are scaled by T.
  const ctx: ExpandContext = {
    ensemble,
    levels,
    float32: input.float32,
    scale: ensemble.aggregate === 'sum' ? T : 1,
    withCover: meta !== undefined,
    fail,
    budget,
    maxNodes: budget,
    steps: 4 * budget,
  };
  if (ensemble.base.some((b) => b !== 0)) notes.push('Its base values were added to every leaf.');
  const trees = Array.from(ensemble.roots, (root) => expandTree(ctx, root));
  const params: ForestParams = meta?.params ?? defaultParams(task, { trees: T });
  const training: TrainingInfo = meta?.training ?? { rows: 0, fingerprint: '', dropped: [] };
  const checked = validate({ schema, params, trees, training }, label, meta !== undefined);
  const forest = link ? { ...checked, boosting: boostingOf(link, ensemble.base, checked.trees, ensemble.outputs) } : checked;
  return { forest, names, operator: op, mlOpset, producer: model.producer_name ?? '', trainingKnown: meta !== undefined, notes };
}

interface InputInfo {
  readonly float32: boolean;
  readonly typeName: string;
  readonly features?: number;
}

const INPUT_TYPES: Record<number, string> = { [DTYPE.FLOAT]: 'float', [DTYPE.DOUBLE]: 'double', [DTYPE.INT64]: 'int64', [DTYPE.INT32]: 'int32' };

/** The ensemble must read a graph input directly: a node computing its input (scaling, imputing) is not imported. */
function checkInput(graph: OnnxGraph, node: OnnxNode, fail: Fail): InputInfo {
  const name = node.input?.[0];
  if (!name) fail('its ensemble node has no input');
  const producer = (graph.node ?? []).find((n) => (n.output ?? []).includes(name));
  if (producer) fail(`its ensemble reads "${name}", which a ${producer.op_type} node computes; Copse imports an ensemble that reads the graph's input directly`);
  if ((graph.initializer ?? []).some((t) => t.name === name)) fail(`its ensemble reads "${name}", a constant of the graph, not an input`);
  const info = (graph.input ?? []).find((v) => v.name === name);
  if (!info) fail(`its ensemble reads "${name}", which is not an input of the graph`);
  const tensor = info.type?.tensor_type;
  const type = tensor?.elem_type ?? 0;
  const typeName = INPUT_TYPES[type];
  if (!typeName) fail(`its input "${name}" is not a float, double or integer tensor`);
  const dims = tensor?.shape?.dim ?? [];
  const last = dims.length === 2 ? dims[1].dim_value : undefined;
  return { float32: type === DTYPE.FLOAT, typeName, features: last && last > 0 ? last : undefined };
}

interface Metadata {
  readonly schema: Schema;
  readonly params: ForestParams;
  readonly training: TrainingInfo;
  readonly boosting?: { readonly link?: unknown };
}

/** Copse's own metadata, when the file has it; its fields are checked with the forest by the model validator. */
function readMetadata(model: OnnxModel, fail: Fail): Metadata | undefined {
  const props = new Map<string, string>();
  for (const e of model.metadata_props ?? []) props.set(e.key ?? '', e.value ?? '');
  if (props.get(META.format) !== META_FORMAT) return undefined;
  const version = Number(props.get(META.version));
  if (!Number.isInteger(version) || version < 1) fail(`its metadata ${META.version} should be a whole number`);
  if (version > META_VERSION) fail(`its Copse metadata is version ${version}; this Copse reads version ${META_VERSION}`);
  const json = (key: string): Record<string, unknown> => {
    const text = props.get(key);
    if (text === undefined) fail(`its Copse metadata has no ${key}`);
    let v: unknown;
    try {
      v = JSON.parse(text);
    } catch {
      return fail(`its metadata ${key} is not JSON`);
    }
    if (typeof v !== 'object' || v === null || Array.isArray(v)) fail(`its metadata ${key} should be a JSON object`);
    return v as Record<string, unknown>;
  };
  const boosting = props.has(META_BOOSTING) ? json(META_BOOSTING) : undefined;
  return { schema: json(META.schema) as unknown as Schema, params: json(META.params) as unknown as ForestParams, training: json(META.training) as unknown as TrainingInfo, boosting };
}

/** The parts of the metadata the conversion relies on before the validator sees it: counts and classes. */
function checkSchema(schema: Schema, p: number, task: string, e: Ensemble, fail: Fail): Schema {
  const features = schema.features;
  if (!Array.isArray(features) || features.length !== p) fail(`its metadata describes ${Array.isArray(features) ? features.length : 'no'} features, but the graph's input has ${p}`);
  features.forEach((f: FeatureInfo, j) => {
    if (typeof f !== 'object' || f === null) fail(`its metadata feature ${j} is not an object`);
    if (f.kind !== 'numeric' && !(Array.isArray(f.levels) && f.levels.length >= 1 && f.levels.length <= 256)) fail(`its metadata feature ${j} should list 1 to 256 levels`);
  });
  const target = schema.target;
  if (typeof target !== 'object' || target === null || target.task !== task) fail(`its metadata says the task is ${target?.task}, but the graph holds ${task}`);
  if (task === 'classification') {
    const classes = target.classes;
    if (!Array.isArray(classes) || classes.length !== e.outputs) fail(`its metadata lists ${Array.isArray(classes) ? classes.length : 'no'} classes, but the graph has ${e.outputs}`);
    if (e.classLabels && e.classLabels.some((c, k) => c !== classes[k])) fail('its metadata lists the classes in another order than the graph');
  }
  return schema;
}

function positionalSchema(p: number, task: 'classification' | 'regression', e: Ensemble, node: OnnxNode): Schema {
  // Nothing about the training data is known: no bins, no missing-value record, no typical value.
  const features: FeatureInfo[] = Array.from({ length: p }, (_, j) => ({ name: `f${j}`, kind: 'numeric', edges: [], hadMissing: false, reference: NaN }));
  const name = node.output?.[0] || 'target';
  if (task === 'regression') return { features, target: { name, task } };
  const classes = e.classLabels ? [...e.classLabels] : Array.from({ length: e.outputs }, (_, k) => String(k));
  return { features, target: { name, task, classes } };
}

/** Runs the forest through the model file's validator, so an import is held to the same rules as a saved model. */
function validate(forest: Forest, label: string, known: boolean): Forest {
  try {
    return checkForest(forest, label);
  } catch (e) {
    if (e instanceof ModelError) throw new ModelError(`${e.message.replace(/\.$/, '')} (after converting it from ONNX${known ? ', with its Copse metadata' : ''}).`);
    throw e;
  }
}
