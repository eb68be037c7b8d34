// Hostile and careless command lines from issue 12: limits checked before work starts, each refused in one
// sentence naming the limit and the option that gets under it; input from a pipe; numbers written with commas.
import * as assert from 'node:assert/strict';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { votesSizeProblem } from '../../src/cli/limits';
import { loadCsvText } from '../../src/core/csv/load';
import { MAX_ROW_TREE_CELLS } from '../../src/core/limits';

const root = path.join(__dirname, '..', '..', '..');
const bin = path.join(root, 'bin/copse.js');
const kites = path.join(root, 'demo/kite-flights.csv');

function copse(args: string[], input?: string | Buffer): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', input });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** One sentence on stderr (plus the pointer to --help for a usage mistake), no stack. */
function oneSentence(stderr: string, pattern: RegExp): void {
  const lines = stderr.trim().split('\n').filter((l) => !l.startsWith('Run "copse'));
  assert.equal(lines.length, 1, stderr);
  assert.match(lines[0], pattern);
  assert.doesNotMatch(stderr, /\n\s+at /);
}

const spoolCopies = () => readdirSync(tmpdir()).filter((f) => f.startsWith(`copse-input-`));

describe('limits checked before work starts', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-limits-'));

  for (const trees of ['1e9', '10.5', '0x10', '1_000', '-3', '']) {
    it(`refuses --trees "${trees}": only plain digits`, () => {
      const r = copse(['fit', kites, '--target', 'outcome', `--trees=${trees}`]);
      assert.equal(r.code, 2);
      oneSentence(r.stderr, /--trees takes a whole number of at least 1, written in digits/);
    });
  }

  it('refuses --trees above the model file limit, naming it', () => {
    const r = copse(['fit', kites, '--target', 'outcome', '--trees', '100001']);
    assert.equal(r.code, 2);
    oneSentence(r.stderr, /--trees 100001 is more than the limit of 100,000; a model file holds at most that many trees/);
  });

  it('refuses a seed beyond 2^53 instead of rounding it, and keeps the largest exact one', () => {
    const r = copse(['fit', kites, '--target', 'outcome', '--seed', '9007199254740993']);
    assert.equal(r.code, 2);
    oneSentence(r.stderr, /--seed 9007199254740993 is outside the range a model keeps exactly/);
    const model = path.join(dir, 'seed.json');
    const ok = copse(['fit', kites, '--target', 'outcome', '--trees', '2', '--seed', '9007199254740991', '--save', model, '--json']);
    assert.equal(ok.code, 0, ok.stderr);
    assert.match(readFileSync(model, 'utf8').split('\n')[0], /"seed":9007199254740991/);
  });

  it('refuses a header wider than the column limit before reading a row, and --max-columns lifts it', () => {
    const wide = path.join(dir, 'wide.csv');
    const names = Array.from({ length: 10_001 }, (_, j) => `c${j}`);
    writeFileSync(wide, ['y,' + names.join(','), ...[0, 1, 2, 3].map((i) => `${i % 2 ? 'a' : 'b'},` + names.map((_, j) => (i * j) % 3).join(','))].join('\n'));
    const r = copse(['fit', wide, '--target', 'y']);
    assert.equal(r.code, 1);
    oneSentence(r.stderr, /line 1: the header has 10,002 columns, more than the limit of 10,000; check the delimiter, or raise the limit with --max-columns/);
    const lifted = copse(['fit', wide, '--target', 'y', '--trees', '2', '--max-columns', '10002', '--json']);
    assert.equal(lifted.code, 0, lifted.stderr);
    const over = copse(['fit', wide, '--target', 'y', '--max-columns', '100002']);
    oneSentence(over.stderr, /--max-columns 100002 is more than the limit of 100,001; a forest reads at most that many features/);
  });

  it('refuses rows times classes past the limit before the model file is opened, and leaves no file', () => {
    const many = path.join(dir, 'many.csv');
    // Two rows per class, so the target is not taken for a row identifier.
    const rows = Array.from({ length: 10000 }, (_, i) => `c${i % 5000},${i % 7},${i % 11}`);
    writeFileSync(many, ['label,a,b', ...rows].join('\n'));
    const model = path.join(dir, 'many.json');
    const r = copse(['fit', many, '--target', 'label', '--many-classes', '--save', model]);
    assert.equal(r.code, 2);
    oneSentence(r.stderr, /10,000 training rows times 5,000 classes is 50,000,000, more than the limit of 20,000,000 .*--sample-rows 4000/);
    assert.equal(existsSync(model), false);
    assert.deepEqual(readdirSync(dir).filter((f) => f.startsWith('many.json')), []);
  });

  it('refuses every tree\'s vote for more rows than the limit, naming how many rows fit', () => {
    assert.equal(votesSizeProblem(1000, 1000), undefined);
    const said = votesSizeProblem(MAX_ROW_TREE_CELLS / 100 + 1, 100);
    assert.match(said ?? '', /--rows asks for 500,001 rows of 100 trees' votes each, more than the limit of 50,000,000 votes; ask for at most 500,000 rows/);
  });
});

