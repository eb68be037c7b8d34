// Export to ONNX, checked against onnxruntime (onnxruntime-node 1.30, CPU) as the independent scorer, and against
// the ONNX 1.12 checker (python3-onnx, Debian) for well-formedness. Data: open datasets from test/fixtures/open
// (publications in SOURCES.md) and the invented kite flights of demo/ for categorical and boolean columns.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { loadCsv } from '../../../src/core/csv/load';
import type { Table } from '../../../src/core/data/table';
import { fitForest } from '../../../src/core/forest/fit';
import type { Forest } from '../../../src/core/forest/forest';
import { defaultParams } from '../../../src/core/forest/params';
import { encodeTable, predictEncoded } from '../../../src/core/forest/predict';
import type { FeatureInfo, Schema } from '../../../src/core/base/schema';
import { ModelError } from '../../../src/core/model/validate';
import { exportOnnx, minimumOnnxBytes } from '../../../src/core/onnx/export';
import { META } from '../../../src/core/onnx/metadata';
import { decodeModel } from '../../../src/core/onnx/proto';
import type { FlatTree } from '../../../src/core/tree/tree';
import { blankOut, maxDiff, runOnnx } from './helpers';

const root = path.join(__dirname, '..', '..', '..', '..');
const PYTHON = '/usr/bin/python3';

const cases = [
  { name: 'iris', file: 'test/fixtures/open/iris.csv', target: 'species' },
  { name: 'wine', file: 'test/fixtures/open/wine.csv', target: 'cultivar' },
  { name: 'Pima (two classes)', file: 'test/fixtures/open/pima.csv', target: 'type' },
  { name: 'diabetes', file: 'test/fixtures/open/diabetes.csv', target: 'progression' },
  { name: 'kite flights (categorical and boolean columns)', file: 'demo/kite-flights.csv', target: 'outcome' },
];

async function fitOn(table: Table, target: string, trees: number, seed = 4): Promise<Forest> {
  return (await fitForest(table, { target, params: { trees, seed }, workers: 2, permutationImportance: false })).forest;
}

/** Ours on the float32-rounded rows (what the graph sees) against onnxruntime on the same rows. */
async function compare(forest: Forest, table: Table): Promise<{ values: number; labels: number; rows: number }> {
  const x = encodeTable(forest.schema, table);
  const n = table.rowCount;
  const p = forest.schema.features.length;
  const ours = predictEncoded(forest, Float64Array.from(x, Math.fround), n);
  const out = await runOnnx(exportOnnx(forest), x, n, p, { input: 'features' });
  if (forest.schema.target.task === 'regression') return { values: maxDiff(out.value as Float32Array, ours.value!), labels: 0, rows: n };
  const K = forest.schema.target.classes!.length;
  let labels = 0;
  for (let i = 0; i < n; i++) {
    const sorted = Array.from(ours.proba!.subarray(i * K, i * K + K)).sort((a, b) => b - a);
    // Where two classes tie within float32 summation error, either label is right.
    if (sorted[0] - sorted[1] > 1e-5 && out.label[i] !== forest.schema.target.classes![ours.predicted[i]]) labels++;
  }
  return { values: maxDiff(out.probabilities as Float32Array, ours.proba!), labels, rows: n };
}

describe('ONNX export: onnxruntime scores as Copse does', function () {
  this.timeout(120000);
  for (const c of cases) {
    describe(c.name, () => {
      let table: Table;
      let blanked: Table;
      before(async () => {
        table = (await loadCsv(path.join(root, c.file), { target: c.target })).table;
        blanked = blankOut(table, 0.15, c.target, `onnx-${c.name}`);
      });

      it('gives the same probabilities or values, to float32 summation error, and the same labels', async () => {
        const forest = await fitOn(table, c.target, 40);
        const r = await compare(forest, table);
        // 40 float32 additions of values up to 1 (or up to the target's size) round to within a few 1e-7 per unit.
        const scale = forest.schema.target.task === 'regression' ? 400 : 1;
        assert.ok(r.values <= 2e-6 * scale, `largest difference ${r.values}`);
        assert.equal(r.labels, 0);
      });

      it('routes missing values as Copse does, trained and scored with 15% of the cells blank', async () => {
        const forest = await fitOn(blanked, c.target, 40);
        assert.ok(forest.trees.some((t) => t.missingLeft.some((m, i) => m === 1 && t.left[i] >= 0)), 'some split sends missing values left');
        const scale = forest.schema.target.task === 'regression' ? 400 : 1;
        for (const data of [blanked, table]) {
          const r = await compare(forest, data);
          assert.ok(r.values <= 2e-6 * scale, `largest difference ${r.values}`);
          assert.equal(r.labels, 0);
        }
      });

      it('follows every tree exactly: a one-tree forest scores leaf values bit for bit', async () => {
        const forest = await fitOn(blanked, c.target, 1, 9);
        const x = encodeTable(forest.schema, blanked);
        const n = blanked.rowCount;
        const ours = predictEncoded(forest, Float64Array.from(x, Math.fround), n);
        const out = await runOnnx(exportOnnx(forest), x, n, forest.schema.features.length, { input: 'features' });
        const theirs = (forest.schema.target.task === 'regression' ? out.value : out.probabilities) as Float32Array;
        assert.equal(maxDiff(theirs, Float32Array.from(ours.proba ?? ours.value!)), 0);
      });
    });
  }

  it('writes a graph the ONNX 1.12 checker accepts, for each task and for level columns', async function () {
    if (!existsSync(PYTHON) || spawnSync(PYTHON, ['-c', 'import onnx'], { encoding: 'utf8' }).status !== 0) this.skip();
    const dir = mkdtempSync(path.join(tmpdir(), 'copse-onnx-'));
    const files: string[] = [];
    for (const c of [cases[0], cases[2], cases[3], cases[4]]) {
      const table = (await loadCsv(path.join(root, c.file), { target: c.target })).table;
      const file = path.join(dir, `${c.target}.onnx`);
      writeFileSync(file, exportOnnx(await fitOn(blankOut(table, 0.1, c.target, 'checker'), c.target, 5)));
      files.push(file);
    }
    const script = 'import onnx, sys\nfor f in sys.argv[1:]:\n    onnx.checker.check_model(onnx.load(f), full_check=True)\nprint("ok", len(sys.argv) - 1)';
    const r = spawnSync(PYTHON, ['-c', script, ...files], { encoding: 'utf8' });
    assert.equal(r.status, 0, r.stderr);
    assert.equal(r.stdout.trim(), `ok ${files.length}`);
  });
});

