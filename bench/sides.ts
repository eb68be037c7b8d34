// The three implementations, each driven through its own command line on the same files with the
// same forest settings. Copse is run through its CLI (bin/copse.js), as a user would run it.
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { numberAt, runProcess, type ProcessResult } from './run-process';

export type SideName = 'Copse' | 'scikit-learn' | 'ranger';

export interface Settings {
  readonly trees: number;
  readonly featuresPerSplit: number;
  readonly workers: number;
  readonly seed: number;
  readonly target: string;
}

export interface SmallCase {
  readonly train: string;
  readonly test: string;
  readonly predict: string;
  readonly modelDir: string;
}

/** Figures for cases (a) and (b). Times in seconds; undefined when the side did not report them. */
export interface SmallResult {
  readonly fit?: number;
  /** Copse only: the same fit with permutation importance on (its default), which the others skip. */
  readonly fitWithImportance?: number;
  readonly load?: number;
  readonly predict?: number;
  readonly testAccuracy?: number;
  /** Accuracy on the prediction file, from the predictions each side wrote: checks the saved model. */
  readonly predictAccuracy?: number;
  readonly oobAccuracy?: number;
  readonly predictRows?: number;
  readonly peakMegabytes?: number;
  readonly notes: string[];
}

/** Figures for case (c). */
export interface LargeResult {
  readonly load?: number;
  readonly fit?: number;
  readonly oobAccuracy?: number;
  readonly peakMegabytes?: number;
  readonly wallSeconds: number;
  readonly notes: string[];
}

export interface Side {
  readonly name: SideName;
  readonly version?: string;
  available(): Promise<string | true>;
  small(files: SmallCase, s: Settings): Promise<SmallResult>;
  large(file: string, s: Settings): Promise<LargeResult>;
}

const HOUR = 3600;
const PYTHON = '/usr/bin/python3';
const RSCRIPT = '/usr/bin/Rscript';

function failure(what: string, r: ProcessResult): string {
  const tail = r.stderrTail.split('\n').slice(-3).join(' | ');
  return `${what} failed (exit ${r.exitCode}): ${r.firstError && !tail.includes(r.firstError) ? r.firstError + ' ... ' : ''}${tail}`;
}

/** Share of rows whose `predicted` column equals `actual`, from a CSV with plain unquoted cells. */
function accuracyFromCsv(file: string, actual: string, predicted: string): number | undefined {
  const lines = readFileSync(file, 'utf8').split('\n').filter((l) => l.length > 0);
  const header = lines[0].split(',');
  const a = header.indexOf(actual);
  const p = header.indexOf(predicted);
  if (a < 0 || p < 0 || lines.length < 2) return undefined;
  let right = 0;
  for (let i = 1; i < lines.length; i++) {
    const cells = lines[i].split(',');
    if (cells[a] === cells[p]) right++;
  }
  return right / (lines.length - 1);
}

// ------------------------------------------------------------------------------------------------
// Copse: `copse fit ... --json` and `copse predict ... --json`.

export function copseSide(repoRoot: string): Side {
  const cli = path.join(repoRoot, 'bin', 'copse.js');
  const node = process.execPath;
  const fitArgs = (file: string, s: Settings): string[] => [
    cli, 'fit', file, '--target', s.target, '--task', 'classification', '--trees', String(s.trees),
    '--features-per-split', String(s.featuresPerSplit), '--seed', String(s.seed), '--workers', String(s.workers), '--json',
  ];
  let version: string | undefined;
  return {
    name: 'Copse',
    get version() {
      return version;
    },
    async available() {
      const r = await runProcess(node, [cli, '--help'], { timeoutSeconds: 60 });
      if (r.exitCode !== 0) return `copse --help failed: ${r.firstError ?? r.stderrTail.split('\n')[0] ?? ''}`;
      const pkg: unknown = JSON.parse(readFileSync(path.join(repoRoot, 'package.json'), 'utf8'));
      version = pkg && typeof pkg === 'object' && 'version' in pkg ? String(pkg.version) : undefined;
      return true;
    },
    async small(files, s) {
      const notes: string[] = [];
      const model = path.join(files.modelDir, 'copse-model.json');
      // --no-importance: sklearn and ranger are timed without permutation importance, so Copse is too;
      // the run with it (Copse's default) is timed separately below.
      const fit = await runProcess(node, [...fitArgs(files.train, s), '--no-importance', '--test', files.test, '--save', model], { timeoutSeconds: HOUR });
      if (!fit.ok) return { notes: [failure('copse fit', fit)] };
      let fitSeconds = numberAt(fit.json, 'seconds.fit');
      if (fitSeconds === undefined) {
        fitSeconds = fit.wallSeconds;
        notes.push('copse fit JSON has no seconds.fit: wall time of the whole command shown');
      }
      const withImportance = await runProcess(node, fitArgs(files.train, s), { timeoutSeconds: HOUR });
      if (!withImportance.ok) notes.push(failure('copse fit with importance', withImportance));
      const out = path.join(files.modelDir, 'copse-predictions.csv');
      const pred = await runProcess(node, [cli, 'predict', model, files.predict, '--out', out, '--json'], { timeoutSeconds: HOUR });
      let predictSeconds: number | undefined;
      let predictAccuracy: number | undefined;
      if (!pred.ok) notes.push(failure('copse predict', pred));
      else {
        predictAccuracy = accuracyFromCsv(out, s.target, `predicted_${s.target}`);
        if (predictAccuracy === undefined) notes.push(`copse predict: no "predicted_${s.target}" column in ${path.basename(out)} to score`);
        predictSeconds = numberAt(pred.json, 'seconds.predict');
        if (predictSeconds === undefined) {
          predictSeconds = pred.wallSeconds;
          notes.push('copse predict JSON has no seconds.predict: wall time of the whole command (with node start-up and model load) shown');
        }
      }
      return {
        fit: fitSeconds,
        fitWithImportance: withImportance.ok ? numberAt(withImportance.json, 'seconds.fit') : undefined,
        load: numberAt(fit.json, 'seconds.load'),
        predict: predictSeconds,
        predictAccuracy,
        testAccuracy: numberAt(fit.json, 'test.accuracy'),
        oobAccuracy: numberAt(fit.json, 'oob.accuracy'),
        predictRows: pred.ok ? numberAt(pred.json, 'rows') : undefined,
        peakMegabytes: fit.peakMegabytes,
        notes,
      };
    },
    async large(file, s) {
      const r = await runProcess(node, [...fitArgs(file, s), '--no-importance'], { timeoutSeconds: 3 * HOUR });
      if (!r.ok) return { wallSeconds: r.wallSeconds, peakMegabytes: r.peakMegabytes, notes: [failure('copse fit', r)] };
      return {
        load: numberAt(r.json, 'seconds.load'),
        fit: numberAt(r.json, 'seconds.fit'),
        oobAccuracy: numberAt(r.json, 'oob.accuracy'),
        peakMegabytes: r.peakMegabytes,
        wallSeconds: r.wallSeconds,
        notes: [],
      };
    },
  };
}

