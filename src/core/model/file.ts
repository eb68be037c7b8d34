// The saved model: JSON lines, validated field by field on the way in and written atomically on the way out.
// Line 1 holds the format, schema, settings and training facts and says how many trees follow; each further line
// is one tree. A full-depth forest on millions of rows runs to gigabytes, more than one JavaScript string can
// hold, so a model is written and read a tree at a time. Version 1 files (one JSON document) are still read.
import { OutputFile } from '../atomic';
import { reasonOf, systemCode } from '../file-errors';
import type { ColumnKind, DroppedColumn } from '../data/table';
import type { Forest, ForestHead, TrainingInfo } from '../forest/forest';
import { validateParams, type ForestParams } from '../forest/params';
import { sharedArray, type SharedMake } from '../forest/shared';
import type { FlatTree } from '../tree/tree';
import { outputCount, type FeatureInfo, type Schema, type TargetInfo } from './schema';
import { finiteAsFloat32, grouped, MAX_CLASSES_STORED, MAX_FEATURES, MAX_MODEL_BYTES, MAX_MODEL_LINE_BYTES, MAX_TREES, MIN_SEED } from '../limits';
import { modelFileLines } from './lines';
import { ModelError, Reader, type Json } from './validate';

export { ModelError } from './validate';

export const MODEL_FORMAT = 'copse-forest';
export const MODEL_VERSION = 2;

function headLine(head: ForestHead, trees: number): string {
  return JSON.stringify({ format: MODEL_FORMAT, version: MODEL_VERSION, schema: head.schema, params: head.params, training: head.training, trees });
}

function treeLine(t: FlatTree): string {
  try {
    return treeJson(t);
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    throw new ModelError(`A tree of ${grouped(t.nodeCount)} nodes is more text than one line of a model file may hold; grow smaller trees with --max-depth or --min-leaf.`);
  }
}

function treeJson(t: FlatTree): string {
  return JSON.stringify({
    nodes: t.nodeCount,
    left: Array.from(t.left),
    right: Array.from(t.right),
    feature: Array.from(t.feature),
    threshold: Array.from(t.threshold),
    missingLeft: Array.from(t.missingLeft),
    value: Array.from(t.value),
    cover: Array.from(t.cover),
    levelSets: Array.from(t.catBits),
  });
}

export function serializeModel(forest: Forest): string {
  if (forest.boosting) throw new ModelError('A boosted ensemble is not saved as a Copse model file; keep its own file, or export it to ONNX.');
  return [headLine(forest, forest.trees.length), ...forest.trees.map(treeLine)].join('\n') + '\n';
}

/**
 * Writes a model a tree at a time into a temporary file beside the target, renamed into place by finish():
 * readers never see half a model, and the trees need not all be in memory at once.
 */
export class ModelWriter {
  private readonly out: OutputFile;
  private written = 0;
  private bytes = 0;

  constructor(path: string, head: ForestHead, private readonly trees: number) {
    this.out = new OutputFile(path);
    try {
      this.line(headLine(head, trees));
    } catch (e) {
      this.abandon();
      throw e;
    }
  }

  add(tree: FlatTree): void {
    if (this.written === this.trees) throw new RangeError(`The model was opened for ${this.trees} trees.`);
    try {
      this.line(treeLine(tree));
    } catch (e) {
      this.abandon();
      throw e;
    }
    this.written++;
  }

  async finish(): Promise<void> {
    if (this.written !== this.trees) {
      this.abandon();
      throw new RangeError(`The model was opened for ${this.trees} trees; ${this.written} were written.`);
    }
    await this.out.commit();
  }

  /** Removes the temporary file; the target is untouched. */
  abandon(): void {
    this.out.abandon();
  }

  /** The reader's bounds, kept here too: a line or a file the reader would refuse is never written. */
  private line(text: string): void {
    const size = Buffer.byteLength(text) + 1;
    if (size > MAX_MODEL_LINE_BYTES) {
      throw new ModelError(`A tree of this forest takes ${grouped(size)} bytes, more than one line of a model file may hold; grow smaller trees with --max-depth or --min-leaf.`);
    }
    this.bytes += size;
    if (this.bytes > MAX_MODEL_BYTES) {
      throw new ModelError(`The model would take more than ${grouped(MAX_MODEL_BYTES)} bytes, the most a model file may hold; grow fewer or smaller trees (--trees, --max-depth, --min-leaf).`);
    }
    this.out.writeSync(text + '\n');
  }
}

