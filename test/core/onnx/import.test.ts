// Import from ONNX. References: onnxruntime-node 1.30 (what a runtime computes from a file is what it means), and
// scikit-learn 1.2.1 for forests written outside Copse (test/core/onnx/fixtures/make_sklearn_onnx.py records its
// predictions beside the models; data from test/fixtures/open, sources in SOURCES.md).
import * as assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import seedrandom from 'seedrandom';
import { loadCsv } from '../../../src/core/csv/load';
import { fitForest } from '../../../src/core/forest/fit';
import type { Forest } from '../../../src/core/forest/forest';
import { encodeTable, predictEncoded, SchemaMismatchError } from '../../../src/core/forest/predict';
import { loadForScoring } from '../../../src/core/forest/score-file';
import { ModelError, serializeModel } from '../../../src/core/model/file';
import { exportOnnx } from '../../../src/core/onnx/export';
import { roundDown32 } from '../../../src/core/onnx/float32';
import type { FlatTree } from '../../../src/core/tree/tree';
import { importOnnx, readOnnx } from '../../../src/core/onnx/import';
import { columnsInOrder, loadOnnxFile, nameFeatures } from '../../../src/core/onnx/load';
import { decodeModel, DTYPE, encodeModel, type OnnxModel } from '../../../src/core/onnx/proto';
import { blankOut, bytesOf, ensembleModel, floatTensor, maxDiff, runOnnx, type AttrValue, type SklearnDataset, type SklearnPredictions } from './helpers';

const root = path.join(__dirname, '..', '..', '..', '..');
const fixtures = path.join(root, 'test/core/onnx/fixtures');

const isModelError = (pattern: RegExp) => (e: unknown) => {
  assert.ok(e instanceof ModelError, `expected a ModelError, got ${(e as Error)?.name}: ${(e as Error)?.message}`);
  assert.match(e.message, pattern);
  return true;
};

/**
 * A tree in preorder, numbering aside: per node its feature, threshold (float32, as exported), the level set
 * written with missing values going right (a set and its complement with the branches swapped are one split),
 * missing side, cover and leaf values.
 */
function walk(tree: FlatTree, levels: number[], roundDown = false): unknown[] {
  const out: unknown[] = [];
  const stack = [0];
  while (stack.length) {
    const n = stack.pop()!;
    const l = tree.left[n];
    if (l < 0) {
      out.push(['leaf', tree.cover[n], Array.from(tree.value.subarray(n * (tree.value.length / tree.nodeCount), (n + 1) * (tree.value.length / tree.nodeCount)))]);
      continue;
    }
    const f = tree.feature[n];
    let left = l;
    let right = tree.right[n];
    if (levels[f] === 0) {
      out.push([f, roundDown ? roundDown32(tree.threshold[n]) : Math.fround(tree.threshold[n]), tree.missingLeft[n], tree.cover[n]]);
    } else {
      const at = tree.threshold[n];
      let set = Array.from({ length: levels[f] }, (_, c) => (tree.catBits[at + (c >>> 5)] >>> (c & 31)) & 1);
      if (tree.missingLeft[n] === 1) {
        set = set.map((b) => 1 - b);
        [left, right] = [right, left];
      }
      out.push([f, set.join(''), tree.cover[n]]);
    }
    stack.push(right, left);
  }
  return out;
}

describe('ONNX import: round trip of a Copse export', function () {
  this.timeout(120000);
  for (const [file, target] of [
    ['test/fixtures/open/iris.csv', 'species'],
    ['test/fixtures/open/diabetes.csv', 'progression'],
    ['demo/kite-flights.csv', 'outcome'],
  ]) {
    it(`${path.basename(file)}: export, import and predict give what the fitted forest gives`, async () => {
      const table = blankOut((await loadCsv(path.join(root, file), { target })).table, 0.1, target, `round-${target}`);
      const forest = (await fitForest(table, { target, params: { trees: 25, seed: 3 }, workers: 2, permutationImportance: false })).forest;
      const bytes = exportOnnx(forest);
      const back = readOnnx(bytes, 'm.onnx');
      assert.equal(back.names, 'metadata');
      assert.equal(back.trainingKnown, true);
      const json = (v: unknown): unknown => JSON.parse(JSON.stringify(v));
      assert.deepEqual(json(back.forest.schema), json(forest.schema));
      assert.deepEqual(back.forest.params, forest.params);
      assert.deepEqual(json(back.forest.training), json(forest.training));
      // Level-set chains fold back into one split, pass-through nodes vanish: the same trees, node for node
      // (numbered in another order, thresholds rounded down to float32).
      const levels = forest.schema.features.map((f) => f.levels?.length ?? 0);
      back.forest.trees.forEach((t, i) => assert.deepEqual(walk(t, levels), walk(forest.trees[i], levels, true), `tree ${i}`));
      const x = encodeTable(forest.schema, table);
      const x32 = Float64Array.from(x, Math.fround);
      const n = table.rowCount;
      const a = predictEncoded(forest, x32, n);
      const b = predictEncoded(back.forest, x32, n);
      // Probabilities go through w / T in float32 and back; at most one float32 step apart per leaf.
      assert.ok(maxDiff(a.proba ?? a.value!, b.proba ?? b.value!) <= 1e-6);
      assert.deepEqual(b.predicted, a.predicted);
      // On the CSV's own doubles the import scores as onnxruntime does on their float32 rounding.
      const out = await runOnnx(bytes, x, n, forest.schema.features.length, { input: 'features' });
      const d = predictEncoded(back.forest, x, n);
      assert.ok(maxDiff((out.probabilities ?? out.value) as Float32Array, d.proba ?? d.value!) <= (d.value ? 1e-3 : 2e-6));
    });
  }
});

