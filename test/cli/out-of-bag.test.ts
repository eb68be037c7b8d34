// Scoring a forest's own training file: votes and predict lead with what the trees that never drew a row say,
// and those answers are the very ones the fit scored itself with (same trees, same rows), so they must agree
// with `copse fit --json` exactly, not approximately.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { ClassVoteRow, FitJson, PredictJson, ValueVoteRow, VotesJson } from './output';

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');
const loaves = path.join(root, 'demo/loaf-rise.csv');
// The rows scripts/make-demo-data.js recorded wrong on purpose, with the label it generated first.
const planted = JSON.parse(readFileSync(path.join(root, 'demo/kite-flights.label-errors.json'), 'utf8')) as {
  errors: Array<{ row: number; recorded: string; generated: string }>;
};

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function json<T>(...args: string[]): T {
  const r = copse(...args, '--json');
  assert.equal(r.code, 0, r.stderr);
  return JSON.parse(r.stdout) as T;
}

/** A group's answer, which the row asked about must have. */
function present<T>(group: T | null | undefined, what: string): T {
  assert.ok(group, what);
  return group;
}

/** The demo files have no quoted fields, so a split on commas reads them. */
function readCsv(file: string): Array<Record<string, string>> {
  const [head, ...lines] = readFileSync(file, 'utf8').trim().split('\n');
  const names = head.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((c, j) => [names[j], c])));
}

