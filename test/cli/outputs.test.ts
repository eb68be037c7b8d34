// Where the command line's outputs go (issue 12): never over an input however it is linked, through a symbolic
// link to its target, straight into a FIFO or a device, "-" to standard output, and no temporary file left
// behind by a signal, a failed write or a full disk.
import * as assert from 'node:assert/strict';
import { spawn, spawnSync, type StdioOptions } from 'node:child_process';
import { closeSync, existsSync, linkSync, lstatSync, mkdirSync, mkdtempSync, openSync, readdirSync, readFileSync, readlinkSync, rmSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');
const bin = path.join(root, 'bin/copse.js');

interface Ran {
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
}

function copse(args: string[], cwd: string, stdio?: StdioOptions): Ran {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd, stdio });
  return { code: r.status, signal: r.signal, stdout: r.stdout ?? '', stderr: r.stderr ?? '' };
}

/** The same without blocking this process, for a reader on a FIFO or a signal sent midway. */
function started(args: string[], cwd: string, env?: NodeJS.ProcessEnv) {
  const child = spawn(process.execPath, [bin, ...args], { cwd, env: env && { ...process.env, ...env } });
  let stdout = '';
  let stderr = '';
  child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
  child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
  const done = new Promise<Ran>((resolve) => child.on('close', (code, signal) => resolve({ code, signal, stdout, stderr })));
  return { child, done };
}

/**
 * The system files these tests write to. A regression that renames over them would, as root, replace the
 * machine's own /dev/null; so each test ends by checking them, putting back any that changed, and failing.
 */
const SYSTEM_OUTPUTS = ['/dev/null', '/dev/full', '/dev/stdout'].filter((f) => existsSync(f));
const systemState = () => SYSTEM_OUTPUTS.map((f) => ({ f, s: lstatSync(f), link: lstatSync(f).isSymbolicLink() ? readlinkSync(f) : '' }));