describe('ONNX import: forests written outside Copse (scikit-learn 1.2.1 through onnx.helper)', function () {
  this.timeout(60000);
  const reference = JSON.parse(readFileSync(path.join(fixtures, 'sklearn-predictions.json'), 'utf8')) as SklearnPredictions;

  for (const [name, op, opset] of [['iris', 'TreeEnsembleClassifier', 3], ['diabetes', 'TreeEnsemble', 5]] as const) {
    it(`${name}: ${op} (ai.onnx.ml ${opset}) scores the CSV as scikit-learn and onnxruntime do, columns taken in order`, async () => {
      const bytes = readFileSync(path.join(fixtures, `sklearn-${name}.onnx`));
      const imported = readOnnx(bytes, `sklearn-${name}.onnx`);
      assert.equal(imported.operator, op);
      assert.equal(imported.mlOpset, opset);
      assert.equal(imported.names, 'positions');
      assert.equal(imported.trainingKnown, false);
      const forest = imported.forest;
      assert.equal(forest.training.rows, 0);
      assert.deepEqual(forest.schema.features.map((f) => f.name), forest.schema.features.map((_, j) => `f${j}`));
      const ref: SklearnDataset = reference[name];
      const csv = path.join(root, ref.file);
      // Without names the columns cannot be matched: the predictor says which it misses.
      const plain = await loadCsv(csv, { target: ref.target });
      assert.throws(() => encodeTable(forest.schema, plain.table, 'the csv'), (e: Error) => e instanceof SchemaMismatchError && /"f0"/.test(e.message));
      const named = nameFeatures(forest, columnsInOrder(plain.header, forest.schema.features.length, [ref.target]));
      const loaded = await loadForScoring(csv, named.schema);
      const x = encodeTable(named.schema, loaded.table, csv, loaded.header);
      const n = loaded.table.rowCount;
      const pred = predictEncoded(named, x, n);
      const out = await runOnnx(bytes, x, n, named.schema.features.length, { input: 'input' });
      if (name === 'iris') {
        assert.deepEqual(named.schema.target.classes, ref.classes);
        assert.ok(maxDiff(pred.proba!, ref.proba!.flat()) <= 1e-9);
        assert.ok(maxDiff(pred.proba!, out.probabilities as Float32Array) <= 1e-6);
      } else {
        assert.ok(maxDiff(pred.value!, ref.value!) <= 1e-6);
        assert.ok(maxDiff(pred.value!, out.value as Float32Array) <= 1e-3);
      }
    });
  }

  it('refuses to take columns by position when the counts differ, and names clash', () => {
    assert.throws(() => columnsInOrder(['a', 'b', 'c'], 2), isModelError(/reads 2 features by position, but the file has 3 columns/));
    assert.deepEqual(columnsInOrder(['a', 'y', 'b'], 2, ['y']), ['a', 'b']);
    const forest = importOnnx(readFileSync(path.join(fixtures, 'sklearn-iris.onnx')));
    assert.throws(() => nameFeatures(forest, ['a', 'b', 'a', 'c']), isModelError(/given twice/));
    assert.throws(() => nameFeatures(forest, ['a']), isModelError(/reads 4 features/));
  });
});

