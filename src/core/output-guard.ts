// The one check every output goes through, on the command line and in the editor: an output may never be one of
// the command's inputs, however it is reached. Paths are not compared as text: a symbolic link, a hard link,
// "./x/../train.csv" or another spelling on a case-insensitive disk all lead to the same file, so the files
// are compared by device and inode, and by resolved path when the output does not exist yet.
import { fstatSync, promises as fs, type Stats } from 'node:fs';
import * as path from 'node:path';
import { outputPlace } from './atomic';

/** Writing the output would destroy an input. */
export class OverwriteError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'OverwriteError';
  }
}

/** One input an output must not replace, and what to call it in the refusal. */
export interface GuardedInput {
  readonly file: string;
  /** "the data file", "the model": what would be lost. */
  readonly what: string;
  /** The whole refusal, when the default wording will not do. */
  readonly refusal?: string;
}

async function statOf(file: string): Promise<Stats | undefined> {
  if (file === '-') {
    try {
      return fstatSync(0);
    } catch {
      return undefined;
    }
  }
  return fs.stat(file).catch(() => undefined);
}

/** The input `out` would write over, or undefined when it is none of them. */
export async function inputAt(out: string, inputs: readonly GuardedInput[]): Promise<GuardedInput | undefined> {
  // Standard output as an output writes over no file (and "-" as an input is standard input, not a file).
  if (out === '-') return undefined;
  const target = await statOf(out);
  let place: string | undefined;
  try {
    place = outputPlace(out).path;
  } catch {
    place = path.resolve(out);
  }
  for (const input of inputs) {
    if (input.file === '-' && out !== '-') {
      const stdin = await statOf('-');
      if (target && stdin?.isFile() && stdin.dev === target.dev && stdin.ino === target.ino) return input;
      continue;
    }
    const stat = await statOf(input.file);
    if (!stat || stat.isDirectory()) continue;
    if (target) {
      // A FIFO or device read as input and written as output is still the same file: refused too.
      if (stat.dev === target.dev && stat.ino === target.ino) return input;
    } else if (place === (await fs.realpath(input.file).catch(() => path.resolve(input.file)))) {
      return input;
    }
  }
  return undefined;
}

/** Throws an OverwriteError naming the input when `out` leads to one of `inputs`. `flag` names the option. */
export async function refuseInputAsOutput(out: string, flag: string, inputs: readonly GuardedInput[]): Promise<void> {
  const hit = await inputAt(out, inputs);
  if (!hit) return;
  const same = path.resolve(out) === path.resolve(hit.file) ? '' : ` (the same file as ${hit.file})`;
  throw new OverwriteError(hit.refusal ?? `Refusing to write ${out}: it is ${hit.what}${same}, which would be lost; choose another ${flag} file.`);
}