/** A forest of one hand-made tree, for cases fitted data would rarely produce. */
function handForest(features: FeatureInfo[], tree: Omit<FlatTree, 'nodeCount' | 'cover'>, classes: string[]): Forest {
  const nodeCount = tree.left.length;
  return {
    schema: { features, target: { name: 'y', task: 'classification', classes } },
    params: defaultParams('classification', { trees: 1 }),
    trees: [{ ...tree, nodeCount, cover: new Float32Array(nodeCount).fill(1) }],
    training: { rows: 1, fingerprint: '', dropped: [] },
  };
}

const numeric = (name: string): FeatureInfo => ({ name, kind: 'numeric', edges: [], hadMissing: true, reference: 0 });

describe('ONNX export: thresholds and level sets', function () {
  this.timeout(60000);

  // IEEE 754 single precision, common practice: 1.7 is not a float32; the nearest one is 1.70000005 and the one
  // below is 1.69999993. A threshold between them (scikit-learn makes such midpoints) must not be rounded up.
  it('rounds a threshold down to float32, so a float32 input just above it still goes right', async () => {
    const t = 1.699999988079071;
    assert.ok(Math.fround(t) > t);
    const forest = handForest([numeric('a')], {
      left: Int32Array.of(1, -1, -1),
      right: Int32Array.of(2, -1, -1),
      feature: Int32Array.of(0, -1, -1),
      threshold: Float64Array.of(t, 0, 0),
      missingLeft: Uint8Array.of(1, 0, 0),
      value: Float32Array.of(0, 0, 1, 0, 0, 1),
      catBits: new Uint32Array(0),
    }, ['left', 'right']);
    const x = [1.7, 1.69999993, t, NaN, Number.MAX_VALUE, -Infinity, Infinity];
    const ours = predictEncoded(forest, Float64Array.from(x, Math.fround), x.length);
    const out = await runOnnx(exportOnnx(forest), x, x.length, 1, { input: 'features' });
    assert.deepEqual(Array.from(out.label), Array.from(ours.predicted, (k) => forest.schema.target.classes![k]));
    assert.deepEqual(Array.from(out.label), ['right', 'left', 'right', 'left', 'right', 'left', 'right']);
  });

  for (const missingLeft of [0, 1]) {
    it(`writes a level set as a BRANCH_EQ chain that ends on the missing side (missing values go ${missingLeft ? 'left' : 'right'})`, async () => {
      const levels = ['a', 'b', 'c', 'd', 'e'];
      const forest = handForest([{ name: 'k', kind: 'categorical', levels, hadMissing: true, reference: 0 }], {
        left: Int32Array.of(1, -1, -1),
        right: Int32Array.of(2, -1, -1),
        feature: Int32Array.of(0, -1, -1),
        threshold: Float64Array.of(0, 0, 0),
        missingLeft: Uint8Array.of(missingLeft, 0, 0),
        value: Float32Array.of(0, 0, 1, 0, 0, 1),
        catBits: Uint32Array.of(0b01010), // b and d go left
      }, ['left', 'right']);
      // Level codes, a missing value, and codes no level has: all routed as Copse routes them.
      const x = [0, 1, 2, 3, 4, NaN, 7, -1, 256];
      const ours = predictEncoded(forest, Float64Array.from(x), x.length);
      const bytes = exportOnnx(forest);
      const out = await runOnnx(bytes, x, x.length, 1, { input: 'features' });
      assert.deepEqual(Array.from(out.label), Array.from(ours.predicted, (k) => forest.schema.target.classes![k]));
      const node = decodeModel(bytes).graph!.node!.find((n) => n.op_type === 'TreeEnsembleClassifier')!;
      const modes = node.attribute!.find((a) => a.name === 'nodes_modes')!.strings!.map((s) => Buffer.from(s).toString());
      // Two levels on the side missing values do not take, so a chain of two EQ nodes, and two leaves.
      const kept = missingLeft ? 3 : 2;
      assert.equal(modes.filter((m) => m === 'BRANCH_EQ').length, kept);
      assert.equal(modes.filter((m) => m === 'LEAF').length, 2);
    });
  }

  // Found with the kite flights: onnxruntime 1.30 merges an EQ node with a following EQ node on the same feature
  // into one set when the ensemble has several outputs, though their true branches differ.
  it('keeps two level-set splits on one feature apart, for three classes as for two', async () => {
    const levels = ['a', 'b', 'c', 'd'];
    for (const classes of [['p', 'q', 'r'], ['p', 'q']]) {
      const K = classes.length;
      const leaf = (k: number) => Array.from({ length: K }, (_, j) => (j === k % K ? 1 : 0));
      // Node 0: {a} left, others and missing right to node 2; node 2: {b, c} left, others and missing right.
      const forest = handForest([{ name: 'k', kind: 'categorical', levels, hadMissing: true, reference: 0 }], {
        left: Int32Array.of(1, -1, 3, -1, -1),
        right: Int32Array.of(2, -1, 4, -1, -1),
        feature: Int32Array.of(0, -1, 0, -1, -1),
        threshold: Float64Array.of(0, 0, 1, 0, 0),
        missingLeft: Uint8Array.of(0, 0, 0, 0, 0),
        value: Float32Array.from([leaf(0), leaf(0), leaf(0), leaf(1), leaf(2)].flat()),
        catBits: Uint32Array.of(0b0001, 0b0110),
      }, classes);
      const x = [0, 1, 2, 3, NaN];
      const ours = predictEncoded(forest, Float64Array.from(x), x.length);
      const out = await runOnnx(exportOnnx(forest), x, x.length, 1, { input: 'features' });
      assert.deepEqual(Array.from(out.probabilities as Float32Array), Array.from(ours.proba!));
    }
  });

  it('refuses a forest too large for one protocol-buffer message before building anything', async () => {
    const table = (await loadCsv(path.join(root, 'test/fixtures/open/iris.csv'), { target: 'species' })).table;
    const forest = await fitOn(table, 'species', 2);
    // 120 million nodes (100 fully grown trees on five million noisy rows come to about 80 million) cannot fit in 2 GiB;
    // the count alone decides, so the arrays are never read.
    // The bound it refuses by stays below what real forests write.
    for (const f of [forest, await fitOn((await loadCsv(path.join(root, 'demo/kite-flights.csv'), { target: 'outcome' })).table, 'outcome', 5)]) {
      assert.ok(minimumOnnxBytes(f) < exportOnnx(f).length * 0.9, `${minimumOnnxBytes(f)} against ${exportOnnx(f).length}`);
    }
    const huge = { ...forest, trees: forest.trees.map((t) => ({ ...t, nodeCount: 60_000_000 })) };
    assert.throws(() => exportOnnx(huge), (e: Error) => e instanceof ModelError && /too large for one ONNX file \(about \d+ MiB; the format's limit is 2 GiB\)/.test(e.message));
  });

  it('states its encoding in metadata_props and outputs a label and a probability tensor, no ZipMap', async () => {
    const table = (await loadCsv(path.join(root, 'demo/kite-flights.csv'), { target: 'outcome' })).table;
    const forest = await fitOn(table, 'outcome', 3);
    const model = decodeModel(exportOnnx(forest));
    const props = new Map((model.metadata_props ?? []).map((e) => [e.key, e.value]));
    for (const key of Object.values(META)) assert.ok(props.has(key), `metadata ${key}`);
    assert.match(props.get(META.levelSplits)!, /BRANCH_EQ chains/);
    assert.deepEqual((JSON.parse(props.get(META.schema)!) as Schema).features.map((f) => f.name), forest.schema.features.map((f) => f.name));
    assert.deepEqual(model.graph!.output!.map((o) => [o.name, o.type!.tensor_type!.elem_type]), [['label', 8], ['probabilities', 1]]);
    assert.ok(!model.graph!.node!.some((n) => n.op_type === 'ZipMap'));
    const ml = model.opset_import!.find((o) => o.domain === 'ai.onnx.ml')!;
    assert.equal(ml.version, 3);
    const node = model.graph!.node!.find((n) => n.op_type === 'TreeEnsembleClassifier')!;
    const post = node.attribute!.find((a) => a.name === 'post_transform')!;
    assert.equal(Buffer.from(post.s!).toString(), 'NONE');
  });
});
