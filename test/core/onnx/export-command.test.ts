// `copse export` as scripts use it: exit codes, one-sentence errors, the file it writes, the file it must not touch.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { readOnnx } from '../../../src/core/onnx/import';

const root = path.join(__dirname, '..', '..', '..', '..');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('copse export', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-export-'));
  const model = path.join(dir, 'kites.json');

  before(() => {
    const r = copse('fit', path.join(root, 'demo/kite-flights.csv'), '--target', 'outcome', '--trees', '8', '--no-importance', '--save', model, '--json');
    assert.equal(r.code, 0, r.stderr);
  });

  it('writes an ONNX file that reads back as the same forest, leaving no temporary file', () => {
    const out = path.join(dir, 'kites.onnx');
    const r = copse('export', model, out, '--json');
    assert.equal(r.code, 0, r.stderr);
    const summary = JSON.parse(r.stdout) as { operator: string; trees: number; outputs: string[]; input: { name: string; features: string[] }; bytes: number };
    assert.equal(summary.operator, 'TreeEnsembleClassifier');
    assert.equal(summary.trees, 8);
    assert.deepEqual(summary.outputs, ['label', 'probabilities']);
    assert.equal(summary.input.name, 'features');
    const bytes = readFileSync(out);
    assert.equal(summary.bytes, bytes.length);
    const back = readOnnx(bytes, out);
    assert.equal(back.forest.trees.length, 8);
    assert.deepEqual(back.forest.schema.features.map((f) => f.name), summary.input.features);
    assert.deepEqual(readdirSync(dir).sort(), ['kites.json', 'kites.onnx']);
  });

  it('says in its report how to give level columns', () => {
    const r = copse('export', model, path.join(dir, 'again.onnx'));
    assert.equal(r.code, 0, r.stderr);
    assert.match(r.stdout, /Give "sail", "frame", "night_flight" as level codes/);
  });

  it('refuses to write over the model, and leaves it untouched', () => {
    const before = readFileSync(model);
    const r = copse('export', model, model);
    assert.equal(r.code, 1);
    assert.match(r.stderr, /Refusing to write the ONNX file over the model/);
    assert.deepEqual(readFileSync(model), before);
  });

  it('explains usage mistakes with exit code 2, and help with 0', () => {
    const missing = copse('export', model);
    assert.equal(missing.code, 2);
    assert.match(missing.stderr, /takes 2 file arguments/);
    const onnxIn = copse('export', path.join(dir, 'kites.onnx'), path.join(dir, 'x.onnx'));
    assert.equal(onnxIn.code, 2);
    assert.match(onnxIn.stderr, /looks like an ONNX file already/);
    const help = copse('export', '--help');
    assert.equal(help.code, 0);
    assert.match(help.stdout, /^Usage: copse export MODEL\.json OUT\.onnx/);
  });

  it('reports a broken model file as a model error, exit code 1', () => {
    const r = copse('export', path.join(root, 'demo/kite-flights.csv'), path.join(dir, 'y.onnx'));
    assert.equal(r.code, 1);
    assert.match(r.stderr, /is not a valid Copse model/);
  });
});