/** One-tree legacy regressor: node 0 tests feature 0 in `mode` against v; true gives 1, false 2. */
function oneSplitLegacy(mode: string, v: number, tracks: number, inputType: number = DTYPE.FLOAT): Uint8Array {
  return bytesOf(
    ensembleModel('TreeEnsembleRegressor', {
      nodes_treeids: { ints: [0, 0, 0] },
      nodes_nodeids: { ints: [0, 1, 2] },
      nodes_featureids: { ints: [0, 0, 0] },
      nodes_values: { floats: [v, 0, 0] },
      nodes_modes: { strings: [mode, 'LEAF', 'LEAF'] },
      nodes_truenodeids: { ints: [1, 0, 0] },
      nodes_falsenodeids: { ints: [2, 0, 0] },
      nodes_missing_value_tracks_true: { ints: [tracks, 0, 0] },
      target_treeids: { ints: [0, 0] },
      target_nodeids: { ints: [1, 2] },
      target_ids: { ints: [0, 0] },
      target_weights: { floats: [1, 2] },
      n_targets: 1,
      aggregate_function: 'SUM',
    }, { features: 1, inputType }),
  );
}

/** One-tree TreeEnsemble (opset 5): node 0 tests feature 0 with mode code `mode`; true leaf 1, false leaf 2. */
function oneSplitV5(mode: number, v: number, tracks: number, members?: number[]): Uint8Array {
  const attrs: Record<string, AttrValue> = {
    n_targets: 1,
    aggregate_function: 1,
    tree_roots: { ints: [0] },
    nodes_featureids: { ints: [0] },
    nodes_splits: floatTensor([mode === 6 ? NaN : v]),
    nodes_modes: floatTensor([mode], DTYPE.UINT8),
    nodes_truenodeids: { ints: [0] },
    nodes_trueleafs: { ints: [1] },
    nodes_falsenodeids: { ints: [1] },
    nodes_falseleafs: { ints: [1] },
    nodes_missing_value_tracks_true: { ints: [tracks] },
    leaf_targetids: { ints: [0, 0] },
    leaf_weights: floatTensor([1, 2]),
  };
  if (members) attrs.membership_values = floatTensor([...members, NaN]);
  return bytesOf(ensembleModel('TreeEnsemble', attrs, { features: 1 }));
}

/** Doubles around v: on it, at the float32 rounding boundaries next to it, between, and far off; NaN too. */
function probes(v: number): number[] {
  const f = Math.fround(v);
  const up = Math.fround(f * (1 + 2 ** -23)) === f ? f + Math.abs(f) * 2 ** -23 : Math.fround(f * (1 + 2 ** -23));
  const out = [v, f, up, (f + up) / 2, f + (up - f) * 0.4999999, f + (up - f) * 0.5000001, f - (up - f) * 0.5, f - (up - f) * 0.50001, v + 1e-12, v - 1e-12, v * 2, v - 3, NaN, 1e300, -1e300];
  return out;
}

