// Every command-line example in README.md's code blocks runs as written, in order, from a folder that has the
// repository's demo/ files (and test/ fixtures): a user who copies them should never meet an error the README did not promise.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';

const root = path.join(__dirname, '..', '..', '..');

/**
 * Files an example may need that neither the repository nor an earlier example makes, each with the reason the
 * test cannot make it. An example needing one of these is skipped and named; an example needing any other
 * missing file fails the test, so a new example cannot quietly go unrun. Empty today: every example runs.
 */
const CANNOT_MAKE: Readonly<Record<string, string>> = {};

/** How the README may start a command; each runs here as `node bin/copse.js` from this checkout. */
const PREFIX = /^(?:npx copse|npm exec copse --|copse|node bin\/copse\.js)\s+/;

function examples(markdown: string): string[] {
  const out: string[] = [];
  let inBlock = false;
  for (const line of markdown.split('\n')) {
    if (/^```/.test(line)) {
      inBlock = !inBlock;
      continue;
    }
    const command = line.replace(/\s+#.*$/, '').trim();
    if (inBlock && PREFIX.test(command)) out.push(command);
  }
  return out;
}

/** The files an example reads: path-like arguments that are not what it writes. */
function inputs(args: string[]): string[] {
  const written = new Set<number>();
  args.forEach((a, i) => {
    if (a === '--save' || a === '--out' || a === '--report') written.add(i + 1);
  });
  if (args[0] === 'export') written.add(2);
  return args.filter((a, i) => !written.has(i) && !a.startsWith('--') && /\.(csv|json|onnx)$/i.test(a));
}

describe('README.md command-line examples', function () {
  this.timeout(300000);
  const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
  const found = examples(readme);

  it('are found in the code blocks', () => {
    assert.ok(found.length >= 5, `found only: ${found.join(' | ')}`);
    for (const c of ['fit', 'predict', 'votes', 'explain', 'export']) {
      assert.ok(found.some((e) => e.replace(PREFIX, '').startsWith(`${c} `)), `no example of copse ${c}`);
    }
  });

  it('run as written, in order, against the demo files', () => {
    const cwd = mkdtempSync(path.join(tmpdir(), 'copse-readme-'));
    symlinkSync(path.join(root, 'demo'), path.join(cwd, 'demo'));
    // Examples that read a model trained elsewhere use the repository's own fixtures, as from the checkout.
    symlinkSync(path.join(root, 'test'), path.join(cwd, 'test'));
    const skipped: string[] = [];
    for (const example of found) {
      const args = example.replace(PREFIX, '').split(/\s+/);
      const missing = inputs(args).filter((f) => !existsSync(path.join(cwd, f)));
      const unknown = missing.filter((f) => !(f in CANNOT_MAKE));
      assert.deepEqual(unknown, [], `"${example}" needs ${unknown.join(', ')}, which neither the repository nor an earlier example makes`);
      if (missing.length) {
        skipped.push(`${example}: ${missing.map((f) => CANNOT_MAKE[f]).join('; ')}`);
        continue;
      }
      const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { cwd, encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
      assert.equal(r.status, 0, `"${example}" exited ${r.status}: ${r.stderr}`);
      assert.doesNotMatch(r.stderr, /unexpected error|internal error|\n\s+at /, example);
      for (const i of args.flatMap((a, j) => (a === '--save' || a === '--out' ? [j + 1] : args[0] === 'export' && j === 2 ? [j] : []))) {
        assert.ok(existsSync(path.join(cwd, args[i])), `"${example}" did not write ${args[i]}`);
      }
    }
    // eslint-disable-next-line no-console -- which examples could not run here goes to the run's log.
    if (skipped.length) console.log(`    skipped:\n      ${skipped.join('\n      ')}`);
  });
});
