// The packaged bundles: every core worker sits next to the bundles that start it (core loads
// path.join(__dirname, '<name>-worker.js')), the host bundle needs nothing but vscode and Node, and the
// bundled CLI really fits through its bundled workers. Built into a scratch folder, not dist/.
import * as assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { builtinModules } from 'node:module';

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

  it('emits a bundle for every *-worker.ts in src/core', () => {
    const workers = builder.workerEntries().map((w) => path.basename(w, '.ts') + '.js');
    assert.ok(workers.includes('forest-worker.js') && workers.includes('score-worker.js'));
    for (const w of workers) assert.ok(fs.existsSync(path.join(out, w)), w);
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