describe('ONNX import: every node mode reproduces onnxruntime', function () {
  this.timeout(60000);
  const values = [0.5, 0.1, 1.7, -2.25, 123456.789];

  for (const mode of ['BRANCH_LEQ', 'BRANCH_LT', 'BRANCH_GTE', 'BRANCH_GT', 'BRANCH_EQ', 'BRANCH_NEQ']) {
    for (const tracks of [0, 1]) {
      it(`TreeEnsembleRegressor ${mode}, missing values tracking ${tracks ? 'true' : 'false'}: doubles scored as the runtime scores their float32`, async () => {
        for (const v of values) {
          const bytes = oneSplitLegacy(mode, v, tracks);
          const forest = importOnnx(bytes);
          const x = probes(v);
          const ours = predictEncoded(forest, Float64Array.from(x), x.length).value!;
          const out = await runOnnx(bytes, x, x.length, 1);
          assert.deepEqual(Array.from(ours), Array.from(out.y as Float32Array), `${mode} ${v}`);
        }
      });
    }
  }

  it('a double input is compared as it is, without float32 rounding', async () => {
    for (const mode of ['BRANCH_LEQ', 'BRANCH_LT', 'BRANCH_EQ']) {
      const bytes = oneSplitLegacy(mode, 0.5, 0, DTYPE.DOUBLE);
      const imported = readOnnx(bytes);
      assert.ok(imported.notes.some((s) => /double/.test(s)));
      const x = [0.5, 0.5 + 2 ** -53, 0.5 - 2 ** -54, 0.50000001, NaN];
      const ours = predictEncoded(imported.forest, Float64Array.from(x), x.length).value!;
      const out = await runOnnx(bytes, x, x.length, 1, { double: true });
      assert.deepEqual(Array.from(ours), Array.from(out.y as Float32Array), mode);
    }
  });

  for (let mode = 0; mode <= 6; mode++) {
    it(`TreeEnsemble (opset 5) mode ${mode}, both missing-value flags`, async () => {
      for (const tracks of [0, 1]) {
        for (const v of [0.5, 1.7, -3]) {
          // onnxruntime implements set membership for whole numbers only, and compares the input's whole part (0.5
          // is a member of {0} there); Copse compares the value, as the operator defines. Whole-number probes agree.
          const members = mode === 6 ? [4, -2, 0, 7] : undefined;
          const bytes = oneSplitV5(mode, v, tracks, members);
          const forest = importOnnx(bytes);
          const x = mode === 6 ? [4, -2, 0, 7, 1, -3, 8, 1e6, NaN] : [...probes(v), 0.1, 2];
          const ours = predictEncoded(forest, Float64Array.from(x), x.length).value!;
          const out = await runOnnx(bytes, x, x.length, 1);
          assert.deepEqual(Array.from(ours), Array.from(out.y as Float32Array), `mode ${mode} tracks ${tracks} v ${v}`);
        }
      }
    });
  }

  it('folds a BRANCH_EQ chain sharing one target (a DAG) into one set, and copies shared subtrees', async () => {
    // Tree: x0 in {1, 3, 5, 7} (four EQ nodes, true branches all to node 4) -> node 4: x1 <= 0.5 -> 10 : 20;
    // otherwise -> node 5: x1 <= 0.5 again, sharing leaf 6 with node 4's true branch.
    const modes = ['BRANCH_EQ', 'BRANCH_EQ', 'BRANCH_EQ', 'BRANCH_EQ', 'BRANCH_LEQ', 'BRANCH_LEQ', 'LEAF', 'LEAF', 'LEAF'];
    const bytes = bytesOf(
      ensembleModel('TreeEnsembleRegressor', {
        nodes_treeids: { ints: modes.map(() => 0) },
        nodes_nodeids: { ints: modes.map((_, i) => i) },
        nodes_featureids: { ints: [0, 0, 0, 0, 1, 1, 0, 0, 0] },
        nodes_values: { floats: [1, 3, 5, 7, 0.5, 0.25, 0, 0, 0] },
        nodes_modes: { strings: modes },
        nodes_truenodeids: { ints: [4, 4, 4, 4, 6, 6, 0, 0, 0] },
        nodes_falsenodeids: { ints: [1, 2, 3, 5, 7, 8, 0, 0, 0] },
        nodes_missing_value_tracks_true: { ints: [0, 0, 0, 0, 1, 0, 0, 0, 0] },
        target_treeids: { ints: [0, 0, 0] },
        target_nodeids: { ints: [6, 7, 8] },
        target_ids: { ints: [0, 0, 0] },
        target_weights: { floats: [10, 20, 30] },
        n_targets: 1,
      }, { features: 2 }),
    );
    const forest = importOnnx(bytes);
    // x0 is numeric, so the set of 4 values becomes a search of 2 splits per value, with the 3-node subtree of
    // node 4 copied once per value and that of node 5 once per gap: 8 + 4 * 3 + 5 * 3.
    assert.equal(forest.trees[0].nodeCount, 35);
    const rnd = seedrandom('dag');
    const rows = 400;
    const x = Array.from({ length: rows * 2 }, (_, i) => (rnd() < 0.1 ? NaN : i % 2 === 0 ? Math.floor(rnd() * 9) : rnd()));
    const ours = predictEncoded(forest, Float64Array.from(x), rows).value!;
    const out = await runOnnx(bytes, x, rows, 2);
    assert.deepEqual(Array.from(ours), Array.from(out.y as Float32Array));
  });

  // The operator's rule, node by node: NaN fails node 0 (flag 0) and reaches node 1, whose flag sends it to the
  // shared target. onnxruntime 1.30 merges the chain and keeps node 0's flag only, so it sends NaN the other way.
  it('sends NaN into a chain\'s shared target when a later link\'s flag says so', () => {
    const modes = ['BRANCH_EQ', 'BRANCH_EQ', 'LEAF', 'LEAF'];
    const forest = importOnnx(
      bytesOf(
        ensembleModel('TreeEnsembleRegressor', {
          nodes_treeids: { ints: [0, 0, 0, 0] },
          nodes_nodeids: { ints: [0, 1, 2, 3] },
          nodes_featureids: { ints: [0, 0, 0, 0] },
          nodes_values: { floats: [1, 3, 0, 0] },
          nodes_modes: { strings: modes },
          nodes_truenodeids: { ints: [2, 2, 0, 0] },
          nodes_falsenodeids: { ints: [1, 3, 0, 0] },
          nodes_missing_value_tracks_true: { ints: [0, 1, 0, 0] },
          target_treeids: { ints: [0, 0] },
          target_nodeids: { ints: [2, 3] },
          target_ids: { ints: [0, 0] },
          target_weights: { floats: [10, 20] },
          n_targets: 1,
        }, { features: 1 }),
      ),
    );
    assert.deepEqual(Array.from(predictEncoded(forest, Float64Array.of(1, 3, 2, NaN), 4).value!), [10, 10, 20, 10]);
  });

  it('folds a long chain once: 24 values, not 2^24 copies', () => {
    const m = 24;
    const modes = [...Array.from({ length: m }, () => 'BRANCH_EQ'), 'LEAF', 'LEAF'];
    const forest = importOnnx(
      bytesOf(
        ensembleModel('TreeEnsembleRegressor', {
          nodes_treeids: { ints: modes.map(() => 0) },
          nodes_nodeids: { ints: modes.map((_, i) => i) },
          nodes_featureids: { ints: modes.map(() => 0) },
          nodes_values: { floats: modes.map((_, i) => (i < m ? i * 2 : 0)) },
          nodes_modes: { strings: modes },
          nodes_truenodeids: { ints: modes.map((_, i) => (i < m ? m : 0)) },
          nodes_falsenodeids: { ints: modes.map((_, i) => (i < m - 1 ? i + 1 : i === m - 1 ? m + 1 : 0)) },
          target_treeids: { ints: [0, 0] },
          target_nodeids: { ints: [m, m + 1] },
          target_ids: { ints: [0, 0] },
          target_weights: { floats: [1, 2] },
          n_targets: 1,
        }, { features: 1 }),
      ),
    );
    assert.equal(forest.trees[0].nodeCount, 2 * m + m + (m + 1));
    const x = Float64Array.from({ length: 60 }, (_, i) => i - 5);
    const values = predictEncoded(forest, x, x.length).value!;
    x.forEach((v, i) => assert.equal(values[i], v >= 0 && v < 2 * m && v % 2 === 0 ? 1 : 2, `x = ${v}`));
  });

  it('takes base values, SUM and AVERAGE, several trees and a multi-target TreeEnsemble read as classes', async () => {
    const tree = (t: number, v: number) => ({ t, v });
    const trees = [tree(0, 0.5), tree(1, -1), tree(2, 2)];
    for (const aggregate of ['SUM', 'AVERAGE']) {
      const bytes = bytesOf(
        ensembleModel('TreeEnsembleRegressor', {
          nodes_treeids: { ints: trees.flatMap((x) => [x.t, x.t, x.t]) },
          nodes_nodeids: { ints: trees.flatMap(() => [0, 1, 2]) },
          nodes_featureids: { ints: trees.flatMap((_, i) => [i, 0, 0]) },
          nodes_values: { floats: trees.flatMap((x) => [x.v, 0, 0]) },
          nodes_modes: { strings: trees.flatMap(() => ['BRANCH_LEQ', 'LEAF', 'LEAF']) },
          nodes_truenodeids: { ints: trees.flatMap(() => [1, 0, 0]) },
          nodes_falsenodeids: { ints: trees.flatMap(() => [2, 0, 0]) },
          target_treeids: { ints: trees.flatMap((x) => [x.t, x.t]) },
          target_nodeids: { ints: trees.flatMap(() => [1, 2]) },
          target_ids: { ints: trees.flatMap(() => [0, 0]) },
          target_weights: { floats: [1, 2, 4, 8, 16, 32] },
          base_values: { floats: [100] },
          n_targets: 1,
          aggregate_function: aggregate,
        }, { features: 3 }),
      );
      const imported = readOnnx(bytes);
      assert.ok(imported.notes.some((s) => /base values/.test(s)));
      const rnd = seedrandom(aggregate);
      const x = Array.from({ length: 300 }, () => rnd() * 6 - 3);
      const ours = predictEncoded(imported.forest, Float64Array.from(x), 100).value!;
      const out = await runOnnx(bytes, x, 100, 3);
      assert.ok(maxDiff(ours, out.y as Float32Array) <= 1e-4, aggregate);
    }
    // Three targets from three one-split trees, one target each (the opset-5 way of writing class scores).
    const bytes = bytesOf(
      ensembleModel('TreeEnsemble', {
        n_targets: 3,
        aggregate_function: 1,
        tree_roots: { ints: [0, 1, 2] },
        nodes_featureids: { ints: [0, 1, 0] },
        nodes_splits: floatTensor([0.5, 0.5, -0.5]),
        nodes_modes: floatTensor([0, 0, 3], DTYPE.UINT8),
        nodes_truenodeids: { ints: [0, 2, 4] },
        nodes_trueleafs: { ints: [1, 1, 1] },
        nodes_falsenodeids: { ints: [1, 3, 5] },
        nodes_falseleafs: { ints: [1, 1, 1] },
        leaf_targetids: { ints: [0, 0, 1, 1, 2, 2] },
        leaf_weights: floatTensor([0.7, 0.1, 0.2, 0.6, 0.1, 0.3]),
      }, { features: 2 }),
    );
    const imported = readOnnx(bytes);
    assert.equal(imported.forest.schema.target.task, 'classification');
    assert.deepEqual(imported.forest.schema.target.classes, ['0', '1', '2']);
    const rnd = seedrandom('targets');
    const x = Array.from({ length: 200 }, () => (rnd() < 0.1 ? NaN : rnd() * 2 - 1));
    const ours = predictEncoded(imported.forest, Float64Array.from(x), 100).proba!;
    const out = await runOnnx(bytes, x, 100, 2);
    assert.ok(maxDiff(ours, out.y as Float32Array) <= 1e-6);
  });
});

