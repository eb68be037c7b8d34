import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as path from 'path';
import { repoRoot } from './paths';

/**
 * Packs an extension folder into a .vsix with the repo's own vsce, the tool
 * `npm run package` uses, and returns the file's path. For fixtures: they
 * have no dependencies and no license file, hence the flags.
 */
export function packExtension(folder: string, outDir: string): string {
  const vsce = path.join(repoRoot(), 'node_modules', '@vscode', 'vsce', 'vsce');
  const manifest = JSON.parse(fs.readFileSync(path.join(folder, 'package.json'), 'utf8')) as { publisher: string; name: string; version: string };
  const out = path.join(outDir, `${manifest.publisher}.${manifest.name}-${manifest.version}.vsix`);
  const result = spawnSync(
    process.execPath,
    [vsce, 'package', '--no-dependencies', '--skip-license', '--allow-missing-repository', '--out', out],
    { cwd: folder, encoding: 'utf8', timeout: 60_000 },
  );
  if (result.status !== 0 || !fs.existsSync(out)) {
    throw new Error(`vsce package in ${folder} failed (exit ${result.status}):\n${result.stdout}${result.stderr}`);
  }
  return out;
}

/** A fixture folder under test/e2e/fixtures, found from the sources, not from out/. */
export function fixturePath(...parts: string[]): string {
  return path.join(repoRoot(), 'test', 'e2e', 'fixtures', ...parts);
}