export async function saveModel(path: string, forest: Forest): Promise<void> {
  // The Copse file averages trees; a boosted ensemble's link and base would be lost, and its scores with them.
  if (forest.boosting) throw new ModelError(`A boosted ensemble is not saved as a Copse model file; keep its own file, or export it to ONNX (${path}).`);
  const writer = new ModelWriter(path, forest, forest.trees.length);
  for (const tree of forest.trees) writer.add(tree);
  await writer.finish();
}

export async function loadModel(path: string): Promise<Forest> {
  const parser = new ModelParser(path);
  try {
    for await (const line of modelFileLines(path)) parser.line(line);
  } catch (e) {
    if (e instanceof ModelError) throw e;
    throw new ModelError(`Cannot read the model ${path}: ${systemCode(e) ? `${reasonOf(e)}.` : (e as Error).message}`);
  }
  return parser.end();
}

/**
 * The forest as loading its saved file would give it back, every field checked the same way; a tree at a time,
 * so a large forest (an import) is never one string.
 */
export function checkForest(forest: Forest, label = 'the model'): Forest {
  const parser = new ModelParser(label);
  parser.line(headLine(forest, forest.trees.length));
  for (const tree of forest.trees) parser.line(treeLine(tree));
  return parser.end();
}

export function parseModel(text: string, label = 'the model'): Forest {
  const parser = new ModelParser(label);
  for (const line of text.split('\n')) parser.line(line);
  return parser.end();
}

/** Takes the file's lines in order; end() returns the forest once every tree the head announced has come. */
class ModelParser {
  private readonly r: Reader;
  private head: ForestHead | undefined;
  private expected = 0;
  private readonly trees: FlatTree[] = [];
  private whole: Forest | undefined;
  private lineNo = 0;

  constructor(private readonly label: string) {
    this.r = new Reader(label);
  }

  line(text: string): void {
    this.lineNo++;
    if (text.trim() === '') return;
    if (this.whole || (this.head && this.trees.length === this.expected)) {
      throw new ModelError(`${this.label} is not a valid Copse model: line ${this.lineNo} comes after the last tree.`);
    }
    let json: Json;
    try {
      json = JSON.parse(text);
    } catch {
      const what = this.head ? `line ${this.lineNo} is not complete JSON` : 'it is not complete JSON';
      throw new ModelError(`${this.label} is not a valid Copse model: ${what} (truncated or damaged?).`);
    }
    if (!this.head) return this.begin(json);
    this.trees.push(readTree(this.r, json, `trees[${this.trees.length}]`, this.head.schema));
  }

  end(): Forest {
    if (this.whole) return this.whole;
    if (!this.head) throw new ModelError(`${this.label} is not a valid Copse model: it is empty.`);
    if (this.trees.length !== this.expected) {
      throw new ModelError(`${this.label} is not a valid Copse model: it announces ${this.expected} trees but holds ${this.trees.length} (truncated?).`);
    }
    return { ...this.head, trees: this.trees };
  }

  private begin(json: Json): void {
    const { r, label } = this;
    const doc = r.object(json, 'the file');
    if (doc.format !== MODEL_FORMAT) r.fail('format', `should be "${MODEL_FORMAT}"`);
    const version = r.integer(r.field(doc, 'version', ''), 'version', 1);
    if (version > MODEL_VERSION) throw new ModelError(`${label} was written by a newer Copse (model version ${version}); this one reads up to version ${MODEL_VERSION}.`);
    const head = readHead(r, doc);
    if (version === 1) {
      // One document: the trees are a list inside it.
      const trees = r.array(r.field(doc, 'trees', ''), 'trees', head.params.trees).map((t, i) => readTree(r, t, `trees[${i}]`, head.schema));
      this.whole = { ...head, trees };
      return;
    }
    const trees = r.field(doc, 'trees', '');
    if (trees !== head.params.trees) r.fail('trees', `should be ${head.params.trees}, the tree count in params`);
    this.expected = head.params.trees;
    this.head = head;
  }
}