describe('input from a pipe', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-pipe-'));

  it('fits the same forest, byte for byte, from standard input as from the file, for the same seed', () => {
    const fromFile = path.join(dir, 'file.json');
    const fromPipe = path.join(dir, 'pipe.json');
    assert.equal(copse(['fit', kites, '--target', 'outcome', '--trees', '8', '--seed', '7', '--save', fromFile, '--json']).code, 0);
    const r = copse(['fit', '-', '--target', 'outcome', '--trees', '8', '--seed', '7', '--save', fromPipe, '--json'], readFileSync(kites));
    assert.equal(r.code, 0, r.stderr);
    assert.ok(readFileSync(fromFile).equals(readFileSync(fromPipe)), 'the two model files differ');
    // The fingerprint is of the bytes read, so the forest knows the file as its training file either way.
    assert.match(readFileSync(fromPipe, 'utf8').split('\n')[0], /"fingerprint":"[0-9a-f]{64}"/);
  });

  it('reads a FIFO without seeking', () => {
    const fifo = path.join(dir, 'in.fifo');
    execFileSync('mkfifo', [fifo]);
    const script = `cat ${JSON.stringify(kites)} > ${JSON.stringify(fifo)} & exec ${JSON.stringify(process.execPath)} ${JSON.stringify(bin)} fit ${JSON.stringify(fifo)} --target outcome --trees 3 --json`;
    const r = spawnSync('bash', ['-c', script], { encoding: 'utf8' });
    assert.equal(r.status, 0, r.stderr);
    assert.equal((JSON.parse(r.stdout) as { rows: number }).rows > 0, true);
    assert.doesNotMatch(r.stderr, /ESPIPE/);
  });

  it('scores standard input once, and says plainly when an option would read it twice', () => {
    const model = path.join(dir, 'k.json');
    assert.equal(copse(['fit', kites, '--target', 'outcome', '--trees', '4', '--save', model, '--json']).code, 0);
    const data = readFileSync(kites);
    const fromPipe = copse(['predict', model, '-'], data);
    assert.equal(fromPipe.code, 0, fromPipe.stderr);
    assert.equal(fromPipe.stdout, copse(['predict', model, kites]).stdout);
    const out = path.join(dir, 'p.csv');
    const twice = copse(['predict', model, '-', '--out', out], data);
    assert.equal(twice.code, 2);
    oneSentence(twice.stderr, /--out copies each row of the data beside its answers, which reads the data a second time; standard input or a pipe can be read only once, so save it to a file first/);
    assert.equal(existsSync(out), false);
  });

  it('places an error on its line in piped input, and removes its private copy', () => {
    const before = spoolCopies().length;
    const r = copse(['fit', '-', '--target', 'b'], 'a,b\n1,2\n3,"x\n4,5\n');
    assert.equal(r.code, 1);
    oneSentence(r.stderr, /standard input line 3, column 'b': a quoted field starts here and its closing quote is missing/);
    assert.equal(spoolCopies().length, before);
  });
});

describe('numbers written with commas', () => {
  const semicolons = 'y;w;p;z\n' + Array.from({ length: 40 }, (_, i) => `${i % 2 ? 'a' : 'b'};${i % 3},5;"${1 + (i % 3)},500";${i % 5}`).join('\n');

  it('name the column in a note that suggests the decimal mark and the --type override', async () => {
    const r = await loadCsvText(semicolons, { target: 'y' });
    const w = r.notes.find((n) => n.includes("'w'"));
    assert.match(w ?? '', /Column 'w' has 40 cells that look like numbers written with a comma \(such as '0,5'\).*--decimal-mark ,.*--type w=categorical/);
    assert.ok(r.notes.some((n) => n.includes("'p'") && n.includes("'1,500'")));
    assert.equal(r.table.columns.find((c) => c.name === 'w')?.kind, 'categorical');
    // A plain numeric column gets no such note.
    assert.ok(!r.notes.some((n) => n.includes("'z'")));
  });

  it('are read as numbers under --decimal-mark: comma as the mark, or comma between thousands', async () => {
    const comma = await loadCsvText(semicolons, { target: 'y', decimalMark: ',' });
    const w = comma.table.columns.find((c) => c.name === 'w');
    assert.equal(w?.kind, 'numeric');
    assert.deepEqual(Array.from((w as { values: Float64Array }).values.slice(0, 3)), [0.5, 1.5, 2.5]);
    assert.ok(!comma.notes.some((n) => n.includes('written with a comma')));
    const cells = [...Array.from({ length: 30 }, (_, i) => ['"1,234.5"', '"12,000"', '7'][i % 3]), '"1,5"'];
    const thousands = await loadCsvText('y,p\n' + cells.map((c, i) => `${i % 2 ? 'a' : 'b'},${c}`).join('\n'), { target: 'y', decimalMark: '.' });
    const p = thousands.table.columns.find((c) => c.name === 'p') as { kind: string; values: Float64Array };
    assert.equal(p.kind, 'numeric');
    // "1,5" is not a thousands group of three digits, so under a dot mark it stays text and becomes missing.
    assert.deepEqual(Array.from(p.values.slice(0, 3)), [1234.5, 12000, 7]);
    assert.ok(Number.isNaN(p.values[30]));
  });

  it('the command line takes --decimal-mark and refuses other marks', () => {
    const r = copse(['fit', kites, '--target', 'outcome', '--decimal-mark', ';']);
    assert.equal(r.code, 2);
    oneSentence(r.stderr, /--decimal-mark takes one of \., ,/);
  });
});
