// `copse explain` on the forest's own training file: each training row explained over the trees that did not
// train on it. The built CLI is run on seeded data of our own (a holdout, and rows without a target, so file
// rows and training rows differ). Its printed numbers are checked three ways: additivity of the JSON (local
// accuracy, Lundberg et al. 2020), the out-of-bag scores `copse fit --json` reports (the fit's own out-of-bag
// fold, which walks binned rows with the draws the trees were grown on), and, for regression, the mean over
// out-of-bag trees of the per-tree values `copse votes --json` prints.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import seedrandom from 'seedrandom';
import { inBagCounts } from '../../src/core/forest/bootstrap';
import type { ForestParams } from '../../src/core/forest/params';
import { classificationScores, regressionScores } from '../../src/core/metrics/scores';
import type { ClassExplainedRow, ClassVoteRow, ExplainJson, FitJson, ValueExplainedRow, ValueVoteRow, VotesJson } from './output';

const root = path.join(__dirname, '..', '..', '..');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function json<T>(...args: string[]): T {
  const r = copse(...args);
  assert.equal(r.code, 0, r.stderr);
  return JSON.parse(r.stdout) as T;
}

/** The first line of a model file, as far as these checks read or change it. */
interface ModelHeadJson {
  params: ForestParams;
  training: { rows: number; heldOut?: number };
}

const N = 160;
/** Rows whose target cell is left empty: never trained on. */
const NO_TARGET = new Set([5, 40, 41, 99]);

/** Two numeric features, a categorical one and noise; a class label and a value, each missing on NO_TARGET rows. */
function writeData(file: string): void {
  const rng = seedrandom('explain-oob-cli');
  const lines = ['a,b,shade,noise,label,value'];
  for (let i = 0; i < N; i++) {
    const a = rng() * 4 - 2;
    const b = rng() * 2;
    const shade = ['pale', 'mid', 'deep'][Math.floor(rng() * 3)];
    const noise = rng();
    const s = a + (shade === 'deep' ? 0.9 : 0) + 0.5 * b * (a > 0 ? 1 : -1) + 0.5 * (rng() - 0.5);
    const label = s < -0.6 ? 'low' : s < 0.7 ? 'mid' : 'high';
    const missing = NO_TARGET.has(i);
    lines.push([a.toFixed(6), b.toFixed(6), shade, noise.toFixed(6), missing ? '' : label, missing ? '' : s.toFixed(6)].join(','));
  }
  writeFileSync(file, lines.join('\n') + '\n');
}

const allRows = Array.from({ length: N }, (_, i) => i + 1).join(',');
const sum = (o: Record<string, number>) => Object.values(o).reduce((a, b) => a + b, 0);