function readHead(r: Reader, doc: Record<string, Json>): ForestHead {
  const schema = readSchema(r, r.object(r.field(doc, 'schema', ''), 'schema'));
  const params = readParams(r, r.object(r.field(doc, 'params', ''), 'params'));
  if (params.task !== schema.target.task) r.fail('params.task', 'does not match schema.target.task');
  const training = r.object(r.field(doc, 'training', ''), 'training');
  const dropped: DroppedColumn[] = r.array(r.field(training, 'dropped', 'training'), 'training.dropped').map((d, i) => {
    const o = r.object(d, `training.dropped[${i}]`);
    return { name: r.string(r.field(o, 'name', ''), `training.dropped[${i}].name`), reason: r.string(r.field(o, 'reason', ''), `training.dropped[${i}].reason`) };
  });
  const info: TrainingInfo = {
    // 0: not known (a forest imported from another library); out-of-bag results cannot be had for it.
    rows: r.integer(r.field(training, 'rows', 'training'), 'training.rows', 0),
    fingerprint: r.string(r.field(training, 'fingerprint', 'training'), 'training.fingerprint'),
    dropped,
  };
  // Written since the fit began recording it; older files leave it to be inferred (see membership.ts).
  if (Object.prototype.hasOwnProperty.call(training, 'heldOut')) {
    return { schema, params, training: { ...info, heldOut: r.integer(r.field(training, 'heldOut', 'training'), 'training.heldOut', 0) } };
  }
  return { schema, params, training: info };
}

const KINDS: readonly ColumnKind[] = ['numeric', 'categorical', 'boolean'];

function readSchema(r: Reader, o: Record<string, Json>): Schema {
  const seen = new Set<string>();
  const features = r.array(r.field(o, 'features', 'schema'), 'schema.features').map((f, i): FeatureInfo => {
    const path = `schema.features[${i}]`;
    const fo = r.object(f, path);
    const name = r.string(r.field(fo, 'name', path), `${path}.name`);
    if (seen.has(name)) r.fail(`${path}.name`, `repeats the feature "${name}"`);
    seen.add(name);
    const kind = r.oneOf(r.field(fo, 'kind', path), `${path}.kind`, KINDS);
    const hadMissing = r.boolean(r.field(fo, 'hadMissing', path), `${path}.hadMissing`);
    const refValue = r.field(fo, 'reference', path);
    if (kind === 'numeric') {
      const edges = Array.from(r.numbers(r.field(fo, 'edges', path), `${path}.edges`, Float64Array, undefined, Number.isFinite, 'should be a finite number'));
      for (let j = 1; j < edges.length; j++) if (!(edges[j] > edges[j - 1])) r.fail(`${path}.edges`, 'should be increasing');
      if (edges.length > 255) r.fail(`${path}.edges`, 'has more than 255 entries');
      // A column that was all missing in training has no median; it is stored as null.
      const reference = refValue === null ? NaN : r.number(refValue, `${path}.reference`);
      return { name, kind, edges, hadMissing, reference };
    }
    const levels = r.array(r.field(fo, 'levels', path), `${path}.levels`).map((l, j) => r.string(l, `${path}.levels[${j}]`));
    if (levels.length < 1 || levels.length > 256) r.fail(`${path}.levels`, 'should have 1 to 256 entries');
    return { name, kind, levels, hadMissing, reference: r.integer(refValue, `${path}.reference`, 0, levels.length - 1) };
  });
  if (features.length === 0) r.fail('schema.features', 'is empty');
  if (features.length > MAX_FEATURES) r.fail('schema.features', `has more than ${MAX_FEATURES} entries`);
  const to = r.object(r.field(o, 'target', 'schema'), 'schema.target');
  const task = r.oneOf(r.field(to, 'task', 'schema.target'), 'schema.target.task', ['classification', 'regression'] as const);
  const target: TargetInfo = { name: r.string(r.field(to, 'name', 'schema.target'), 'schema.target.name'), task };
  if (task === 'classification') {
    const classes = r.array(r.field(to, 'classes', 'schema.target'), 'schema.target.classes').map((c, j) => r.string(c, `schema.target.classes[${j}]`));
    if (classes.length < 2 || classes.length > MAX_CLASSES_STORED) r.fail('schema.target.classes', `should have 2 to ${MAX_CLASSES_STORED} entries`);
    return { features, target: { ...target, classes } };
  }
  return { features, target };
}

