// The scoring commands on XGBoost JSON models, checked against XGBoost 1.7.4 itself (the answers
// scripts/xgboost_reference.py recorded beside each model in test/fixtures/xgboost/).
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { Expected } from '../core/xgboost/helpers';

const root = path.join(__dirname, '..', '..', '..');
const fixtures = path.join(root, 'test/fixtures/xgboost');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function json<T>(...args: string[]): T {
  const r = copse(...args, '--json');
  assert.equal(r.code, 0, r.stderr);
  return JSON.parse(r.stdout) as T;
}

function expected(name: string): Expected {
  return JSON.parse(readFileSync(path.join(fixtures, `${name}.expected.json`), 'utf8')) as Expected;
}

const model = (name: string) => path.join(fixtures, `${name}.model.json`);
const ROWS = Array.from({ length: 12 }, (_, i) => 1 + i * 9);

describe('copse commands on XGBoost models (reference: XGBoost 1.7.4)', function () {
  this.timeout(120000);

  it('predict scores as XGBoost does: probabilities within 1e-4, values within 1e-4 relative, no tree agreement column', () => {
    const bin = expected('binary');
    const out = json<{ columns: string[]; predictions: Array<Record<string, number>> }>('predict', model('binary'), path.join(root, bin.csv));
    assert.deepEqual(out.columns, ['predicted_target', 'probability_0', 'probability_1']);
    out.predictions.forEach((r, i) => assert.ok(Math.abs(r.probability_1 - bin.predict[i][0]) <= 1e-4, `row ${i + 1}`));
    const multi = expected('multiclass');
    const m = json<{ predictions: Array<Record<string, number>> }>('predict', model('multiclass'), path.join(root, multi.csv));
    m.predictions.forEach((r, i) => [0, 1, 2].forEach((k) => assert.ok(Math.abs(r[`probability_${k}`] - multi.predict[i][k]) <= 1e-4, `row ${i + 1}`)));
    const gaps = expected('gaps');
    const g = json<{ columns: string[]; predictions: Array<Record<string, number>> }>('predict', model('gaps'), path.join(root, gaps.csv));
    assert.deepEqual(g.columns, ['predicted_target']);
    g.predictions.forEach((r, i) => assert.ok(Math.abs(r.predicted_target - gaps.predict[i][0]) <= 1e-4 * Math.abs(gaps.predict[i][0]), `row ${i + 1}`));
  });

  it('predict on a model without feature names takes the columns by position, and says it needs to', () => {
    const e = expected('softmax');
    const csv = path.join(root, e.csv);
    const refused = copse('predict', model('softmax'), csv);
    assert.notEqual(refused.code, 0);
    assert.match(refused.stderr, /names its 4 features by position .* add --by-position/);
    const out = json<{ predictions: Array<Record<string, string>> }>('predict', model('softmax'), csv, '--by-position', '--leave-out', 'species');
    out.predictions.forEach((r, i) => assert.equal(Number(r.predicted_target), e.predict[i][0], `row ${i + 1}`));
  });

  it('explain gives XGBoost pred_contribs within 1e-3 relative, in log-odds, adding up to the margin', () => {
    for (const name of ['binary', 'multiclass']) {
      const e = expected(name);
      const out = json<{ contributionsIn: string; features: string[]; rows: Array<{ base: Record<string, number>; contributions: Record<string, Record<string, number>>; rawScore: Record<string, number> }> }>(
        'explain', model(name), path.join(root, e.csv), '--rows', ROWS.join(','),
      );
      assert.equal(out.contributionsIn, name === 'binary' ? 'log-odds' : 'raw class score');
      out.rows.forEach((r, j) => {
        const i = ROWS[j] - 1;
        const lists = name === 'binary' ? [[1, e.contribs[i] as number[]] as const] : (e.contribs[i] as number[][]).map((c, k) => [k, c] as const);
        for (const [k, theirs] of lists) {
          const scale = Math.max(...theirs.map(Math.abs)) * 1e-3;
          out.features.forEach((f, q) => {
            const ours = r.contributions[String(k)][f];
            assert.ok(Math.abs(ours - theirs[q]) <= 1e-3 * Math.max(Math.abs(theirs[q]), scale), `${name} row ${i + 1} class ${k} ${f}: ${ours} vs ${theirs[q]}`);
          });
          assert.ok(Math.abs(r.base[String(k)] - theirs[theirs.length - 1]) <= 1e-3 * Math.abs(theirs[theirs.length - 1]) + 1e-6, `${name} bias`);
          const margin = e.margin[i][name === 'binary' ? 0 : k];
          assert.ok(Math.abs(r.rawScore[String(k)] - margin) <= 1e-4, `${name} row ${i + 1}: raw score ${r.rawScore[String(k)]} vs margin ${margin}`);
        }
      });
    }
  });

  it("votes shows each tree's raw output; the running total ends at XGBoost's margin", () => {
    const e = expected('forest');
    const out = json<{ kind: string; trees: number; rows: Array<{ trees: Array<{ raw: number; cumulative: number }>; rawScore: number }> }>(
      'votes', model('forest'), path.join(root, e.csv), '--rows', ROWS.join(','),
    );
    assert.equal(out.kind, 'boosted');
    assert.equal(out.trees, 12);
    out.rows.forEach((r, j) => {
      const margin = e.margin[ROWS[j] - 1][0];
      const last = r.trees[r.trees.length - 1].cumulative;
      assert.ok(Math.abs(last - margin) <= 1e-4 * Math.abs(margin), `row ${ROWS[j]}: ${last} vs ${margin}`);
      const sum = r.trees.reduce((s, t) => s + t.raw, 0);
      assert.ok(Math.abs(0.5 + sum - last) <= 1e-9 * Math.abs(last) + 1e-9, 'base 0.5 plus the raw outputs is the total');
    });
  });

  it('export writes an ONNX file that scores as the XGBoost model does', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'copse-cli-xgb-'));
    const onnx = path.join(dir, 'binary.onnx');
    const r = copse('export', model('binary'), onnx);
    assert.equal(r.code, 0, r.stderr);
    const bin = expected('binary');
    const out = json<{ predictions: Array<Record<string, number>> }>('predict', onnx, path.join(root, bin.csv));
    out.predictions.forEach((p, i) => assert.ok(Math.abs(p.probability_1 - bin.predict[i][0]) <= 1e-4, `row ${i + 1}: ${p.probability_1} vs ${bin.predict[i][0]}`));
  });
});
