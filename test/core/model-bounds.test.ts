// The model file's bounds (src/core/limits.ts): the reader refuses a line, a run of blank lines or a file past
// them in one sentence, and values in the precision they are stored in; the writer and the fit share the same
// constants, so what fit saves, predict loads.
import * as assert from 'node:assert/strict';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { Readable } from 'node:stream';
import { defaultParams, validateParams } from '../../src/core/forest/params';
import type { Forest } from '../../src/core/forest/forest';
import { MAX_TREES } from '../../src/core/limits';
import { loadModel, ModelError, parseModel, serializeModel } from '../../src/core/model/file';
import { boundedLines, modelFileLines } from '../../src/core/model/lines';
import { DEFAULT_LIMITS } from '../../src/core/onnx/import';
import type { FlatTree } from '../../src/core/tree/tree';

function stump(leafValue = 1): FlatTree {
  return {
    nodeCount: 3,
    left: Int32Array.from([1, -1, -1]),
    right: Int32Array.from([2, -1, -1]),
    feature: Int32Array.from([0, -1, -1]),
    threshold: Float64Array.from([0.5, 0, 0]),
    missingLeft: Uint8Array.from([0, 0, 0]),
    value: Float32Array.from([0, 0, leafValue]),
    cover: Float32Array.from([2, 1, 1]),
    catBits: new Uint32Array(0),
  };
}

function forest(overrides: Partial<Forest['params']> = {}): Forest {
  return {
    schema: { features: [{ name: 'x', kind: 'numeric', edges: [0.5], hadMissing: false, reference: 0 }], target: { name: 'y', task: 'regression' } },
    params: defaultParams('regression', { trees: 1, ...overrides }),
    training: { rows: 2, fingerprint: '', dropped: [] },
    trees: [stump()],
  };
}

async function collect(lines: AsyncIterable<string>): Promise<string[]> {
  const out: string[] = [];
  for await (const l of lines) out.push(l);
  return out;
}

const chunks = (...parts: string[]) => Readable.from(parts.map((p) => Buffer.from(p)));
const single = (e: unknown) => assert.ok(e instanceof ModelError && !e.message.includes('\n'), String(e));

describe('model file bounds', function () {
  this.timeout(60000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-bounds-'));

  it('splits lines across chunks, LF and CRLF, and keeps blank lines as empty ones', async () => {
    assert.deepEqual(await collect(boundedLines(chunks('ab', 'c\r\n\nde', 'f'), 'm')), ['abc', '', 'def']);
  });

  it('refuses a line past the bound as soon as it passes it, in one sentence naming the line', async () => {
    const bounds = { maxLineBytes: 10, maxBlankBytes: 100, maxFileBytes: 1000 };
    await assert.rejects(collect(boundedLines(chunks('short\n', '0123456789', 'ABC\n'), 'm.json', bounds)), (e) => {
      single(e);
      return /m\.json is not a valid Copse model: line 2 is longer than 10 bytes/.test((e as Error).message);
    });
  });

  it('refuses a run of blank lines past the bound instead of reading them for minutes', async () => {
    const bounds = { maxLineBytes: 10, maxBlankBytes: 50, maxFileBytes: 1000 };
    await assert.rejects(collect(boundedLines(chunks('x\n', '\n'.repeat(30), '  \r\n'.repeat(30)), 'm.json', bounds)), (e) => {
      single(e);
      return /more than 50 bytes of blank lines/.test((e as Error).message);
    });
  });

  it('refuses a file larger than the bound before reading it', async () => {
    const file = path.join(dir, 'big.json');
    writeFileSync(file, 'x'.repeat(2000));
    await assert.rejects(collect(modelFileLines(file, { maxLineBytes: 10, maxBlankBytes: 10, maxFileBytes: 1000 })), (e) => {
      single(e);
      return /has 2,000 bytes, more than the limit of 1,000 bytes/.test((e as Error).message);
    });
  });

  it('loads a model with a few blank lines and CRLF ends, as before', async () => {
    const file = path.join(dir, 'crlf.json');
    writeFileSync(file, serializeModel(forest()).replace(/\n/g, '\r\n') + '\r\n\r\n');
    const f = await loadModel(file);
    assert.equal(f.trees[0].value[2], 1);
  });

  it('checks leaf values and covers as float32, the precision they are stored in', () => {
    const text = serializeModel(forest()).replace('"value":[0,0,1]', '"value":[0,0,1e39]');
    assert.ok(text.includes('1e39'));
    assert.throws(() => parseModel(text), (e) => {
      single(e);
      return /trees\[0\]\.value\[2\] should be a number float32 holds/.test((e as Error).message);
    });
    // 3e38 is within float32's range and stays finite.
    assert.equal(parseModel(text.replace('1e39', '3e38')).trees[0].value[2], Math.fround(3e38));
    const cover = serializeModel(forest()).replace('"cover":[2,1,1]', '"cover":[2,1,4e38]');
    assert.throws(() => parseModel(cover), /cover\[2\] should be a number >= 0 that float32 holds/);
  });

  it('refuses a seed a double cannot hold exactly, in the file and in the parameters', () => {
    const text = serializeModel(forest()).replace('"seed":1', '"seed":9007199254740993');
    assert.throws(() => parseModel(text), /params\.seed should be a whole number/);
    assert.throws(() => validateParams(defaultParams('regression', { seed: 2 ** 53 })), /seed must be a whole number/);
    assert.doesNotThrow(() => parseModel(serializeModel(forest({ seed: Number.MAX_SAFE_INTEGER }))));
  });

  it('shares one tree limit between the fit, the model file and the ONNX reader', () => {
    assert.equal(DEFAULT_LIMITS.maxTrees, MAX_TREES);
    assert.throws(() => validateParams(defaultParams('regression', { trees: MAX_TREES + 1 })), /trees must be a whole number from 1 to 100000/);
    assert.doesNotThrow(() => validateParams(defaultParams('regression', { trees: MAX_TREES })));
    // A head announcing the most trees is read; one more is refused.
    const head = (trees: number) => serializeModel(forest()).split('\n')[0].replace(/"trees":1/g, `"trees":${trees}`);
    assert.throws(() => parseModel(head(MAX_TREES)), /announces 100000 trees but holds 0/);
    assert.throws(() => parseModel(head(MAX_TREES + 1)), /params\.trees should be a whole number from 1 to 100000/);
  });
});
