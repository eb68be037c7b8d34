// The `copse` command line as the reference the panel is checked against:
// the same core, driven through its own front door (bin/copse.js), so the
// extension's wiring of settings, loading and scoring is what gets compared.

import { spawn } from 'child_process';
import * as path from 'path';
import { repoRoot } from '../harness/paths';

export interface CliConfusion {
  labels: string[];
  counts: number[][];
}

export interface CliFit {
  task: 'classification' | 'regression';
  features: string[];
  classes: string[];
  suspectCount: number | null;
  trees: number;
  settings: { trees: number; seed: number };
  oob: { accuracy?: number; r2?: number; confusion?: CliConfusion } | null;
}

export interface CliVoteRow {
  row: number;
  line: number;
  prediction: string | number;
  counts?: Record<string, number>;
  trees: Array<string | number>;
}

export interface CliVotes {
  trees: number;
  rows: CliVoteRow[];
}

/** Runs `node bin/copse.js ...args --json` and parses what it prints. */
export function copseJson<T>(args: string[]): Promise<T> {
  const bin = path.join(repoRoot(), 'bin', 'copse.js');
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [bin, ...args, '--json'], { stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => (err += d));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) return reject(new Error(`copse ${args.join(' ')} exited ${code}:\n${err}`));
      try {
        resolve(JSON.parse(out) as T);
      } catch (e) {
        reject(new Error(`copse ${args.join(' ')} printed no JSON: ${(e as Error).message}\n${out.slice(0, 500)}`));
      }
    });
  });
}

/**
 * The headline figure as the panel shows it: accuracy as a percentage
 * with one decimal ("95.3%"), R² with three decimals.
 */
export function contractHeadline(fit: CliFit): string {
  if (!fit.oob) throw new Error('the CLI reported no out-of-bag score');
  if (fit.task === 'classification') return `${(fit.oob.accuracy! * 100).toFixed(1)}%`;
  return fit.oob.r2!.toFixed(3);
}
