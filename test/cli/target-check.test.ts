// A target no one can mean: core's rule (src/core/checks/target.ts) and `copse fit` refusing in one sentence,
// unless --many-classes insists; and the report's confusion table, capped to the largest classes.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { targetDoubt } from '../../src/core/checks/target';
import type { Column } from '../../src/core/data/table';

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');
const loaves = path.join(root, 'demo/loaf-rise.csv');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

const numeric = (name: string, values: number[]): Column => ({ name, kind: 'numeric', values: Float64Array.from(values) });
function levels(name: string, cells: string[]): Column {
  const levelsSeen = [...new Set(cells.filter((c) => c !== ''))];
  return { name, kind: 'categorical', levels: levelsSeen, codes: Int32Array.from(cells, (c) => (c === '' ? -1 : levelsSeen.indexOf(c))) };
}
const range = (n: number, from = 1) => Array.from({ length: n }, (_, i) => i + from);

describe('targets that cannot be meant', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-target-'));

  describe('the rule in core', () => {
    it('calls a text column with a different value on every row an identifier', () => {
      const d = targetDoubt(levels('code', range(40).map((i) => `K-${i}`)));
      assert.equal(d?.kind, 'identifier');
      assert.match(d.message, /'code' looks like a row identifier: each of its 40 rows/);
    });

    it('calls a numeric run 1..n an identifier, but not measurements that never repeat', () => {
      assert.equal(targetDoubt(numeric('id', range(200, 1001)), 'regression')?.kind, 'identifier');
      assert.equal(targetDoubt(numeric('price', range(200).map((i) => i * 7 + 1000)), 'regression'), undefined);
      assert.equal(targetDoubt(numeric('height', range(200).map((i) => i + 0.5)), 'regression'), undefined);
    });

    it('refuses more than 50 classes, or more than 10 with fewer than five rows each, and leaves small tables alone', () => {
      const cells = (k: number, n: number) => range(n).map((i) => `c${i % k}`);
      assert.equal(targetDoubt(levels('y', cells(51, 5100)))?.kind, 'many-classes');
      assert.equal(targetDoubt(levels('y', cells(50, 5000))), undefined);
      assert.equal(targetDoubt(levels('y', cells(20, 99)))?.kind, 'many-classes');
      assert.equal(targetDoubt(levels('y', cells(20, 100))), undefined);
      assert.equal(targetDoubt(levels('y', cells(3, 8))), undefined, 'a toy table with three labels');
      assert.equal(targetDoubt(levels('y', range(10).map(String))), undefined, 'ten rows, ten labels: too few to judge');
      // Many values are fine for regression, and counted as classes only when the task is classification.
      assert.equal(targetDoubt(numeric('age', range(900).map((i) => 18 + (i % 70))), 'regression'), undefined);
      assert.equal(targetDoubt(numeric('age', range(900).map((i) => 18 + (i % 70))), 'classification')?.kind, 'many-classes');
    });

    it('counts only cells with a value', () => {
      const cells = range(30).map((i) => (i % 2 ? `v${i}` : ''));
      assert.equal(targetDoubt(levels('y', cells))?.kind, 'identifier');
    });
  });

  describe('copse fit', () => {
    it('refuses the demo file\'s identifier column as the target, in one sentence with exit code 2', () => {
      const r = copse('fit', kites, '--target', 'flight_id');
      assert.equal(r.code, 2);
      assert.match(r.stderr, /^copse fit: 'flight_id' looks like a row identifier: each of its 3,000 rows has a different value, so there is nothing to learn; choose another --target\.\n/);
      assert.doesNotMatch(r.stderr, /\n\s+at /);
    });

    it('refuses a numeric column read as too many classes, naming --task regression and --many-classes', () => {
      const r = copse('fit', kites, '--target', 'flyer_age', '--task', 'classification');
      assert.equal(r.code, 2);
      assert.match(r.stderr, /'flyer_age' has \d+ distinct values in 3,000 rows, too many classes to learn \(more than 50\); .*--task regression.*--many-classes/);
    });

    it('fits with --many-classes, and the report shows the 12 largest classes with an "other" column', () => {
      const file = path.join(dir, 'many.csv');
      // 60 classes of unequal size: class k has 5 + k rows, so the largest twelve are c48..c59.
      let csv = 'x,z,label\n';
      for (let k = 0; k < 60; k++) for (let i = 0; i < 5 + k; i++) csv += `${k + (i % 3) * 0.1},${i % 7},c${k}\n`;
      writeFileSync(file, csv);
      const refused = copse('fit', file, '--target', 'label', '--trees', '5');
      assert.equal(refused.code, 2);
      assert.match(refused.stderr, /60 distinct values in 2,070 rows, too many classes to learn \(more than 50\)/);
      // 40 trees leave every row out of some tree's draw, so each class's out-of-bag rows are all its rows.
      const r = copse('fit', file, '--target', 'label', '--trees', '40', '--many-classes', '--no-importance');
      assert.equal(r.code, 0, r.stderr);
      const at = r.stdout.indexOf('Out-of-bag confusion');
      const head = r.stdout.slice(at).split('\n');
      assert.match(head[0], /the 12 of 60 classes with the most rows; the other 48 \(\d+ rows\) are left out/);
      const columns = head[1].trim().split(/\s+/);
      assert.deepEqual(columns, [...range(12, 48).map((k) => `c${k}`), 'other']);
      const body = head.slice(2, 14).map((l) => l.trim().split(/\s+/));
      assert.deepEqual(body.map((b) => b[0]), range(12, 48).map((k) => `c${k}`));
      // Each row still adds up to its class's rows: predictions of the classes left out are gathered, not dropped.
      for (const b of body) assert.equal(b.slice(1).map(Number).reduce((a, c) => a + c, 0), 5 + Number(b[0].slice(1)));
      assert.equal(head[14], '');
    });

    it('takes a regression target whose values all differ', () => {
      const r = copse('fit', loaves, '--target', 'rise_mm', '--trees', '5', '--no-importance', '--json');
      assert.equal(r.code, 0, r.stderr);
    });
  });
});
