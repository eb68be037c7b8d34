import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { artifactsRoot, repoRoot } from './paths';

// The suites test the .vsix a user would install, not the sources: `npm run
// package` (esbuild bundles + vsce) is the only way one is made. Building
// costs ~10 s, so it runs only when the file is missing or older than what
// goes into it.

/** What `npm run package` reads; a change to any of these makes the .vsix stale. */
const PACKAGE_INPUTS = ['src', 'webview', 'scripts/build.js', 'package.json', '.vscodeignore', 'README.md', 'LICENSE', 'tsconfig.json'];

export interface PackagedVsix {
  /** A private copy of the package, so a concurrent `npm run package` cannot swap it mid-install. */
  readonly file: string;
  /** The file in the repo root the copy was taken from. */
  readonly source: string;
  readonly version: string;
  /** Whether this call ran `npm run package`, and why. */
  readonly built: false | string;
  readonly buildMs: number;
}

/**
 * The repo's `copse-<version>.vsix`, built first if missing or stale.
 * The build's output goes to `logFile` (by default .artifacts/e2e/npm-run-package.log).
 * COPSE_E2E_VSIX=path uses that file as it is; COPSE_E2E_NO_BUILD=1 refuses
 * to build and fails on a stale package instead (for runs that packaged already).
 */
export function packagedVsix(logFile = path.join(artifactsRoot(), 'npm-run-package.log')): PackagedVsix {
  const root = repoRoot();
  const version = String((JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')) as { version: unknown }).version);
  const given = process.env.COPSE_E2E_VSIX;
  const source = given ? path.resolve(given) : path.join(root, `copse-${version}.vsix`);
  let built: false | string = false;
  let buildMs = 0;
  if (!given) {
    const reason = staleness(root, source);
    if (reason) {
      if (process.env.COPSE_E2E_NO_BUILD === '1') throw new Error(`${source} is stale (${reason}) and COPSE_E2E_NO_BUILD=1; run npm run package`);
      const started = Date.now();
      const result = spawnSync('npm', ['run', 'package'], { cwd: root, encoding: 'utf8', timeout: 300_000 });
      buildMs = Date.now() - started;
      fs.mkdirSync(path.dirname(logFile), { recursive: true });
      fs.writeFileSync(logFile, `${result.stdout ?? ''}${result.stderr ?? ''}`);
      if (result.status !== 0 || !fs.existsSync(source)) {
        throw new Error(`npm run package failed (exit ${result.status}); see ${logFile}`);
      }
      built = reason;
    }
  }
  if (!fs.existsSync(source)) throw new Error(`no .vsix at ${source}`);
  const copy = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-vsix-')), path.basename(source));
  fs.copyFileSync(source, copy);
  return { file: copy, source, version, built, buildMs };
}

/** Why the package must be rebuilt, or '' when it is up to date. */
function staleness(root: string, vsix: string): string {
  if (!fs.existsSync(vsix)) return 'missing';
  const packaged = fs.statSync(vsix).mtimeMs;
  for (const input of PACKAGE_INPUTS) {
    const newer = newerThan(path.join(root, input), packaged);
    if (newer) return `${path.relative(root, newer)} is newer`;
  }
  return '';
}

function newerThan(file: string, mtimeMs: number): string | undefined {
  let stat: fs.Stats;
  try {
    stat = fs.statSync(file);
  } catch {
    return undefined;
  }
  if (!stat.isDirectory()) return stat.mtimeMs > mtimeMs ? file : undefined;
  // A deleted file shows only as its folder's mtime.
  if (stat.mtimeMs > mtimeMs) return file;
  for (const entry of fs.readdirSync(file)) {
    const found = newerThan(path.join(file, entry), mtimeMs);
    if (found) return found;
  }
  return undefined;
}
