// How the command line tells an error (src/cli/errors.ts): the user's problems in one sentence with exit 1 or 2,
// file-system errors in words about the user's own path, and anything else as internal, with exit 70.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { openSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { InputError } from '../../src/core/base/input-error';
import { DataError } from '../../src/core/csv/types';
import { ModelError } from '../../src/core/model/file';
import { OverwriteError } from '../../src/core/output-guard';
import { UsageError } from '../../src/cli/args';
import { describe as tell, EXIT } from '../../src/cli/errors';
import { OutputError, writeFailure } from '../../src/cli/output';

/** The error node's fs really throws for `action`. */
function thrown(action: () => unknown): Error {
  try {
    action();
  } catch (e) {
    return e as Error;
  }
  throw new Error('expected a failure');
}

const ERRNO = /\bE[A-Z]{2,}\b|errno|syscall/;

describe('copse error messages and exit codes', () => {
  it('tells the user\'s problems in one sentence, with 2 for the command line and 1 for the input', () => {
    const cases: Array<[Error, number]> = [
      [new UsageError('needs --target COLUMN.'), EXIT.usage],
      [new OutputError('Cannot write x: the folder y does not exist.'), EXIT.usage],
      [new OutputError('Could not write x: the disk is full.', false), EXIT.input],
      [new DataError('k.csv line 3 has 4 fields; the header has 3.'), EXIT.input],
      [new ModelError('m.json is not a Copse model.'), EXIT.input],
      [new OverwriteError('Refusing to write k.csv: it is the data file.'), EXIT.input],
      [new InputError('The holdout leaves no rows to train on.'), EXIT.input],
    ];
    for (const [e, code] of cases) {
      const said = tell(e, 'fit');
      assert.equal(said.code, code, e.name);
      assert.ok(said.text.startsWith(`copse fit: ${e.message}\n`), said.text);
      assert.doesNotMatch(said.text, /internal/);
    }
  });

  it('calls a plain error, and the engine\'s own RangeErrors, internal: exit 70 and a pointer to --debug', () => {
    const engine = [thrown(() => 'x'.repeat(-1)), thrown(() => new Float64Array(-1)), thrown(() => (1.5).toFixed(101))];
    for (const e of [new Error('a cell index fell outside the table'), new TypeError("Cannot read properties of undefined (reading 'left')"), ...engine]) {
      const said = tell(e, 'predict');
      assert.equal(said.code, EXIT.internal, e.message);
      assert.match(said.text, /^copse predict: internal error, a fault in Copse rather than in your input: .+\nRun the same command with --debug for the details, and report it\.\n$/);
    }
    assert.equal(tell('a thrown string', 'fit').code, EXIT.internal);
  });

  it('puts a file-system error in words about the path the user gave, never a temporary name or an errno code', () => {
    const dir = path.join(tmpdir(), 'copse-no-such-folder-' + process.pid);
    const tmpName = path.join(dir, 'model.json.4242.8cdb022f.tmp');
    const missing = thrown(() => openSync(tmpName, 'wx'));
    assert.equal((missing as NodeJS.ErrnoException).code, 'ENOENT', 'the error is node\'s own');
    const said = tell(missing, 'fit');
    assert.equal(said.code, EXIT.input);
    assert.equal(said.text, `copse fit: Cannot open ${path.join(dir, 'model.json')}: there is no such file or folder.\n`);
    const folder = thrown(() => openSync(tmpdir(), 'w'));
    assert.equal(tell(folder, 'export').text, `copse export: Cannot open ${tmpdir()}: it is a folder.\n`);
    for (const e of [missing, folder]) assert.doesNotMatch(tell(e, 'fit').text, ERRNO);
  });

  it('tells a failed write about the output the user named', () => {
    const e = thrown(() => openSync(path.join(tmpdir(), 'copse-none', 'p.csv.1.0a0b0c0d.tmp'), 'wx'));
    const told = writeFailure(e, 'out/p.csv') as OutputError;
    assert.ok(told instanceof OutputError);
    assert.equal(told.message, 'Could not write out/p.csv: there is no such file or folder.');
    assert.equal(tell(told, 'predict').code, EXIT.input);
    const plain = new Error('not a file error');
    assert.equal(writeFailure(plain, 'out/p.csv'), plain);
  });

  it('shows control characters in a message as escapes', () => {
    const said = tell(new DataError('k.csv has no column "\x1b[31mred\x1b]0;owned\x07"'), 'fit');
    assert.equal(said.text, 'copse fit: k.csv has no column "\\x1b[31mred\\x1b]0;owned\\x07"\n');
  });
});

describe('copse --help', () => {
  it('lists every exit code the command line uses', () => {
    const help = spawnSync(process.execPath, [path.join(__dirname, '..', '..', '..', 'bin/copse.js'), '--help'], { encoding: 'utf8' }).stdout;
    for (const code of Object.values(EXIT)) assert.match(help, new RegExp(`\\b${code}\\b`), `exit code ${code}`);
    assert.match(help, /70 +an internal error/);
  });
});
