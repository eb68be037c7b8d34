// Where the bytes come from: a file on disk (streamed, opened read-only) or text already in memory.

import { createReadStream } from 'node:fs';

/** Read size: large enough that per-chunk costs vanish, small enough to stop promptly when aborted. */
export const CHUNK_BYTES = 1 << 20;

export interface ByteSource {
  /** How messages name the input. */
  readonly label: string;
  /** The bytes from `start` to the end, in order. Read again only to place an error on its line. */
  read(start: number): AsyncIterable<Buffer>;
}

export function fileSource(path: string, chunkBytes = CHUNK_BYTES): ByteSource {
  return {
    label: path,
    read: (start) => createReadStream(path, { start, flags: 'r', highWaterMark: chunkBytes }),
  };
}

export function textSource(text: string, label: string, chunkBytes = CHUNK_BYTES): ByteSource {
  const bytes = Buffer.from(text, 'utf8');
  return {
    label,
    // eslint-disable-next-line @typescript-eslint/require-await -- async so the reader gets the AsyncIterable it takes; the bytes are already here.
    read: async function* (start) {
      for (let at = start; at < bytes.length; at += chunkBytes) {
        yield bytes.subarray(at, Math.min(bytes.length, at + chunkBytes));
      }
    },
  };
}

/** A sentence for an error opening or reading the file, or undefined when it is not such an error. */
export function describeReadError(err: unknown, label: string): string | undefined {
  const code = (err as { code?: unknown } | null)?.code;
  switch (code) {
    case 'ENOENT':
      return `Cannot read ${label}: there is no such file.`;
    case 'EISDIR':
      return `Cannot read ${label}: it is a folder, not a file.`;
    case 'EACCES':
    case 'EPERM':
      return `Cannot read ${label}: permission denied.`;
    default:
      return undefined;
  }
}
