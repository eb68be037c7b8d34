import * as assert from 'node:assert/strict';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { fitForest } from '../../src/core/forest/fit';
import type { Forest } from '../../src/core/forest/forest';
import { encodeTable, predictTable } from '../../src/core/forest/predict';
import { Scorer } from '../../src/core/forest/scorer';
import { sharedForest } from '../../src/core/forest/shared';
import { loadModel, ModelError, parseModel, saveModel, serializeModel } from '../../src/core/model/file';
import { threeClass } from './helpers/synthetic';

describe('model file', () => {
  let forest: Forest;
  let text: string;
  const table = threeClass(300);
  before(async () => {
    forest = (await fitForest(table, { target: 'label', params: { trees: 6 }, workers: 2, fingerprint: 'abc' })).forest;
    text = serializeModel(forest);
  });

  it('round-trips: the loaded forest predicts exactly as the fitted one', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'copse-model-'));
    const file = path.join(dir, 'm.json');
    await saveModel(file, forest);
    assert.deepEqual(readdirSync(dir), ['m.json'], 'no temporary file is left behind');
    const back = await loadModel(file);
    assert.equal(serializeModel(back), text);
    const a = predictTable(forest, table);
    const b = predictTable(back, table);
    assert.deepEqual(a.proba, b.proba);
    assert.equal(back.training.fingerprint, 'abc');
  });

  it('names its format and version on its first line, then holds one tree per line', () => {
    const lines = text.trimEnd().split('\n');
    const head = JSON.parse(lines[0]) as { format: unknown; version: unknown; trees: unknown };
    assert.equal(head.format, 'copse-forest');
    assert.equal(head.version, 2);
    assert.equal(head.trees, 6);
    assert.equal(lines.length, 7);
    assert.equal((JSON.parse(lines[1]) as { nodes: unknown }).nodes, forest.trees[0].nodeCount);
  });

  /** A tree or the head as loose JSON, so the cases below can break them in ways the real types would not allow. */
  type Loose = Record<string, unknown>;
  type LooseTree = Record<string, unknown[]>;
  type LooseDoc = Loose & { params: Loose; trees: LooseTree[] };

  /** The file as one document (version 1's layout): what the cases below edit. */
  const whole = (): LooseDoc => {
    const [head, ...trees] = text.trimEnd().split('\n').map((l) => JSON.parse(l) as Loose);
    return { ...head, params: head.params as Loose, trees: trees as LooseTree[] };
  };
  const lines = (doc: LooseDoc) => {
    const { trees, ...head } = doc;
    return [JSON.stringify({ ...head, trees: 6 }), ...trees.map((t) => JSON.stringify(t))].join('\n');
  };
  const mutate = (f: (doc: LooseDoc) => void) => {
    const doc = whole();
    f(doc);
    return lines(doc);
  };

  it('still reads version 1 files, one JSON document with the trees inside', () => {
    const v1 = JSON.stringify({ ...whole(), version: 1 });
    assert.equal(serializeModel(parseModel(v1)), text);
  });

  const refusals: Array<[string, () => string, RegExp]> = [
    ['a truncated file', () => text.slice(0, text.length / 2), /not complete JSON/],
    ['another format', () => mutate((d) => (d.format = 'something-else')), /format should be "copse-forest"/],
    ['a newer version', () => mutate((d) => (d.version = 99)), /newer Copse/],
    ['a child index out of range', () => mutate((d) => (d.trees[0].left[0] = 1e6)), /trees\[0\]\.left\[0\]/],
    ['a cycle (child before parent)', () => mutate((d) => {
      const t = d.trees[0];
      const c = t.left[0] as number;
      t.left[c] = 0;
      t.right[c] = 0;
      t.feature[c] = 0;
    }), /does not come after it|more than one parent/],
    ['a feature index out of range', () => mutate((d) => (d.trees[0].feature[0] = 500)), /feature\[0\]/],
    ['a wrong array length', () => mutate((d) => d.trees[0].value.pop()), /value should have/],
    ['a non-numeric threshold', () => mutate((d) => (d.trees[0].threshold[0] = 'x')), /threshold\[0\]/],
    ['fewer trees than it says', () => mutate((d) => d.trees.pop()), /announces 6 trees but holds 5/],
    ['more trees than it says', () => mutate((d) => d.trees.push(d.trees[0])), /line 8 comes after the last tree/],
    ['a tree count other than its settings', () => lines(whole()).replace(/"trees":6}\n/, '"trees":5}\n'), /trees should be 6/],
    ['an empty file', () => '', /it is empty/],
    ['a version 1 file with fewer trees', () => JSON.stringify({ ...whole(), version: 1, trees: whole().trees.slice(1) }), /trees should have 6 entries/],
    ['a missing schema', () => mutate((d) => delete d.schema), /schema is missing/],
    ['out-of-range parameters', () => mutate((d) => (d.params.minLeaf = 0)), /params\.minLeaf/],
    ['a task that disagrees with its target', () => mutate((d) => (d.params.task = 'regression')), /criterion|task/],
  ];
  for (const [what, make, message] of refusals) {
    it(`refuses ${what} with a clear message`, () => {
      assert.throws(() => parseModel(make(), 'm.json'), (e: Error) => e instanceof ModelError && message.test(e.message) && e.message.startsWith('m.json'));
    });
  }

  it('loads trees into shared memory, so scoring threads read them without a copy each', async () => {
    const back = parseModel(text);
    for (const t of back.trees) for (const a of [t.left, t.right, t.feature, t.threshold, t.missingLeft, t.value, t.cover, t.catBits]) assert.ok(a.buffer instanceof SharedArrayBuffer);
    assert.equal(sharedForest(back), back, 'already shared: no copy');
    const copy = sharedForest(forest);
    assert.notEqual(copy, forest);
    assert.equal(sharedForest(forest), copy, 'a fitted forest is copied once');
    assert.ok(copy.trees[0].left.buffer instanceof SharedArrayBuffer);
    const scorer = new Scorer(back);
    try {
      const x = encodeTable(forest.schema, table);
      assert.deepEqual((await scorer.predict(x, table.rowCount)).proba, predictTable(forest, table).proba);
    } finally {
      await scorer.dispose();
    }
  });

  it('treats keys such as __proto__ as plain data', () => {
    const hostile = text.replace('{"format"', '{"__proto__":{"polluted":true},"constructor":{"prototype":{"polluted":true}},"format"');
    const back = parseModel(hostile);
    assert.equal(({} as Record<string, unknown>).polluted, undefined);
    assert.equal(Object.getPrototypeOf(back), Object.prototype);
    assert.equal(serializeModel(back), text);
  });

  it('leaves an existing model untouched when a save fails', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'copse-model-'));
    const file = path.join(dir, 'm.json');
    writeFileSync(file, 'old');
    const broken = { ...forest, trees: [{ ...forest.trees[0], left: { length: 1, [Symbol.iterator]: () => { throw new Error('disk full'); } } }] } as unknown as Forest;
    await assert.rejects(saveModel(file, broken));
    assert.equal(readFileSync(file, 'utf8'), 'old');
    assert.deepEqual(readdirSync(dir), ['m.json']);
  });
});