function readParams(r: Reader, o: Record<string, Json>): ForestParams {
  const f = (k: string) => r.field(o, k, 'params');
  const fps = f('featuresPerSplit');
  const params: ForestParams = {
    task: r.oneOf(f('task'), 'params.task', ['classification', 'regression'] as const),
    trees: r.integer(f('trees'), 'params.trees', 1, MAX_TREES),
    featuresPerSplit: typeof fps === 'number' ? r.number(fps, 'params.featuresPerSplit') : r.oneOf(fps, 'params.featuresPerSplit', ['sqrt', 'third', 'log2', 'all'] as const),
    criterion: r.oneOf(f('criterion'), 'params.criterion', ['gini', 'entropy', 'squared-error'] as const),
    maxDepth: f('maxDepth') === null ? null : r.integer(f('maxDepth'), 'params.maxDepth', 1),
    minSplit: r.integer(f('minSplit'), 'params.minSplit', 2),
    minLeaf: r.integer(f('minLeaf'), 'params.minLeaf', 1),
    sampleFraction: r.number(f('sampleFraction'), 'params.sampleFraction'),
    replace: r.boolean(f('replace'), 'params.replace'),
    classWeight: r.oneOf(f('classWeight'), 'params.classWeight', ['none', 'balanced'] as const),
    seed: r.integer(f('seed'), 'params.seed', MIN_SEED),
  };
  try {
    validateParams(params);
  } catch (e) {
    r.fail('params', `are out of range (${(e as Error).message})`);
  }
  return params;
}

function readTree(r: Reader, v: Json, path: string, schema: Schema): FlatTree {
  const o = r.object(v, path);
  const n = r.integer(r.field(o, 'nodes', path), `${path}.nodes`, 1, 50_000_000);
  const p = schema.features.length;
  const K = outputCount(schema.target);
  // Straight into shared memory, so scoring threads read these arrays instead of copying them (see sharedForest).
  const list = <T extends Float64Array | Float32Array | Int32Array | Uint8Array | Uint32Array>(
    key: string,
    make: (new (n: number) => T) & SharedMake<T>,
    length: number | undefined,
    check: (x: number) => boolean,
    rule: string,
  ) => r.numbers(r.field(o, key, path), `${path}.${key}`, make, length, check, rule, (len) => sharedArray(make, len));
  const isIndex = (x: number) => Number.isInteger(x) && x >= -1 && x < n;
  const left = list('left', Int32Array, n, isIndex, `should be -1 or a node index below ${n}`);
  const right = list('right', Int32Array, n, isIndex, `should be -1 or a node index below ${n}`);
  const feature = list('feature', Int32Array, n, (x) => Number.isInteger(x) && x >= -1 && x < p, `should be -1 or a feature index below ${p}`);
  const threshold = list('threshold', Float64Array, n, Number.isFinite, 'should be a finite number');
  const missingLeft = list('missingLeft', Uint8Array, n, (x) => x === 0 || x === 1, 'should be 0 or 1');
  // Checked in the precision they are kept in: a double beyond float32's range would become Infinity.
  const value = list('value', Float32Array, n * K, finiteAsFloat32, 'should be a number float32 holds (finite, within about ±3.4e38)');
  const cover = list('cover', Float32Array, n, (x) => finiteAsFloat32(x) && x >= 0, 'should be a number >= 0 that float32 holds');
  const catBits = list('levelSets', Uint32Array, undefined, (x) => Number.isInteger(x) && x >= 0 && x <= 0xffffffff, 'should be a 32-bit word');
  // Children after parents and each node reached once: the walk always ends, and the arrays form one tree.
  const reached = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const leaf = left[i] < 0;
    if (leaf !== right[i] < 0 || leaf !== feature[i] < 0) r.fail(`${path} node ${i}`, 'mixes leaf and split fields');
    if (leaf) continue;
    for (const c of [left[i], right[i]]) {
      if (c <= i) r.fail(`${path} node ${i}`, 'has a child that does not come after it');
      if (reached[c]++) r.fail(`${path} node ${c}`, 'has more than one parent');
    }
    const info = schema.features[feature[i]];
    if (info.kind !== 'numeric') {
      const words = ((info.levels?.length ?? 0) + 31) >>> 5;
      const at = threshold[i];
      if (!Number.isInteger(at) || at < 0 || at + words > catBits.length) r.fail(`${path}.threshold[${i}]`, 'should point at a level set inside levelSets');
    }
  }
  for (let i = 1; i < n; i++) if (!reached[i]) r.fail(`${path} node ${i}`, 'is not reached from the root');
  return { nodeCount: n, left, right, feature, threshold, missingLeft, value, cover, catBits };
}
