// Files the command line writes (a model, scored rows, an ONNX file) are checked before any work starts, so a
// typo in a path costs a second rather than a whole fit, and a failed write is told in one sentence about the
// path the user gave, never the temporary file it was being written through.
import { constants, promises as fs } from 'node:fs';
import * as path from 'node:path';
import { OverwriteError } from '../core/forest/score-file';

export class OutputError extends Error {
  /** true: found before any work, a wrong command line (exit 2); false: the write itself failed (exit 1). */
  constructor(message: string, readonly beforeWork = true) {
    super(message);
    this.name = 'OutputError';
  }
}

/** One input the output must not replace, and what to call it in the refusal. */
export interface Guarded {
  readonly file: string;
  readonly what: string;
  /** The whole refusal, when the default wording will not do. */
  readonly refusal?: string;
}

async function real(file: string): Promise<string> {
  return fs.realpath(file).catch(() => path.resolve(file));
}

/**
 * Throws an OutputError when `out` cannot be written (its folder is missing or read-only, or it is a folder), and
 * an OverwriteError when it is one of the inputs, which writing it would destroy. `flag` names the option.
 */
export async function checkOutput(out: string, flag: string, inputs: readonly Guarded[] = []): Promise<void> {
  const target = await real(out);
  for (const input of inputs) {
    if ((await real(input.file)) === target) {
      // Exit 1 like every refusal to write over an input (core's OverwriteError).
      throw new OverwriteError(input.refusal ?? `Refusing to write ${out}: it is ${input.what}, which would be lost; choose another ${flag} file.`);
    }
  }
  const stat = await fs.stat(out).catch(() => undefined);
  if (stat?.isDirectory()) throw new OutputError(`Cannot write ${out}: it is a folder; give a file name.`);
  const dir = path.dirname(path.resolve(out));
  const folder = await fs.stat(dir).catch(() => undefined);
  if (!folder) throw new OutputError(`Cannot write ${out}: the folder ${path.dirname(out)} does not exist.`);
  if (!folder.isDirectory()) throw new OutputError(`Cannot write ${out}: ${path.dirname(out)} is not a folder.`);
  try {
    await fs.access(dir, constants.W_OK);
  } catch {
    throw new OutputError(`Cannot write ${out}: the folder ${path.dirname(out)} is not writable.`);
  }
}

const REASONS: Record<string, string> = {
  ENOENT: 'its folder does not exist',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  EROFS: 'the file system is read-only',
  ENOSPC: 'the disk is full',
  EDQUOT: 'the disk quota is used up',
  EISDIR: 'it is a folder',
  ENOTDIR: 'part of the path is not a folder',
};

/** A file-system error met while writing `out`, told about `out` itself; other errors pass through. */
export function writeFailure(e: unknown, out: string): unknown {
  const code = (e as NodeJS.ErrnoException)?.code;
  if (!code || !(e instanceof Error) || !('syscall' in e)) return e;
  return new OutputError(`Could not write ${out}: ${REASONS[code] ?? code.toLowerCase()}.`, false);
}
