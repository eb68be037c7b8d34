// core/output-guard.ts: an output that leads to an input is refused however it is spelled or linked; other
// files, including a copy of the input, are not.
import * as assert from 'node:assert/strict';
import { copyFileSync, linkSync, mkdirSync, mkdtempSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { inputAt, OverwriteError, refuseInputAsOutput } from '../../src/core/output-guard';

describe('never an input as an output (core/output-guard)', () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-guard-'));
  const train = path.join(dir, 'train.csv');
  const inputs = [{ file: train, what: 'the data file' }];
  before(() => {
    writeFileSync(train, 'a,b\n1,2\n');
    mkdirSync(path.join(dir, 'sub'));
    symlinkSync(train, path.join(dir, 'soft.csv'));
    symlinkSync('soft.csv', path.join(dir, 'soft2.csv'));
    linkSync(train, path.join(dir, 'hard.csv'));
    symlinkSync(dir, path.join(dir, 'again'));
    copyFileSync(train, path.join(dir, 'copy.csv'));
  });

  it('finds the input behind a symbolic link, a chain of them, a hard link and a roundabout path', async () => {
    for (const out of ['soft.csv', 'soft2.csv', 'hard.csv', 'sub/../train.csv', 'again/train.csv', 'again/sub/../hard.csv']) {
      assert.equal((await inputAt(path.join(dir, out), inputs))?.file, train, out);
    }
  });

  it('lets a copy, a new file and standard output through', async () => {
    for (const out of [path.join(dir, 'copy.csv'), path.join(dir, 'new.json'), '-']) {
      assert.equal(await inputAt(out, inputs), undefined, out);
    }
  });

  it('refuses with one sentence naming the output, the input it is, and the option', async () => {
    await assert.rejects(refuseInputAsOutput(path.join(dir, 'hard.csv'), '--save', inputs), (e: Error) => {
      assert.ok(e instanceof OverwriteError);
      assert.equal(e.message, `Refusing to write ${path.join(dir, 'hard.csv')}: it is the data file (the same file as ${train}), which would be lost; choose another --save file.`);
      return true;
    });
  });
});
