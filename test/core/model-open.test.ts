// Opening either kind of model file, reading a header alone, and counting covers from data.
import * as assert from 'node:assert/strict';
import { copyFileSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { readHeader } from '../../src/core/csv/header';
import { withCoverFrom } from '../../src/core/forest/cover';
import { fitForest } from '../../src/core/forest/fit';
import { encodeTable } from '../../src/core/forest/predict';
import { parseModel, saveModel, serializeModel } from '../../src/core/model/file';
import { isOnnxFile, knowsTraining, nameByPosition, openModelFile } from '../../src/core/open/open';
import { exportOnnx } from '../../src/core/onnx/export';
import { threeClass } from './helpers/synthetic';

const root = path.join(__dirname, '..', '..', '..');
const sklearnIris = path.join(root, 'test/core/onnx/fixtures/sklearn-iris.onnx');

describe('opening model files', () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-open-'));
  const table = threeClass(300);

  it('tells ONNX from a Copse model by the name, or by the first byte when the name says nothing', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 4, seed: 5 }, workers: 1, permutationImportance: false });
    const json = path.join(dir, 'model.bin');
    await saveModel(json, rep.forest);
    const onnx = path.join(dir, 'exported.bin');
    writeFileSync(onnx, exportOnnx(rep.forest));
    assert.equal(await isOnnxFile(json), false);
    assert.equal(await isOnnxFile(onnx), true);
    const a = await openModelFile(json);
    const b = await openModelFile(onnx);
    assert.equal(a.origin.kind, 'copse');
    assert.equal(b.origin.kind, 'onnx');
    assert.ok(b.origin.kind === 'onnx' && b.origin.names === 'metadata');
    assert.deepEqual(b.forest.schema, a.forest.schema);
    assert.ok(knowsTraining(a.forest) && knowsTraining(b.forest));
  });

  it('a forest from elsewhere has no training sample, and still saves and loads as a Copse model', async () => {
    const copy = path.join(dir, 'sk.onnx');
    copyFileSync(sklearnIris, copy);
    const { forest, origin } = await openModelFile(copy);
    assert.ok(origin.kind === 'onnx' && origin.names === 'positions');
    assert.equal(knowsTraining(forest), false);
    const named = nameByPosition(forest, ['sepal_length', 'sepal_width', 'petal_length', 'petal_width', 'species'], ['species']);
    assert.deepEqual(named.schema.features.map((f) => f.name), ['sepal_length', 'sepal_width', 'petal_length', 'petal_width']);
    const back = parseModel(serializeModel(named));
    assert.equal(back.training.rows, 0);
    assert.equal(serializeModel(back), serializeModel(named));
    assert.throws(() => nameByPosition(forest, ['a', 'b', 'c']), /reads 4 features by position, but the file has 3 columns/);
  });

  it('reads a header alone: delimiter sniffed, byte-order mark and quotes dropped, names trimmed', async () => {
    const file = path.join(dir, 'semi.csv');
    writeFileSync(file, '\ufeff"first; name" ; age ;city\n"a;b";3;x\n"c";4;y\n');
    assert.deepEqual(await readHeader(file), { header: ['first; name', 'age', 'city'], delimiter: ';' });
    const empty = path.join(dir, 'empty.csv');
    writeFileSync(empty, '');
    await assert.rejects(readHeader(empty), /no header line/);
  });

  it('counts covers from data: on the training rows of a forest that drew every row once, they are its own covers', async () => {
    const rep = await fitForest(table, { target: 'label', params: { trees: 5, replace: false, sampleFraction: 1 }, workers: 1, permutationImportance: false });
    const x = encodeTable(rep.forest.schema, table);
    const counted = withCoverFrom(rep.forest, x, table.rowCount);
    counted.trees.forEach((tree, t) => assert.deepEqual(tree.cover, rep.forest.trees[t].cover, `tree ${t}`));
    // On half the rows the root holds half of them, and every split's two sides add up to it.
    const half = withCoverFrom(rep.forest, x.subarray(0, 150 * rep.forest.schema.features.length), 150);
    for (const tree of half.trees) {
      assert.equal(tree.cover[0], 150);
      for (let node = 0; node < tree.nodeCount; node++) {
        if (tree.left[node] >= 0) assert.equal(tree.cover[tree.left[node]] + tree.cover[tree.right[node]], tree.cover[node]);
      }
    }
  });
});