// ------------------------------------------------------------------------------------------------
// scikit-learn and ranger share one calling convention: bench/sklearn_side.py, bench/ranger_side.R.

function scriptSide(name: SideName, interpreter: string, script: string, probe: string[]): Side {
  const args = (s: Settings, train: string): string[] => [
    script, '--train', train, '--target', s.target, '--trees', String(s.trees),
    '--features-per-split', String(s.featuresPerSplit), '--workers', String(s.workers), '--seed', String(s.seed),
  ];
  let version: string | undefined;
  return {
    name,
    get version() {
      return version;
    },
    async available() {
      if (!existsSync(interpreter)) return `${interpreter} is not installed`;
      const r = await runProcess(interpreter, probe, { timeoutSeconds: 120 });
      if (r.exitCode !== 0) return `not installed (${r.stderrTail.split('\n').slice(-1)[0] ?? ''})`;
      const out = typeof r.json?.version === 'string' ? r.json.version : '';
      version = out || undefined;
      return true;
    },
    async small(files, s) {
      const r = await runProcess(interpreter, [...args(s, files.train), '--test', files.test, '--predict', files.predict], { timeoutSeconds: HOUR });
      if (!r.ok) return { notes: [failure(name, r)] };
      return {
        fit: numberAt(r.json, 'seconds.fit'),
        load: numberAt(r.json, 'seconds.load'),
        predict: numberAt(r.json, 'seconds.predict'),
        testAccuracy: numberAt(r.json, 'test.accuracy'),
        oobAccuracy: numberAt(r.json, 'oob.accuracy'),
        predictAccuracy: numberAt(r.json, 'predictAccuracy'),
        predictRows: numberAt(r.json, 'predictRows'),
        peakMegabytes: r.peakMegabytes,
        notes: [],
      };
    },
    async large(file, s) {
      const r = await runProcess(interpreter, args(s, file), { timeoutSeconds: 3 * HOUR });
      if (!r.ok) return { wallSeconds: r.wallSeconds, peakMegabytes: r.peakMegabytes, notes: [failure(name, r)] };
      return {
        load: numberAt(r.json, 'seconds.load'),
        fit: numberAt(r.json, 'seconds.fit'),
        oobAccuracy: numberAt(r.json, 'oob.accuracy'),
        peakMegabytes: r.peakMegabytes,
        wallSeconds: r.wallSeconds,
        notes: [],
      };
    },
  };
}

export function sklearnSide(benchDir: string): Side {
  return scriptSide('scikit-learn', PYTHON, path.join(benchDir, 'sklearn_side.py'), [
    '-c', 'import json, sklearn, pandas; print(json.dumps({"version": sklearn.__version__}))',
  ]);
}

export function rangerSide(benchDir: string): Side {
  return scriptSide('ranger', RSCRIPT, path.join(benchDir, 'ranger_side.R'), [
    '-e', 'suppressPackageStartupMessages({library(ranger); library(data.table); library(jsonlite)}); cat(toJSON(list(version = as.character(packageVersion("ranger"))), auto_unbox = TRUE), "\\n")',
  ]);
}
