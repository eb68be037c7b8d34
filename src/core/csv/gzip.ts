// Compressed text: a gzip file is decompressed as it streams, so a large .csv.gz never sits whole in memory.

import { createReadStream } from 'node:fs';
import { open } from 'node:fs/promises';
import { createGunzip } from 'node:zlib';
import { CHUNK_BYTES, type ByteSource } from './sources';
import { DataError } from './types';

/** What the first bytes say a file is: gzip and Parquet by their magic numbers, anything else is read as text. */
export type FileFormat = 'gzip' | 'parquet' | 'text';

export async function sniffFormat(path: string): Promise<FileFormat> {
  let head: Buffer;
  try {
    const handle = await open(path, 'r');
    try {
      head = Buffer.alloc(4);
      const { bytesRead } = await handle.read(head, 0, 4, 0);
      head = head.subarray(0, bytesRead);
    } finally {
      await handle.close();
    }
  } catch {
    return 'text'; // the text reader names the problem (no such file, a folder, permission) in its own words
  }
  if (head.length >= 2 && head[0] === 0x1f && head[1] === 0x8b) return 'gzip';
  if (head.length === 4 && head.toString('latin1') === 'PAR1') return 'parquet';
  return 'text';
}

function gzipProblem(err: unknown, label: string): Error {
  const code = (err as { code?: unknown } | null)?.code;
  if (code === 'Z_BUF_ERROR' || (err instanceof Error && /unexpected end of file/i.test(err.message))) {
    return new DataError(`${label} is a gzip file that ends early (it is truncated), so it cannot be read to the end.`);
  }
  if (typeof code === 'string' && code.startsWith('Z_')) {
    return new DataError(`${label} is not valid gzip data (${err instanceof Error ? err.message : code}); the file may be damaged.`);
  }
  return err as Error;
}

/**
 * The decompressed bytes of a gzip file. `read(start)` counts `start` in decompressed bytes: errors are placed
 * on a line by reading again from the top, which for gzip means decompressing again and skipping.
 * Several gzip members one after another (as `cat a.gz b.gz` makes) read as one text.
 */
export function gzipFileSource(path: string, chunkBytes = CHUNK_BYTES): ByteSource {
  return {
    label: path,
    read: async function* (start) {
      const gunzip = createGunzip({ chunkSize: Math.min(chunkBytes, 1 << 20) });
      const input = createReadStream(path, { flags: 'r', highWaterMark: chunkBytes });
      input.on('error', (err) => gunzip.destroy(err));
      input.pipe(gunzip);
      let skipped = 0;
      try {
        for await (const chunk of gunzip as AsyncIterable<Buffer>) {
          if (skipped + chunk.length <= start) {
            skipped += chunk.length;
            continue;
          }
          const from = Math.max(0, start - skipped);
          skipped += chunk.length;
          yield from === 0 ? chunk : chunk.subarray(from);
        }
      } catch (err) {
        throw gzipProblem(err, path);
      } finally {
        input.destroy();
        gunzip.destroy();
      }
    },
  };
}