describe('copse on a forest\'s own training file', function () {
  this.timeout(180000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-oob-'));
  const model = path.join(dir, 'kites.json');
  let fit: FitJson;
  const row35 = planted.errors.find((e) => e.row === 35)!;

  before(() => {
    fit = json<FitJson>('fit', kites, '--target', 'outcome', '--save', model, '--list', 'all');
  });

  it('votes leads row 35 with the out-of-bag vote for the class it was generated with, not its recorded label', () => {
    assert.deepEqual([row35.recorded, row35.generated], ['crashed', 'soared']);
    const v = json<VotesJson<ClassVoteRow>>('votes', model, kites, '--rows', '35');
    const r = v.rows[0];
    const oob = present(r.outOfBag, 'row 35 has an out-of-bag answer');
    assert.equal(r.role, 'training');
    assert.equal(r.label, 'crashed');
    assert.equal(r.lead, 'out-of-bag');
    assert.equal(oob.prediction, 'soared');
    // The top-level keys keep all the trees' answer; most of them drew row 35 and repeat its recorded label.
    assert.equal(r.prediction, r.allTrees.prediction);
    assert.ok(oob.trees > 0 && oob.trees < 100, `out-of-bag trees ${oob.trees}`);
    assert.equal(Object.values(oob.counts).reduce((a, b) => a + b, 0), oob.trees);
    assert.equal(r.allTrees.trees, 100);
    // Every out-of-bag tree is also among all trees, so no class can have more out-of-bag votes than votes.
    for (const c of Object.keys(r.allTrees.counts)) assert.ok(oob.counts[c] <= r.allTrees.counts[c]);
    // The fit doubts the same row with the same margin: the same trees, the same draws.
    const doubt = fit.suspects.find((s) => s.row === 35);
    assert.ok(doubt, 'the fit lists row 35 among the rows it doubts');
    assert.equal(doubt.oobPredicted, 'soared');
    assert.equal(r.margin, doubt.margin);
  });

  it('votes prints the out-of-bag answer first, and the all-trees one as including trees fitted on the row', () => {
    const r = copse('votes', model, kites, '--rows', '35');
    assert.equal(r.code, 0, r.stderr);
    const lines = r.stdout.trim().split('\n');
    assert.match(lines[0], /^Row 35 \(line 36\), a training row, labelled "crashed":$/);
    assert.match(lines[1], /^ {2}out-of-bag, the \d+ trees that never drew this row: "soared" \(probability 0\.\d\d\)/);
    assert.match(lines[2], /^ {2}all 100 trees, including the \d+ fitted on this row: /);
  });

  it('predict adds out-of-bag columns whose accuracy over the file is the fit\'s out-of-bag accuracy, exactly', () => {
    const out = path.join(dir, 'scored.csv');
    const r = copse('predict', model, kites, '--out', out);
    assert.equal(r.code, 0, r.stderr);
    assert.match(r.stderr, /is the file this forest was fitted on.*oob_ columns/);
    const rows = readCsv(out);
    assert.equal(rows[34].outcome, 'crashed');
    assert.equal(rows[34].oob_predicted_outcome, 'soared');
    assert.equal(rows[34].row_role, 'training');
    let scored = 0;
    let right = 0;
    for (const row of rows) {
      if (Number(row.oob_trees) === 0) continue;
      scored++;
      if (row.oob_predicted_outcome === row.outcome) right++;
    }
    const fitOob = present(fit.oob, 'the fit has out-of-bag scores');
    assert.equal(scored, fitOob.rows);
    assert.equal(right / scored, fitOob.accuracy);
    const p = json<PredictJson>('predict', model, kites);
    const predictOob = present(p.outOfBag, 'predict scores the training file out-of-bag');
    assert.equal(predictOob.accuracy, fitOob.accuracy);
    assert.equal(predictOob.logLoss, fitOob.logLoss);
    assert.deepEqual(predictOob.confusion, fitOob.confusion);
  });

  it('a regression forest\'s out-of-bag values on its training file score as the fit did', () => {
    const reg = path.join(dir, 'loaves.json');
    const f = json<FitJson>('fit', loaves, '--target', 'rise_mm', '--trees', '40', '--save', reg);
    const p = json<PredictJson>('predict', reg, loaves);
    assert.equal(p.outOfBag?.r2, f.oob?.r2);
    assert.equal(p.outOfBag?.mae, f.oob?.mae);
    const s = f.suspects[0];
    const v = json<VotesJson<ValueVoteRow>>('votes', reg, loaves, '--rows', String(s.row));
    assert.equal(v.rows[0].outOfBag?.prediction, s.oobPredicted);
    assert.equal(v.rows[0].label, s.label);
  });

  it('a held-out row is marked holdout and has no out-of-bag part; training rows still have one', () => {
    const held = path.join(dir, 'held.json');
    const f = json<FitJson>('fit', kites, '--target', 'outcome', '--trees', '30', '--seed', '5', '--holdout', '0.2', '--save', held);
    const p = json<PredictJson>('predict', held, kites);
    const roles = p.predictions.map((r) => r.row_role);
    assert.equal(roles.filter((x) => x === 'holdout').length, f.test?.rows);
    assert.equal(roles.filter((x) => x === 'training').length, f.rows);
    assert.equal(p.outOfBag?.accuracy, f.oob?.accuracy);
    const heldRow = present(p.predictions.find((r) => r.row_role === 'holdout'), 'a held-out row');
    assert.equal(heldRow.oob_predicted_outcome, null);
    const trainRow = present(p.predictions.find((r) => r.row_role === 'training'), 'a training row');
    const v = json<VotesJson<ClassVoteRow>>('votes', held, kites, '--rows', `${heldRow.row},${trainRow.row}`);
    assert.equal(v.rows[0].role, 'holdout');
    assert.equal(v.rows[0].lead, 'all-trees');
    assert.equal(v.rows[0].outOfBag, undefined);
    assert.equal(v.rows[0].prediction, v.rows[0].allTrees.prediction);
    assert.equal(v.rows[1].role, 'training');
    assert.ok(v.rows[1].outOfBag);
    const text = copse('votes', held, kites, '--rows', String(heldRow.row)).stdout;
    assert.match(text, /held out of training/);
    assert.doesNotMatch(text, /out-of-bag/);
  });

  it('says so, and adds no out-of-bag part, when the training file cannot give back the fit\'s rows', () => {
    // A fit on a sample of the file trained on rows the whole file cannot tell apart.
    const sampled = path.join(dir, 'sampled.json');
    json<FitJson>('fit', kites, '--target', 'outcome', '--trees', '10', '--sample-rows', '2000', '--save', sampled);
    const p = json<PredictJson>('predict', sampled, kites);
    assert.ok(!p.columns.some((c) => c.startsWith('oob_')), p.columns.join(','));
    assert.match(p.warnings.join(' '), /is the file this forest was fitted on, but which trees drew each row cannot be told for certain: .*2000/);
    const v = copse('votes', sampled, kites, '--rows', '35');
    assert.equal(v.code, 0, v.stderr);
    assert.match(v.stderr, /cannot be told for certain/);
    assert.doesNotMatch(v.stdout, /out-of-bag/);
  });

  it('another file gets no out-of-bag part, even with the same rows in it', () => {
    const some = path.join(dir, 'some-flights.csv');
    writeFileSync(some, readFileSync(kites, 'utf8').split('\n').slice(0, 101).join('\n') + '\n');
    const p = json<PredictJson>('predict', model, some);
    assert.ok(!p.columns.some((c) => c.startsWith('oob_')), p.columns.join(','));
    assert.equal(p.outOfBag, null);
    const v = json<VotesJson<ClassVoteRow>>('votes', model, some, '--rows', '35');
    assert.equal(v.rows[0].role, 'other');
    assert.equal(v.rows[0].label, 'crashed');
    assert.equal(v.rows[0].outOfBag, undefined);
  });
});