describe('ONNX import: broken and hostile files', function () {
  this.timeout(120000);
  let small: Uint8Array;
  let forest: Forest;
  before(async () => {
    const { table } = await loadCsv(path.join(root, 'demo/kite-flights.csv'), { target: 'outcome', sampleRows: 300, sampleSeed: 2 });
    forest = (await fitForest(table, { target: 'outcome', params: { trees: 3, seed: 2, maxDepth: 4 }, workers: 1, permutationImportance: false })).forest;
    small = exportOnnx(forest);
  });

  const legacy = (overrides: Record<string, AttrValue>, options: Partial<Parameters<typeof ensembleModel>[2]> = {}) =>
    bytesOf(
      ensembleModel('TreeEnsembleRegressor', {
        nodes_treeids: { ints: [0, 0, 0] },
        nodes_nodeids: { ints: [0, 1, 2] },
        nodes_featureids: { ints: [0, 0, 0] },
        nodes_values: { floats: [0.5, 0, 0] },
        nodes_modes: { strings: ['BRANCH_LEQ', 'LEAF', 'LEAF'] },
        nodes_truenodeids: { ints: [1, 0, 0] },
        nodes_falsenodeids: { ints: [2, 0, 0] },
        target_treeids: { ints: [0, 0] },
        target_nodeids: { ints: [1, 2] },
        target_ids: { ints: [0, 0] },
        target_weights: { floats: [1, 2] },
        n_targets: 1,
        ...overrides,
      }, { features: 1, ...options }),
    );

  const withModel = (edit: (m: OnnxModel) => void) => {
    const m = decodeModel(small);
    edit(m);
    return encodeModel(m);
  };
  const setMeta = (key: string, value: string) => withModel((m) => (m.metadata_props!.find((e) => e.key === key)!.value = value));

  const refusals: Array<[string, () => Uint8Array, RegExp]> = [
    ['a truncated file', () => small.subarray(0, Math.floor(small.length * 0.6)), /does not decode|not a usable/],
    ['an empty file', () => new Uint8Array(0), /has no graph/],
    ['a length field that runs past the end', () => Uint8Array.of(0x3a, 0xff, 0xff, 0xff, 0xff, 0x07, 1, 2, 3), /does not decode/],
    ['a graph without a tree ensemble', () => withModel((m) => (m.graph!.node = m.graph!.node!.filter((n) => !n.op_type!.startsWith('TreeEnsemble')))), /holds no TreeEnsemble/],
    ['two ensembles', () => withModel((m) => m.graph!.node!.push({ ...m.graph!.node![0], output: ['other_label', 'other_probabilities'] })), /holds 2 tree ensemble nodes/],
    ['no ai.onnx.ml operator set', () => withModel((m) => (m.opset_import = m.opset_import!.filter((o) => o.domain !== 'ai.onnx.ml'))), /does not declare the ai.onnx.ml/],
    ['a child outside its tree', () => legacy({ nodes_truenodeids: { ints: [7, 0, 0] } }), /node 7 of tree 0, whose node ids run 0 to 2/],
    ['a repeated node id', () => legacy({ nodes_nodeids: { ints: [0, 1, 1] } }), /lists node 1 twice/],
    ['node ids that do not run from 0', () => legacy({ nodes_nodeids: { ints: [0, 1, 5] } }), /node 5 of tree 0, whose node ids run 0 to 2/],
    ['a cycle', () => legacy({ nodes_modes: { strings: ['BRANCH_LEQ', 'BRANCH_LEQ', 'LEAF'] }, nodes_truenodeids: { ints: [1, 0, 0] }, nodes_falsenodeids: { ints: [2, 2, 0] }, target_nodeids: { ints: [2, 2] } }), /cycle through node 0/],
    ['a weight on a branch node', () => legacy({ target_nodeids: { ints: [0, 2] } }), /is not a leaf/],
    ['lists of different lengths', () => legacy({ nodes_values: { floats: [0.5, 0] } }), /"nodes_values" has 2 entries where the node lists have 3/],
    ['an attribute of the wrong type', () => legacy({ nodes_treeids: { floats: [0, 0, 0] } }), /"nodes_treeids" should be INTS, not FLOATS/],
    ['an unknown mode', () => legacy({ nodes_modes: { strings: ['BRANCH_SOMETIMES', 'LEAF', 'LEAF'] } }), /mode "BRANCH_SOMETIMES"/],
    ['a threshold that is not a number', () => legacy({ nodes_values: { floats: [NaN, 0, 0] } }), /threshold that is not a number/],
    ['a huge feature index', () => legacy({ nodes_featureids: { ints: [2 ** 40, 0, 0] } }), /tests feature 1099511627776/],
    ['an integer beyond 2^53', () => legacy({ nodes_treeids: { ints: [2 ** 60, 0, 0] } }), /"nodes_treeids"\[0\] is out of range/],
    ['a feature beyond the input width', () => legacy({ nodes_featureids: { ints: [3, 0, 0] } }), /tests feature 3, but its input has 1 features/],
    ['a softmax post-transform', () => legacy({ post_transform: 'SOFTMAX' }), /post_transform SOFTMAX/],
    ['a MAX aggregate', () => legacy({ aggregate_function: 'MAX' }), /combines trees by MAX/],
    ['several targets', () => legacy({ n_targets: 2 }), /predicts 2 targets at once/],
    ['an input computed by another node', () => legacy({}, { before: [{ op_type: 'Scaler', domain: 'ai.onnx.ml', input: ['x'], output: ['scaled'] }] }), /which a Scaler node computes/],
    ['a tensor with external data', () => bytesOf(ensembleModel('TreeEnsemble', { n_targets: 1, tree_roots: { ints: [0] }, nodes_featureids: { ints: [0] }, nodes_splits: { tensor: { dims: [1], data_type: DTYPE.FLOAT, data_location: 1 } }, nodes_modes: floatTensor([0], DTYPE.UINT8), nodes_truenodeids: { ints: [0] }, nodes_trueleafs: { ints: [1] }, nodes_falsenodeids: { ints: [1] }, nodes_falseleafs: { ints: [1] }, leaf_targetids: { ints: [0, 0] }, leaf_weights: floatTensor([1, 2]) }, { features: 1 })), /external file/],
    ['a tensor whose shape claims more values than it has', () => bytesOf(ensembleModel('TreeEnsemble', { n_targets: 1, tree_roots: { ints: [0] }, nodes_featureids: { ints: [0] }, nodes_splits: { tensor: { dims: [1e15], data_type: DTYPE.FLOAT, float_data: [0.5] } }, nodes_modes: floatTensor([0], DTYPE.UINT8), nodes_truenodeids: { ints: [0] }, nodes_trueleafs: { ints: [1] }, nodes_falsenodeids: { ints: [1] }, nodes_falseleafs: { ints: [1] }, leaf_targetids: { ints: [0, 0] }, leaf_weights: floatTensor([1, 2]) }, { features: 1 })), /shape \[1000000000000000\] but 1 values/],
    ['metadata that is not JSON', () => setMeta('copse.schema', '{"features": ['), /metadata copse.schema is not JSON/],
    ['metadata from a newer Copse', () => setMeta('copse.version', '9'), /metadata is version 9/],
    ['metadata with another feature count', () => setMeta('copse.schema', JSON.stringify({ ...forest.schema, features: forest.schema.features.slice(1) })), /describes 6 features, but the graph's input has 7/],
    ['metadata whose parameters the validator refuses', () => setMeta('copse.params', JSON.stringify({ ...forest.params, minLeaf: 0 })), /params\.minLeaf .*after converting it from ONNX, with its Copse metadata/],
  ];
  for (const [what, make, message] of refusals) {
    it(`refuses ${what} with a clear message`, () => {
      assert.throws(() => importOnnx(make(), 'bad.onnx'), (e: unknown) => isModelError(message)(e) && (e as Error).message.startsWith('bad.onnx'));
    });
  }

  it('refuses graphs nested inside attributes deeper than the decoder can follow, without crashing', () => {
    // ModelProto.graph (7) > GraphProto.node (1) > NodeProto.attribute (5) > AttributeProto.g (6) > ..., 50000 deep.
    const depth = 50000;
    const varint = (v: number, out?: number[]) => {
      let size = 0;
      do {
        const byte = v & 0x7f;
        v = Math.floor(v / 128);
        out?.push(v > 0 ? byte | 0x80 : byte);
        size++;
      } while (v > 0);
      return size;
    };
    const sizes: number[][] = [];
    let inner = 0;
    for (let d = 0; d < depth; d++) {
      const a = 1 + varint(inner) + inner;
      const n = 1 + varint(a) + a;
      const g = 1 + varint(n) + n;
      sizes.push([inner, a, n]);
      inner = g;
    }
    const bytes: number[] = [0x3a];
    varint(inner, bytes);
    for (let d = depth - 1; d >= 0; d--) {
      const [content, a, n] = sizes[d];
      bytes.push(0x0a);
      varint(n, bytes);
      bytes.push(0x2a);
      varint(a, bytes);
      bytes.push(0x32);
      varint(content, bytes);
    }
    assert.throws(() => importOnnx(Uint8Array.from(bytes), 'deep.onnx'), isModelError(/^deep\.onnx is not a valid ONNX file: it does not decode/));
  });

  it('refuses an opset-5 branch to a leaf that does not exist', () => {
    const bytes = bytesOf(ensembleModel('TreeEnsemble', { n_targets: 1, tree_roots: { ints: [0] }, nodes_featureids: { ints: [0] }, nodes_splits: floatTensor([0.5]), nodes_modes: floatTensor([0], DTYPE.UINT8), nodes_truenodeids: { ints: [5] }, nodes_trueleafs: { ints: [1] }, nodes_falsenodeids: { ints: [1] }, nodes_falseleafs: { ints: [1] }, leaf_targetids: { ints: [0, 0] }, leaf_weights: floatTensor([1, 2]) }, { features: 1 }));
    assert.throws(() => importOnnx(bytes), isModelError(/true branch is leaf 5, outside 0 to 1/));
  });

  it('keeps to its limits: bytes, nodes, trees, and what copying shared nodes would create', () => {
    assert.throws(() => importOnnx(small, 'm', { limits: { maxBytes: 100 } }), isModelError(/more than the limit of 100/));
    assert.throws(() => importOnnx(small, 'm', { limits: { maxNodes: 10 } }), isModelError(/node count .* limit of 10/));
    assert.throws(() => importOnnx(small, 'm', { limits: { maxTrees: 2 } }), isModelError(/tree count \(3\) is more than the limit of 2/));
    // 60 levels, each node's two branches to the next two nodes: 2^60 paths in 122 nodes.
    const levels = 60;
    const n = levels + 2;
    const modes = Array.from({ length: n }, (_, i) => (i < levels ? 'BRANCH_LEQ' : 'LEAF'));
    const bytes = legacy({
      nodes_treeids: { ints: modes.map(() => 0) },
      nodes_nodeids: { ints: modes.map((_, i) => i) },
      nodes_featureids: { ints: modes.map(() => 0) },
      nodes_values: { floats: modes.map((_, i) => i) },
      nodes_modes: { strings: modes },
      nodes_truenodeids: { ints: modes.map((_, i) => (i < levels ? i + 1 : 0)) },
      nodes_falsenodeids: { ints: modes.map((_, i) => (i < levels ? i + 2 : 0)) },
      target_treeids: { ints: [0, 0] },
      target_nodeids: { ints: [levels, levels + 1] },
    });
    assert.throws(() => importOnnx(bytes), isModelError(/converts to more than \d+ nodes/));
  });

  it('survives random damage: every flipped or cut file is either refused with a ModelError or scores', () => {
    const rnd = seedrandom('flips');
    const x = new Float64Array(forest.schema.features.length * 5).fill(1);
    let refused = 0;
    let read = 0;
    for (let trial = 0; trial < 400; trial++) {
      let bytes = small.slice();
      if (trial % 4 === 3) bytes = bytes.subarray(0, Math.floor(rnd() * bytes.length));
      else for (let k = 0; k < 1 + (trial % 3); k++) bytes[Math.floor(rnd() * bytes.length)] ^= 1 + Math.floor(rnd() * 255);
      let imported: Forest;
      try {
        imported = importOnnx(bytes, 'damaged.onnx');
      } catch (e) {
        assert.ok(e instanceof ModelError, `trial ${trial}: ${(e as Error).name}: ${(e as Error).message}`);
        refused++;
        continue;
      }
      read++;
      const p = imported.schema.features.length;
      const pred = predictEncoded(imported, x.subarray(0, p * 5), 5);
      assert.equal(pred.rows, 5);
      // What still reads is a valid model: it survives the model file's own validator.
      assert.ok(serializeModel(imported).length > 0);
    }
    assert.ok(refused > 100, `${refused} refused`);
    assert.ok(read + refused === 400);
  });

  it('reads a file from disk, and refuses one over the size limit before reading it', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'copse-onnx-'));
    const file = path.join(dir, 'm.onnx');
    writeFileSync(file, small);
    const imported = await loadOnnxFile(file);
    assert.equal(imported.forest.trees.length, 3);
    await assert.rejects(loadOnnxFile(file, { limits: { maxBytes: 64 } }), isModelError(/more than the limit of 64/));
    await assert.rejects(loadOnnxFile(path.join(dir, 'none.onnx')), isModelError(/Cannot read the model/));
  });
});
