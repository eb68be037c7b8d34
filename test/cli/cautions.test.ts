// `copse fit` reports the same cautions the editor shows: a column that copies the target, a rare class.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { FitJson } from './output';

const root = path.join(__dirname, '..', '..', '..');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** A seeded linear congruential stream, so the files are the same on every run. */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
}

describe('copse fit: cautions', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-cautions-'));

  it('names a column that nearly copies the target, in the JSON and the readable report', () => {
    const random = lcg(11);
    const lines = ['width,height,refund_code,outcome'];
    for (let i = 0; i < 600; i++) {
      const w = random() * 10;
      const h = random() * 10;
      const outcome = w + h + random() * 4 > 12 ? 'kept' : 'returned';
      // The refund code is written after the outcome is known: it restates it, but for 1 row in 200.
      const code = (outcome === 'returned') !== (i % 200 === 7) ? 'R' + (i % 3) : 'N' + (i % 3);
      lines.push(`${w.toFixed(2)},${h.toFixed(2)},${code},${outcome}`);
    }
    const file = path.join(dir, 'leak.csv');
    writeFileSync(file, lines.join('\n') + '\n');
    const json = copse('fit', file, '--target', 'outcome', '--trees', '40', '--json');
    assert.equal(json.code, 0, json.stderr);
    const cautions = (JSON.parse(json.stdout) as FitJson).cautions;
    const leak = cautions.filter((c) => c.kind === 'leakage');
    assert.deepEqual(leak.map((c) => c.column), ['refund_code']);
    assert.ok(!cautions.some((c) => c.column === 'width' || c.column === 'height'), JSON.stringify(cautions));
    const text = copse('fit', file, '--target', 'outcome', '--trees', '40');
    assert.equal(text.code, 0, text.stderr);
    assert.match(text.stdout, /Cautions:[\s\S]*"refund_code"/);
  });

  it('flags a 97/3 class split as imbalance, and a balanced one not', () => {
    const make = (name: string, rare: number) => {
      const random = lcg(5);
      const lines = ['a,b,label'];
      for (let i = 0; i < 1000; i++) lines.push(`${random().toFixed(3)},${random().toFixed(3)},${i % 100 < rare ? 'fault' : 'ok'}`);
      const file = path.join(dir, name);
      writeFileSync(file, lines.join('\n') + '\n');
      const r = copse('fit', file, '--target', 'label', '--trees', '20', '--json');
      assert.equal(r.code, 0, r.stderr);
      return (JSON.parse(r.stdout) as FitJson).cautions.filter((c) => c.kind === 'imbalance');
    };
    const skewed = make('skewed.csv', 3);
    assert.equal(skewed.length, 1);
    assert.match(skewed[0].message, /"fault" is 3\.0% of training rows \(30 of 1000\)/);
    assert.equal(make('even.csv', 50).length, 0);
  });
});
