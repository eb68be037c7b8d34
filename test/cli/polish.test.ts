// The command line's manners: one prefix per error, output paths checked before the work and named as the
// user gave them, help in aligned columns, a version, rounded regression values in reports and full ones in
// JSON, and lists that say when they are cut.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { FitJson } from './output';

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');
const loaves = path.join(root, 'demo/loaf-rise.csv');

function copse(args: string[], cwd = root): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8', cwd });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** The column where each option's description starts, for the option lines of a help text. */
function descriptionColumns(help: string): number[] {
  const lines = help.split('\n');
  const from = lines.findIndex((l) => /^(Options|Commands):$/.test(l));
  const cols: number[] = [];
  for (const line of lines.slice(from + 1)) {
    if (line === '') break;
    // "  --flag ARG   description", or a continuation line indented to the description.
    const m = /^( {2}\S+(?: \S+)?\s{2,})\S/.exec(line) ?? /^(\s+)\S/.exec(line);
    if (m) cols.push(m[1].length);
  }
  return cols;
}

describe('copse command-line manners', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-polish-'));
  const model = path.join(dir, 'kites.json');

  before(() => {
    const r = copse(['fit', kites, '--target', 'outcome', '--trees', '20', '--save', model]);
    assert.equal(r.code, 0, r.stderr);
  });

  it('never says the command twice at the start of an error', () => {
    const cases = [['fit', kites], ['fit'], ['votes', model, kites], ['predict', model], ['export', model]];
    for (const args of cases) {
      const r = copse(args);
      assert.equal(r.code, 2, args.join(' '));
      assert.match(r.stderr, new RegExp(`^copse ${args[0]}: `));
      assert.doesNotMatch(r.stderr, /copse (\w+): copse \1/);
    }
  });

  it('refuses an output in a missing folder before any work, naming the path given and no temporary file', () => {
    const cases: Array<[string[], string]> = [
      [['predict', model, kites, '--out', 'no/such/dir/p.csv'], 'no/such/dir/p.csv'],
      [['fit', kites, '--target', 'outcome', '--save', 'no/such/dir/k.json'], 'no/such/dir/k.json'],
      [['export', model, 'no/such/dir/k.onnx'], 'no/such/dir/k.onnx'],
    ];
    for (const [args, out] of cases) {
      const r = copse(args, dir);
      assert.equal(r.code, 2, r.stderr);
      assert.equal(r.stderr, `copse ${args[0]}: Cannot write ${out}: the folder ${path.dirname(out)} does not exist.\n`);
      assert.equal(r.stdout, '', 'nothing was fitted or scored');
    }
    assert.deepEqual(readdirSync(dir).filter((f) => f.endsWith('.tmp')), []);
  });

  it('refuses to save a forest over its data file or its test file, which stay as they were', () => {
    const before = statSync(kites).mtimeMs;
    const overData = copse(['fit', kites, '--target', 'outcome', '--save', kites]);
    assert.equal(overData.code, 1);
    assert.match(overData.stderr, /^copse fit: Refusing to write .*kite-flights\.csv: it is the data file, which would be lost; choose another --save file\.\n$/);
    const overTest = copse(['fit', loaves, '--target', 'rise_mm', '--test', kites, '--save', kites]);
    assert.equal(overTest.code, 1);
    assert.match(overTest.stderr, /it is the --test file/);
    assert.equal(statSync(kites).mtimeMs, before);
  });

  it('refuses more features per split than there are features, with the count', () => {
    const r = copse(['fit', kites, '--target', 'outcome', '--features-per-split', '8']);
    assert.equal(r.code, 2);
    assert.match(r.stderr, /--features-per-split 8 is more than the 7 features there are; give at most 7, or all\./);
    assert.equal(copse(['fit', kites, '--target', 'outcome', '--features-per-split', '7', '--trees', '2', '--no-importance', '--json']).code, 0);
  });

  it('prints the package version', () => {
    const { version } = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8')) as { version: string };
    for (const flag of ['--version', '-V']) {
      const r = copse([flag]);
      assert.equal(r.code, 0);
      assert.equal(r.stdout, `${version}\n`);
    }
  });

  it('lays out every help in aligned columns', () => {
    // explain's help is laid out by hand in its own file and is not checked here.
    for (const args of [['--help'], ['fit', '--help'], ['predict', '--help'], ['votes', '--help'], ['export', '--help'], ['report', '--help']]) {
      const r = copse(args);
      assert.equal(r.code, 0);
      const cols = descriptionColumns(r.stdout);
      assert.ok(cols.length >= 2, `${args.join(' ')}: no option lines found`);
      assert.equal(new Set(cols).size, 1, `${args.join(' ')}: descriptions start in columns ${[...new Set(cols)].join(', ')}`);
    }
  });

  it('rounds regression values for reading in the report, and keeps every digit in the JSON', () => {
    const text = copse(['fit', loaves, '--target', 'rise_mm', '--trees', '30', '--seed', '2']).stdout;
    const doubts = text.split('\n').filter((l) => /^ {2}row \d+/.test(l));
    assert.ok(doubts.length > 0, text);
    for (const l of doubts) {
      const m = /labelled (\S+), out-of-bag prediction (\S+), z/.exec(l);
      assert.ok(m, l);
      for (const v of [m[1], m[2]]) assert.ok(v.replace(/^-|\./g, '').replace(/^0+/, '').length <= 4, `${v} in "${l}"`);
    }
    const json = JSON.parse(copse(['fit', loaves, '--target', 'rise_mm', '--trees', '30', '--seed', '2', '--json']).stdout) as FitJson;
    assert.ok(json.suspects.some((s) => String(s.oobPredicted).replace(/^-|\./g, '').length > 4), 'JSON keeps full precision');
  });

  it('says "N of M" when it cuts a list, and --list shows more', () => {
    const cut = copse(['fit', kites, '--target', 'outcome', '--trees', '20']).stdout;
    const m = /Rows the forest doubts \(negative out-of-bag margin\): 10 of (\d+) \(--list N shows more\):/.exec(cut);
    assert.ok(m, cut);
    const total = Number(m[1]);
    const more = copse(['fit', kites, '--target', 'outcome', '--trees', '20', '--list', '25']).stdout;
    assert.match(more, new RegExp(`: 25 of ${total} `));
    assert.equal(more.split('\n').filter((l) => /^ {2}row \d+ \(line/.test(l)).length, 25);
    const all = copse(['fit', kites, '--target', 'outcome', '--trees', '20', '--list', 'all']).stdout;
    assert.match(all, new RegExp(`: all ${total}:`));
    assert.equal(all.split('\n').filter((l) => /^ {2}row \d+ \(line/.test(l)).length, total);
  });

  it('ends quietly when the reader of its output stops early', () => {
    const r = spawnSync('bash', ['-c', `"${process.execPath}" "${path.join(root, 'bin/copse.js')}" predict "${model}" "${kites}" 2>/dev/null | head -1; echo "status \${PIPESTATUS[0]}"`], { encoding: 'utf8' });
    assert.match(r.stdout, /^row,predicted_outcome,.*\nstatus 0\n$/);
    assert.ok(!existsSync(path.join(dir, 'p.csv')));
  });
});
