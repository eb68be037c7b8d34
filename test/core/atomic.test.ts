// Where an output's bytes go (core/atomic.ts): through a chain of links to the final file, directly into a
// device or an open-file link, never by renaming over either; and temporary files that can all be removed at once.
import * as assert from 'node:assert/strict';
import { existsSync, lstatSync, mkdtempSync, openSync, readdirSync, readFileSync, closeSync, statSync, symlinkSync, writeFileSync, chmodSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { OutputFile, outputPlace, removePendingTemps, targetOfTemp, tempBeside, writeFileAtomic } from '../../src/core/atomic';

describe('outputs (core/atomic)', () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-atomic-'));
  const temps = () => readdirSync(dir).filter((f) => f.endsWith('.tmp'));

  it('follows a chain of symbolic links, relative and dangling, to the file they lead to', () => {
    const real = path.join(dir, 'real.json');
    writeFileSync(real, 'old');
    symlinkSync('real.json', path.join(dir, 'one.json'));
    symlinkSync(path.join(dir, 'one.json'), path.join(dir, 'two.json'));
    symlinkSync('not-yet.json', path.join(dir, 'dangling.json'));
    assert.deepEqual(outputPlace(path.join(dir, 'two.json')), { path: real, direct: false, stdout: false });
    assert.equal(outputPlace(path.join(dir, 'dangling.json')).path, path.join(dir, 'not-yet.json'));
    assert.equal(outputPlace(path.join(dir, 'plain.json')).path, path.join(dir, 'plain.json'));
  });

  it('refuses a loop of links with ELOOP rather than walking forever', () => {
    symlinkSync('loop-b', path.join(dir, 'loop-a'));
    symlinkSync('loop-a', path.join(dir, 'loop-b'));
    assert.throws(() => outputPlace(path.join(dir, 'loop-a')), (e: NodeJS.ErrnoException) => e.code === 'ELOOP');
  });

  it('writes a device, an open-file link and "-" directly', () => {
    assert.deepEqual(outputPlace('/dev/null'), { path: '/dev/null', direct: true, stdout: false });
    // /dev/stdout -> /proc/self/fd/1: renaming a file there would replace whatever the shell gave us.
    if (existsSync('/dev/stdout')) assert.equal(outputPlace('/dev/stdout').direct, true);
    assert.deepEqual(outputPlace('-'), { path: '-', direct: true, stdout: true });
  });

  it('writes through a link at its target, which keeps its permissions, and leaves the link a link', async () => {
    const target = path.join(dir, 'private.json');
    writeFileSync(target, 'old');
    chmodSync(target, 0o600);
    symlinkSync('private.json', path.join(dir, 'private-link.json'));
    await writeFileAtomic(path.join(dir, 'private-link.json'), 'new');
    assert.ok(lstatSync(path.join(dir, 'private-link.json')).isSymbolicLink());
    assert.equal(readFileSync(target, 'utf8'), 'new');
    assert.equal(statSync(target).mode & 0o777, 0o600);
    assert.deepEqual(temps(), []);
  });

  it('leaves the target as it was and no temporary file when a write is abandoned', () => {
    const target = path.join(dir, 'kept.json');
    writeFileSync(target, 'kept');
    const out = new OutputFile(target);
    out.writeSync('half a model');
    assert.equal(temps().length, 1);
    out.abandon();
    out.abandon();
    assert.equal(readFileSync(target, 'utf8'), 'kept');
    assert.deepEqual(temps(), []);
  });

  it('removes every temporary file still being written, even one held open, and forgets those renamed', async () => {
    const open = new OutputFile(path.join(dir, 'a.json'));
    open.writeSync('x');
    const done = new OutputFile(path.join(dir, 'b.json'));
    await done.commit();
    const bare = tempBeside(path.join(dir, 'c.json'));
    closeSync(openSync(bare, 'w'));
    assert.equal(temps().length, 2);
    assert.equal(removePendingTemps(), 2);
    assert.deepEqual(temps(), []);
    assert.ok(existsSync(path.join(dir, 'b.json')), 'a committed file is not a temporary one');
    assert.equal(existsSync(path.join(dir, 'a.json')), false);
    open.abandon();
  });

  it('names the file a temporary name was made for', () => {
    const t = tempBeside('/data/model.json');
    assert.equal(targetOfTemp(t), '/data/model.json');
    assert.equal(targetOfTemp('/data/model.json'), '/data/model.json');
    removePendingTemps();
  });
});
