// A model file's lines, read a chunk at a time and bounded before any string is made: a line longer than one
// tree can be, a run of blank lines no writer makes, or a file larger than any forest Copse saves is refused in
// one sentence rather than exhausting memory or minutes. The bounds are src/core/limits.ts's, which the writer
// keeps too, so every file `copse fit` writes reads back.
import { createReadStream, promises as fs } from 'node:fs';
import { grouped, MAX_MODEL_BLANK_BYTES, MAX_MODEL_BYTES, MAX_MODEL_LINE_BYTES } from '../limits';
import { ModelError } from './validate';

export interface LineBounds {
  readonly maxLineBytes: number;
  readonly maxBlankBytes: number;
  readonly maxFileBytes: number;
}

export const MODEL_LINE_BOUNDS: LineBounds = { maxLineBytes: MAX_MODEL_LINE_BYTES, maxBlankBytes: MAX_MODEL_BLANK_BYTES, maxFileBytes: MAX_MODEL_BYTES };

function mib(bytes: number): string {
  return bytes >= 2 ** 20 ? `${grouped(Math.round(bytes / 2 ** 20))} MiB` : `${grouped(bytes)} bytes`;
}

function isBlank(parts: readonly Buffer[]): boolean {
  for (const p of parts) {
    for (let i = 0; i < p.length; i++) {
      const c = p[i];
      if (c !== 0x20 && c !== 0x09 && c !== 0x0d) return false;
    }
  }
  return true;
}

/**
 * The lines of `chunks` (LF or CRLF ends), blank ones as ''. `label` names the input in messages. Throws a
 * ModelError past a bound.
 */
export async function* boundedLines(chunks: AsyncIterable<Buffer>, label: string, bounds: LineBounds = MODEL_LINE_BOUNDS): AsyncGenerator<string> {
  let parts: Buffer[] = [];
  let length = 0;
  let blank = 0;
  let line = 1;
  const take = (): string => {
    const whole = parts.length === 1 ? parts[0] : Buffer.concat(parts, length);
    parts = [];
    length = 0;
    if (isBlank([whole])) {
      blank += whole.length + 1;
      if (blank > bounds.maxBlankBytes) {
        throw new ModelError(`${label} is not a valid Copse model: it has more than ${mib(bounds.maxBlankBytes)} of blank lines (by line ${grouped(line)}), which no Copse model holds.`);
      }
      return '';
    }
    const end = whole[whole.length - 1] === 0x0d ? whole.length - 1 : whole.length;
    return whole.toString('utf8', 0, end);
  };
  for await (const chunk of chunks) {
    let at = 0;
    while (at < chunk.length) {
      const nl = chunk.indexOf(0x0a, at);
      const stop = nl < 0 ? chunk.length : nl;
      length += stop - at;
      if (length > bounds.maxLineBytes) {
        throw new ModelError(`${label} is not a valid Copse model: line ${grouped(line)} is longer than ${mib(bounds.maxLineBytes)}, the most one line of a model may hold.`);
      }
      if (stop > at) parts.push(chunk.subarray(at, stop));
      if (nl < 0) break;
      yield take();
      line++;
      at = nl + 1;
    }
  }
  if (length > 0) yield take();
}

/** The lines of a model file, its size checked before a byte is read. */
export async function* modelFileLines(path: string, bounds: LineBounds = MODEL_LINE_BOUNDS): AsyncGenerator<string> {
  const { size } = await fs.stat(path);
  if (size > bounds.maxFileBytes) {
    throw new ModelError(`${path} is not a usable Copse model: it has ${grouped(size)} bytes, more than the limit of ${mib(bounds.maxFileBytes)} for a model file.`);
  }
  yield* boundedLines(createReadStream(path, { highWaterMark: 1 << 20 }) as AsyncIterable<Buffer>, path, bounds);
}
