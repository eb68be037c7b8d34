// The packaged bundles: every core worker sits next to the bundles that start it (core loads
// path.join(__dirname, '<name>-worker.js')), the host bundle needs nothing but vscode and Node, and the
// bundled CLI really fits through its bundled workers. Built into a scratch folder, not dist/.
import * as assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { builtinModules } from 'node:module';
import { Worker } from 'node:worker_threads';
import { loadCsv } from '../../src/core/csv/load';
import { fitForest } from '../../src/core/forest/fit';
import { encodeTable } from '../../src/core/forest/predict';

const root = path.resolve(__dirname, '..', '..', '..');
// eslint-disable-next-line @typescript-eslint/no-require-imports
const builder = require(path.join(root, 'scripts', 'build.js')) as {
  build(o: { production?: boolean; outDir?: string; panel?: boolean; quiet?: boolean }): Promise<string[]>;
  workerEntries(): string[];
  drawIcon(size?: number): Buffer;
};

describe('extension bundles', function () {
  this.timeout(120_000);
  let out: string;
  before(async () => {
    out = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-bundle-'));
    await builder.build({ production: true, outDir: out, panel: false, quiet: true });
  });
  after(() => fs.rmSync(out, { recursive: true, force: true }));

  it('emits a bundle for every *-worker.ts in src/core and src/extension/workers', () => {
    const workers = builder.workerEntries().map((w) => path.basename(w, '.ts') + '.js');
    assert.ok(workers.includes('forest-worker.js') && workers.includes('score-worker.js') && workers.includes('explain-worker.js'));
    for (const w of workers) assert.ok(fs.existsSync(path.join(out, w)), w);
  });

  it('runs the bundled explanation thread as the extension starts it', async () => {
    const load = await loadCsv(path.join(root, 'test', 'fixtures', 'open', 'iris.csv'));
    const { forest } = await fitForest(load.table, { target: 'species', params: { trees: 5, seed: 1 }, workers: 1 });
    const x = encodeTable(forest.schema, load.table);
    const worker = new Worker(path.join(out, 'explain-worker.js'));
    try {
      worker.postMessage({ setup: { forest, trainX: x, trainCount: 150, quantiles: null } });
      worker.postMessage({ id: 7, request: { kind: 'contributions', x: x.slice(0, 4), rows: 1 } });
      const reply = await new Promise<{ id: number; ok: boolean; result: { values: Float64Array } }>((resolve, reject) => {
        worker.once('message', resolve);
        worker.once('error', reject);
      });
      assert.equal(reply.id, 7);
      assert.equal(reply.ok, true);
      assert.equal(reply.result.values.length, 4 * 3);
    } finally {
      await worker.terminate();
    }
  });

  it('keeps vscode external and requires nothing else outside Node', () => {
    const code = fs.readFileSync(path.join(out, 'extension.js'), 'utf8');
    const required = new Set([...code.matchAll(/require\("([^"]+)"\)/g)].map((m) => m[1]));
    assert.ok(required.has('vscode'));
    const builtins = new Set(builtinModules.flatMap((m) => [m, `node:${m}`]));
    for (const r of required) assert.ok(r === 'vscode' || builtins.has(r), `unexpected runtime require: ${r}`);
  });

  it('runs the bundled CLI, which grows trees in the bundled worker', () => {
    const csv = path.join(root, 'test', 'fixtures', 'open', 'iris.csv');
    const text = execFileSync(process.execPath, [path.join(out, 'cli.js'), 'fit', csv, '--target', 'species', '--trees', '10'], { encoding: 'utf8', cwd: os.tmpdir() });
    assert.match(text, /Fitted 10 trees on 150 rows/);
  });

  it('draws a 128-pixel PNG icon', () => {
    const png = fs.readFileSync(path.join(out, 'icon.png'));
    assert.deepEqual([...png.subarray(0, 8)], [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    assert.equal(png.readUInt32BE(16), 128);
    assert.equal(png.readUInt32BE(20), 128);
  });
});