function restoreChanged(before: ReturnType<typeof systemState>): string[] {
  const changed: string[] = [];
  for (const { f, s, link } of before) {
    const now = lstatSync(f, { throwIfNoEntry: false });
    if (now && now.rdev === s.rdev && now.mode === s.mode && (!link || readlinkSync(f) === link)) continue;
    changed.push(f);
    rmSync(f, { force: true });
    if (link) symlinkSync(link, f);
    else spawnSync('mknod', ['-m', (s.mode & 0o777).toString(8), f, 'c', String(Math.floor(s.rdev / 256)), String(s.rdev % 256)]);
  }
  return changed;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const temps = (dir: string) => readdirSync(dir).filter((f) => f.endsWith('.tmp'));

describe('copse outputs: links, devices, FIFOs, standard output and signals', function () {
  this.timeout(300000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-outputs-'));
  const data = path.join(dir, 'train.csv');
  const model = path.join(dir, 'model.json');
  let expected = '';

  let system: ReturnType<typeof systemState> = [];
  afterEach(() => assert.deepEqual(restoreChanged(system), [], 'a system device or link was replaced (and has been put back)'));

  before(() => {
    system = systemState();
    writeFileSync(data, readFileSync(kites));
    const r = copse(['fit', data, '--target', 'outcome', '--trees', '10', '--no-importance', '--save', model], dir);
    assert.equal(r.code, 0, r.stderr);
    const out = copse(['predict', model, data, '--out', path.join(dir, 'scored.csv')], dir);
    assert.equal(out.code, 0, out.stderr);
    expected = readFileSync(path.join(dir, 'scored.csv'), 'utf8');
    // Links to the inputs, which every refusal below must see through.
    symlinkSync('train.csv', path.join(dir, 'soft.csv'));
    linkSync(data, path.join(dir, 'hard.csv'));
    mkdirSync(path.join(dir, 'x'));
    symlinkSync('model.json', path.join(dir, 'model-link.onnx'));
  });

  it('refuses to save over the data file through a symbolic link, a hard link or a roundabout path', () => {
    const before = readFileSync(data);
    for (const save of ['soft.csv', 'hard.csv', './x/../train.csv', path.join(dir, 'x', '..', 'hard.csv')]) {
      const r = copse(['fit', 'train.csv', '--target', 'outcome', '--trees', '2', '--save', save], dir);
      assert.equal(r.code, 1, `${save}: ${r.stderr}`);
      assert.match(r.stderr, /^copse fit: Refusing to write .*: it is the data file.*, which would be lost; choose another --save file\.\n$/, save);
      assert.equal(r.stdout, '', 'refused before fitting');
    }
    assert.deepEqual(readFileSync(data), before);
    assert.ok(lstatSync(path.join(dir, 'soft.csv')).isSymbolicLink());
  });

  it('refuses predict --out and export onto a link to their inputs', () => {
    const p = copse(['predict', model, data, '--out', 'hard.csv'], dir);
    assert.equal(p.code, 1, p.stderr);
    assert.match(p.stderr, /Refusing to write predictions over the input file/);
    const before = readFileSync(model);
    const own = copse(['predict', model, data, '--out', 'model-link.onnx'], dir);
    assert.equal(own.code, 1, own.stderr);
    assert.match(own.stderr, /it is the model \(the same file as .*model\.json\)/);
    const t = copse(['export', model, 'model-link.onnx'], dir);
    assert.equal(t.code, 1, t.stderr);
    assert.match(t.stderr, /Refusing to write the ONNX file over the model/);
    assert.deepEqual(readFileSync(model), before);
  });

  it('writes through a symbolic link at its target, and the link stays a link', () => {
    writeFileSync(path.join(dir, 'old.csv'), 'old\n');
    symlinkSync('old.csv', path.join(dir, 'out-link.csv'));
    const r = copse(['predict', model, data, '--out', 'out-link.csv'], dir);
    assert.equal(r.code, 0, r.stderr);
    assert.ok(lstatSync(path.join(dir, 'out-link.csv')).isSymbolicLink());
    assert.equal(readFileSync(path.join(dir, 'old.csv'), 'utf8'), expected);
    symlinkSync(path.join('x', 'new.json'), path.join(dir, 'dangling.json'));
    const s = copse(['fit', data, '--target', 'outcome', '--trees', '2', '--no-importance', '--save', 'dangling.json'], dir);
    assert.equal(s.code, 0, s.stderr);
    assert.ok(lstatSync(path.join(dir, 'dangling.json')).isSymbolicLink());
    assert.match(readFileSync(path.join(dir, 'x', 'new.json'), 'utf8'), /^\{"format":"copse-forest"/);
    assert.deepEqual([...temps(dir), ...temps(path.join(dir, 'x'))], []);
  });

  it('writes /dev/null directly and leaves it a character device', () => {
    for (const args of [['predict', model, data, '--out', '/dev/null'], ['export', model, '/dev/null'], ['fit', data, '--target', 'outcome', '--trees', '2', '--save', '/dev/null']]) {
      const r = copse(args, dir);
      assert.equal(r.code, 0, `${args.join(' ')}: ${r.stderr}`);
      assert.ok(statSync('/dev/null').isCharacterDevice());
    }
    assert.deepEqual(temps('/dev'), []);
  });

  it('tells a full device in one sentence, with no temporary name and no error code', function () {
    if (!existsSync('/dev/full')) this.skip();
    const r = copse(['predict', model, data, '--out', '/dev/full'], dir);
    assert.equal(r.code, 1);
    assert.equal(r.stderr, 'copse predict: Could not write /dev/full: the disk is full.\n');
    assert.ok(statSync('/dev/full').isCharacterDevice());
    const fd = openSync('/dev/full', 'w');
    try {
      const s = copse(['votes', model, data, '--rows', '1'], dir, ['ignore', fd, 'pipe']);
      assert.equal(s.code, 1);
      assert.equal(s.stderr, 'copse: Could not write standard output: the disk is full.\n');
    } finally {
      closeSync(fd);
    }
  });

  it('writes into a FIFO while a reader reads it, and leaves the FIFO in place', async () => {
    const fifo = path.join(dir, 'pipe.csv');
    assert.equal(spawnSync('mkfifo', [fifo]).status, 0, 'mkfifo');
    const reader = spawn('cat', [fifo]);
    let read = '';
    reader.stdout.on('data', (d: Buffer) => (read += d.toString()));
    const readerDone = new Promise((resolve) => reader.on('close', resolve));
    const r = await started(['predict', model, data, '--out', fifo], dir).done;
    await readerDone;
    assert.equal(r.code, 0, r.stderr);
    assert.equal(read, expected);
    assert.ok(lstatSync(fifo).isFIFO());
    assert.deepEqual(temps(dir), []);
  });

  it('takes - and /dev/stdout as standard output, which stays what it was', () => {
    const dash = copse(['predict', model, data, '--out', '-'], dir);
    assert.equal(dash.code, 0, dash.stderr);
    assert.equal(dash.stdout, expected);
    assert.match(dash.stderr, /Scored 3000 rows\.\n$/);
    const named = copse(['predict', model, data, '--out', '/dev/stdout'], dir);
    assert.equal(named.code, 0, named.stderr);
    assert.equal(named.stdout, expected);
    assert.ok(lstatSync('/dev/stdout').isSymbolicLink(), '/dev/stdout is still the system link');
    const saved = copse(['fit', data, '--target', 'outcome', '--trees', '3', '--no-importance', '--save', '-'], dir);
    assert.equal(saved.code, 0, saved.stderr);
    assert.match(saved.stdout, /^\{"format":"copse-forest"/);
    assert.match(saved.stderr, /Saved the forest to standard output\./, 'the report moves to standard error');
    writeFileSync(path.join(dir, 'from-stdout.json'), saved.stdout);
    assert.equal(copse(['votes', 'from-stdout.json', data, '--rows', '1'], dir).code, 0);
    const onnx = spawnSync(process.execPath, [bin, 'export', model, '-'], { cwd: dir });
    assert.equal(onnx.status, 0, onnx.stderr.toString());
    assert.equal(copse(['export', model, 'file.onnx'], dir).code, 0);
    assert.deepEqual(onnx.stdout, readFileSync(path.join(dir, 'file.onnx')));
    const both = copse(['predict', model, data, '--out', '-', '--json'], dir);
    assert.equal(both.code, 2);
    assert.equal(both.stderr, 'copse predict: --out - and --json both write to standard output; give a file name instead of -, or leave out --json.\n');
  });

  for (const [signal, code] of [['SIGINT', 130], ['SIGTERM', 143]] as const) {
    it(`removes the model's temporary file on ${signal} during fit --save, and exits ${code}`, async () => {
      const work = mkdtempSync(path.join(tmpdir(), 'copse-signal-'));
      // Far more trees than finish before the signal: the temporary model is being written when it comes.
      const fit = started(['fit', data, '--target', 'outcome', '--trees', '100000', '--workers', '1', '--no-importance', '--save', path.join(work, 'm.json')], work);
      for (let i = 0; i < 1200 && temps(work).length === 0 && fit.child.exitCode === null; i++) await sleep(50);
      assert.equal(temps(work).length, 1, 'the temporary model appeared');
      fit.child.kill(signal);
      const r = await fit.done;
      assert.equal(r.code, code, r.stderr);
      assert.deepEqual(readdirSync(work), [], 'no temporary file and no model');
    });
  }

  it('removes the spooled copy of piped input on SIGINT, while the table is still arriving', async () => {
    const spoolDir = mkdtempSync(path.join(tmpdir(), 'copse-spool-'));
    const fit = started(['fit', '-', '--target', 'outcome', '--trees', '10'], dir, { TMPDIR: spoolDir });
    // Half the table, and the pipe left open: the command is reading it when the signal comes.
    const text = readFileSync(kites, 'utf8');
    fit.child.stdin.write(text.slice(0, text.length >> 1));
    for (let i = 0; i < 1200 && readdirSync(spoolDir).length === 0 && fit.child.exitCode === null; i++) await sleep(50);
    assert.equal(readdirSync(spoolDir).length, 1, 'the spooled copy appeared');
    fit.child.kill('SIGINT');
    const r = await fit.done;
    assert.equal(r.code, 130, r.stderr);
    assert.deepEqual(readdirSync(spoolDir), [], 'the spooled copy is gone');
  });
});
