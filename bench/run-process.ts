// Runs one benchmark side as a child process and reports its JSON, wall time and peak memory.
// Peak memory comes from GNU time's "Maximum resident set size": every side (Copse's worker
// threads, sklearn's thread pool, ranger's threads) runs in one process, so that is its peak.
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';

export const GNU_TIME = '/usr/bin/time';

export interface ProcessResult {
  readonly ok: boolean;
  /** The last line of stdout that parses as a JSON object, if any. */
  readonly json?: Record<string, unknown>;
  readonly wallSeconds: number;
  readonly peakMegabytes?: number;
  readonly exitCode: number | null;
  /** stderr without GNU time's report, trimmed to its end, for error messages. */
  readonly stderrTail: string;
  /** The first stderr line that names an error, which a long stack trace would push out of the tail. */
  readonly firstError?: string;
}

export function runProcess(command: string, args: readonly string[], options: { cwd?: string; timeoutSeconds?: number } = {}): Promise<ProcessResult> {
  const timed = existsSync(GNU_TIME);
  const file = timed ? GNU_TIME : command;
  const argv = timed ? ['-v', command, ...args] : [...args];
  const started = performance.now();
  return new Promise((resolve) => {
    const child = spawn(file, argv, { cwd: options.cwd, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.setEncoding('utf8').on('data', (d: string) => (stdout += d));
    child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    const timer = options.timeoutSeconds
      ? setTimeout(() => child.kill('SIGKILL'), options.timeoutSeconds * 1000)
      : undefined;
    child.on('close', (code) => {
      if (timer) clearTimeout(timer);
      const wallSeconds = (performance.now() - started) / 1000;
      const rss = /Maximum resident set size \(kbytes\): (\d+)/.exec(stderr);
      const report = stderr.indexOf('\tCommand being timed:');
      const ownStderr = (report >= 0 ? stderr.slice(0, report) : stderr).trim();
      const json = lastJsonObject(stdout);
      // GNU time exits with the child's status, or reports it as "Command exited with non-zero status".
      const ok = code === 0 && json !== undefined;
      resolve({
        ok,
        json,
        wallSeconds,
        peakMegabytes: rss ? Number(rss[1]) / 1024 : undefined,
        exitCode: code,
        stderrTail: ownStderr.slice(-800),
        firstError: ownStderr.split('\n').find((t) => /\bError\b|error:/i.test(t))?.trim(),
      });
    });
  });
}

function lastJsonObject(text: string): Record<string, unknown> | undefined {
  const lines = text.trim().split('\n');
  for (let i = lines.length - 1; i >= 0; i--) {
    const line = lines[i].trim();
    if (!line.startsWith('{')) continue;
    try {
      const value: unknown = JSON.parse(line);
      if (value && typeof value === 'object' && !Array.isArray(value)) return value as Record<string, unknown>;
    } catch {
      // Not JSON after all; keep looking upward.
    }
  }
  // Pretty-printed output: try the whole of stdout.
  try {
    const value: unknown = JSON.parse(text);
    if (value && typeof value === 'object' && !Array.isArray(value)) return value as Record<string, unknown>;
  } catch {
    return undefined;
  }
  return undefined;
}

/** Reads a number at a dotted path such as "seconds.fit"; undefined when absent or not a number. */
export function numberAt(json: Record<string, unknown> | undefined, dotted: string): number | undefined {
  let node: unknown = json;
  for (const key of dotted.split('.')) {
    if (!node || typeof node !== 'object') return undefined;
    node = (node as Record<string, unknown>)[key];
  }
  return typeof node === 'number' && Number.isFinite(node) ? node : undefined;
}