describe('copse explain over out-of-bag trees', function () {
  this.timeout(180000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-explain-oob-'));
  const data = path.join(dir, 'rows.csv');
  const classModel = path.join(dir, 'label.json');
  const valueModel = path.join(dir, 'value.json');
  let classFit: FitJson;
  let valueFit: FitJson;
  /** The fit's out-of-bag scores, which these fits have (every training row drew some out-of-bag tree). */
  const oobOf = (fit: FitJson) => {
    assert.ok(fit.oob, 'the fit reports out-of-bag scores');
    return fit.oob;
  };
  /** The file's cells by line number (1-based, the header on line 1). */
  let cellsOfLine: (line: number) => string[];
  /** Largest |base + sum of contributions - printed prediction| seen so far. */
  let worst = 0;

  before(() => {
    writeData(data);
    const lines = readFileSync(data, 'utf8').split('\n');
    cellsOfLine = (line) => lines[line - 1].split(',');
    classFit = json<FitJson>('fit', data, '--target', 'label', '--exclude', 'value', '--holdout', '0.2', '--trees', '25', '--seed', '4', '--no-importance', '--save', classModel, '--json');
    valueFit = json<FitJson>('fit', data, '--target', 'value', '--exclude', 'label', '--trees', '25', '--seed', '6', '--no-importance', '--save', valueModel, '--json');
  });

  it('classification: adds up to the out-of-bag probabilities, which score exactly as copse fit --json reports', () => {
    const out = json<ExplainJson<ClassExplainedRow>>('explain', classModel, data, '--rows', allRows, '--json');
    const T = out.trees;
    const classes = Object.keys(out.rows[0].probabilities);
    const truth: number[] = [];
    const proba: number[] = [];
    let training = 0;
    for (const row of out.rows) {
      for (const c of classes) worst = Math.max(worst, Math.abs(row.base[c] + sum(row.contributions[c]) - row.probabilities[c]));
      assert.ok(row.trees === 'out-of-bag' || row.trees === 'all');
      const label = cellsOfLine(row.line)[4];
      if (NO_TARGET.has(row.row - 1)) {
        // Never trained on: every tree is one that did not train on it.
        assert.deepEqual([row.trees, row.treeCount], ['out-of-bag', T], `row ${row.row}`);
        continue;
      }
      // Training rows have fewer trees than the forest; held-out rows have all of them.
      if (row.trees === 'out-of-bag' && row.treeCount < T) {
        training++;
        truth.push(classes.indexOf(label));
        proba.push(...classes.map((c) => row.probabilities[c]));
      }
    }
    assert.ok(worst < 1e-9, `largest gap ${worst}`);
    const fitOob = oobOf(classFit);
    assert.equal(training, fitOob.rows, 'one explained row per training row with an out-of-bag tree');
    const scores = classificationScores(truth, proba, classes);
    assert.equal(scores.kind, 'classification');
    assert.equal(scores.accuracy, fitOob.accuracy);
    assert.ok(Math.abs(scores.logLoss - fitOob.logLoss!) < 1e-9, `${scores.logLoss} vs ${fitOob.logLoss}`);
    assert.ok(Math.abs(scores.balancedAccuracy - fitOob.balancedAccuracy!) < 1e-12);
  });

  it('regression: equals the mean of the out-of-bag trees’ values that copse votes prints, and fit’s out-of-bag scores', () => {
    const out = json<ExplainJson<ValueExplainedRow>>('explain', valueModel, data, '--rows', allRows, '--json');
    const votes = json<VotesJson<ValueVoteRow>>('votes', valueModel, data, '--rows', allRows, '--json');
    const model = JSON.parse(readFileSync(valueModel, 'utf8').split('\n')[0]) as ModelHeadJson;
    const T = out.trees;
    // Training rows are the file's rows with a value, in file order (no holdout here); their draws come from the seed.
    const trainRows = Array.from({ length: N }, (_, i) => i).filter((i) => !NO_TARGET.has(i));
    const n = trainRows.length;
    assert.equal(model.training.rows, n);
    const inBag = inBagCounts(model.params, T, n);
    const truth: number[] = [];
    const predicted: number[] = [];
    let worstVotes = 0;
    trainRows.forEach((fileRow, i) => {
      const row = out.rows[fileRow];
      const treeValues = votes.rows[fileRow].trees;
      const own = treeValues.filter((_, t) => inBag[t * n + i] === 0);
      worst = Math.max(worst, Math.abs(row.base + sum(row.contributions) - row.prediction));
      if (own.length === 0) {
        assert.equal(row.trees, 'all');
        return;
      }
      assert.deepEqual([row.trees, row.treeCount], ['out-of-bag', own.length], `row ${row.row}`);
      const mean = own.reduce((a, b) => a + b, 0) / own.length;
      worstVotes = Math.max(worstVotes, Math.abs(row.base + sum(row.contributions) - mean));
      truth.push(Number(cellsOfLine(row.line)[5]));
      predicted.push(row.prediction);
    });
    assert.ok(worst < 1e-9, `largest additivity gap ${worst}`);
    assert.ok(worstVotes < 1e-9, `largest gap to the out-of-bag trees' mean ${worstVotes}`);
    const fitOob = oobOf(valueFit);
    assert.equal(truth.length, fitOob.rows);
    const scores = regressionScores(truth, predicted);
    assert.equal(scores.kind, 'regression');
    for (const k of ['rmse', 'mae', 'r2'] as const) assert.ok(Math.abs(scores[k] - fitOob[k]!) < 1e-9, `${k}: ${scores[k]} vs ${fitOob[k]}`);
  });

  it('says so in the readable output, and --all-trees gives the forest’s own prediction', () => {
    const oob = json<ExplainJson<ValueExplainedRow>>('explain', valueModel, data, '--rows', '3', '--json').rows[0];
    const text = copse('explain', valueModel, data, '--rows', '3').stdout;
    assert.match(text, new RegExp(`^Row 3 \\(line 4\\), over the ${oob.treeCount} trees that did not train on this row: predicted `));
    const noTarget = copse('explain', valueModel, data, '--rows', '6').stdout;
    assert.match(noTarget, /^Row 6 \(line 7\), over all 25 trees, none of which trained on this row: /);

    const all = json<ExplainJson<ClassExplainedRow>>('explain', classModel, data, '--rows', '3,77', '--json', '--all-trees');
    const votes = json<VotesJson<ClassVoteRow>>('votes', classModel, data, '--rows', '3,77', '--json');
    all.rows.forEach((row, j) => {
      assert.deepEqual([row.trees, row.treeCount], ['all', 25]);
      for (const c of Object.keys(row.probabilities)) {
        assert.equal(row.probabilities[c], votes.rows[j].probabilities[c]);
        worst = Math.max(worst, Math.abs(row.base[c] + sum(row.contributions[c]) - row.probabilities[c]));
      }
    });
    assert.doesNotMatch(copse('explain', classModel, data, '--rows', '3', '--all-trees').stdout, /did not train/);
  });

  it('uses all trees without a word for another file, and with a warning when the training rows cannot be told', () => {
    // The same rows with one more blank line: other bytes, so not the training file as far as Copse can tell.
    const other = path.join(dir, 'other.csv');
    writeFileSync(other, readFileSync(data, 'utf8') + '\n');
    const elsewhere = json<ExplainJson<ClassExplainedRow>>('explain', classModel, other, '--rows', '3', '--json');
    assert.equal(elsewhere.rows[0].trees, 'all');
    assert.deepEqual(elsewhere.warnings, []);

    // Fitted on a sample of the file: the model records its rows and that none were held out, so the file's
    // extra rows tell that it was read differently.
    const sampled = path.join(dir, 'sampled.json');
    json<FitJson>('fit', data, '--target', 'label', '--exclude', 'value', '--sample-rows', '120', '--trees', '10', '--seed', '4', '--no-importance', '--save', sampled, '--json');
    const out = json<ExplainJson<ClassExplainedRow>>('explain', sampled, data, '--rows', '3,4', '--json');
    assert.deepEqual(out.rows.map((r) => r.trees), ['all', 'all']);
    const reason = /is the file the forest was fitted on, but which trees drew each row cannot be told for certain: the forest was fitted on 120 rows; this reading of the data has 156 with a target\./;
    assert.match(out.warnings.join(' '), reason);

    // A model file from before the holdout's size was kept cannot tell a sample from a holdout by counting;
    // the check of the recovered draws against the trees' covers refuses it.
    const head = JSON.parse(readFileSync(sampled, 'utf8').split('\n')[0]) as ModelHeadJson;
    assert.equal(head.training.heldOut, 0, 'the fit records what it held out');
    delete head.training.heldOut;
    const older = path.join(dir, 'older.json');
    const [, ...trees] = readFileSync(sampled, 'utf8').split('\n');
    writeFileSync(older, [JSON.stringify(head), ...trees].join('\n'));
    const refused = json<ExplainJson<ClassExplainedRow>>('explain', older, data, '--rows', '3,4', '--json');
    assert.deepEqual(refused.rows.map((r) => r.trees), ['all', 'all']);
    assert.match(refused.warnings.join(' '), /cannot be told for certain: its rows do not reproduce the trees \(tree 1, leaf \d+: /);
    const text = copse('explain', sampled, data, '--rows', '3');
    assert.match(text.stderr, /^Warning: .*Every row is explained over all trees\.$/m);
  });
});
