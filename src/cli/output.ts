// Files the command line writes (a model, scored rows, an ONNX file) are checked before any work starts, so a
// typo in a path costs a second rather than a whole fit, and a failed write is told in one sentence about the
// path the user gave, never the temporary file it was being written through.
import { constants, promises as fs } from 'node:fs';
import * as path from 'node:path';
import { outputPlace } from '../core/atomic';
import { reasonOf, systemCode } from '../core/file-errors';
import { refuseInputAsOutput, type GuardedInput } from '../core/output-guard';

export class OutputError extends Error {
  /** true: found before any work, a wrong command line (exit 2); false: the write itself failed (exit 1). */
  constructor(message: string, readonly beforeWork = true) {
    super(message);
    this.name = 'OutputError';
  }
}

/** One input the output must not replace (core's GuardedInput). */
export type Guarded = GuardedInput;

/**
 * Throws an OverwriteError (core's one check, shared with the editor) when `out` leads to one of the inputs,
 * and an OutputError when it cannot be written (its folder is missing or read-only, or it is a folder).
 * A FIFO, a device and "-" (standard output) are written directly, so only their existence matters.
 */
export async function checkOutput(out: string, flag: string, inputs: readonly Guarded[] = []): Promise<void> {
  await refuseInputAsOutput(out, flag, inputs);
  let place;
  try {
    place = outputPlace(out);
  } catch (e) {
    throw new OutputError(`Cannot write ${out}: ${reasonOf(e)}.`);
  }
  if (place.direct) return;
  const via = place.path === path.resolve(out) ? '' : ` (a link to ${place.path})`;
  const stat = await fs.stat(place.path).catch(() => undefined);
  if (stat?.isDirectory()) throw new OutputError(`Cannot write ${out}${via}: it is a folder; give a file name.`);
  const dir = path.dirname(place.path);
  const shownDir = via ? dir : path.dirname(out);
  const folder = await fs.stat(dir).catch(() => undefined);
  if (!folder) throw new OutputError(`Cannot write ${out}${via}: the folder ${shownDir} does not exist.`);
  if (!folder.isDirectory()) throw new OutputError(`Cannot write ${out}${via}: ${shownDir} is not a folder.`);
  try {
    await fs.access(dir, constants.W_OK);
  } catch {
    throw new OutputError(`Cannot write ${out}${via}: the folder ${shownDir} is not writable.`);
  }
}

/** A file-system error met while writing `out`, told about `out` itself; other errors pass through. */
export function writeFailure(e: unknown, out: string): unknown {
  if (!systemCode(e)) return e;
  const where = toStdout(out) ? 'standard output' : out;
  return new OutputError(`Could not write ${where}: ${reasonOf(e)}.`, false);
}

/** True when the output is standard output: "-", or a name for it such as /dev/stdout. */
export function toStdout(out: string | undefined): boolean {
  if (out === undefined) return false;
  try {
    return outputPlace(out).stdout;
  } catch {
    return false;
  }
}

/** "--out - and --json" both want standard output: refused before any work. */
export function oneStdout(out: string | undefined, json: boolean, label: string): void {
  if (toStdout(out) && json) throw new OutputError(`${label} and --json both write to standard output; give a file name instead of -, or leave out --json.`);
}
