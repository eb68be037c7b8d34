import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';

// Must match CS_VERSION in scripts/e2e/setup.sh, which installs it.
export const CODE_SERVER_VERSION = '4.100.3';

export const CHROMIUM_PATH = process.env.COPSE_E2E_CHROMIUM ?? '/usr/bin/chromium';

/** The cache folder that scripts/e2e/setup.sh fills; outside the repo so fresh work trees share it. */
export function cacheRoot(): string {
  return process.env.COPSE_E2E_CACHE ?? path.join(os.homedir(), '.cache', 'copse-e2e');
}

export function codeServerEntry(): string {
  const installDir = path.join(cacheRoot(), `code-server-${CODE_SERVER_VERSION}`);
  const entry = path.join(installDir, 'node_modules', 'code-server', 'out', 'node', 'entry.js');
  // The stamp, not the entry file, says the install finished (native modules built).
  if (!fs.existsSync(path.join(installDir, '.copse-e2e-ready')) || !fs.existsSync(entry)) {
    throw new Error(`code-server ${CODE_SERVER_VERSION} is not installed in ${installDir}; run: bash scripts/e2e/setup.sh`);
  }
  return entry;
}

/** The repo root, found by walking up, so this works both from test/ sources and from out/test/. */
export function repoRoot(): string {
  let dir = __dirname;
  for (;;) {
    const manifest = path.join(dir, 'package.json');
    if (fs.existsSync(manifest) && (JSON.parse(fs.readFileSync(manifest, 'utf8')) as { name?: unknown }).name === 'copse') return dir;
    const parent = path.dirname(dir);
    if (parent === dir) throw new Error(`no copse package.json above ${__dirname}`);
    dir = parent;
  }
}

/**
 * Screenshots and logs; gitignored. One subfolder per run name, emptied when
 * a run starts so that what it holds is all from the latest run.
 */
export function artifactsDir(runName: string): string {
  const dir = path.join(artifactsRoot(), safeName(runName));
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

/** The folder holding every run's artifacts folder (not emptied). */
export function artifactsRoot(): string {
  return process.env.COPSE_E2E_ARTIFACTS ?? path.join(repoRoot(), '.artifacts', 'e2e');
}

export function safeName(name: string): string {
  return name.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '') || 'run';
}
