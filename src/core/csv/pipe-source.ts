// Input that can be read only once, from the start: standard input ("-"), a FIFO, process substitution (<(...)),
// a character device. A positioned read of such input fails with ESPIPE, so it is streamed as it comes; the
// bytes are also copied to a private temporary file as they pass, because the loader goes back to place an error
// on its line (and a caller may want a second pass). The copy is removed by dispose(), which the loader's
// callers run when the load ends, however it ends.
import { createReadStream, createWriteStream, rmSync, statSync, type WriteStream } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { Readable } from 'node:stream';
import { CHUNK_BYTES, type ByteSource } from './sources';

/** What messages call standard input. */
export const STDIN_LABEL = 'standard input';

/** True for the name that means standard input, and for paths that cannot be read at an offset. */
export function isOneWayInput(file: string): boolean {
  if (file === '-') return true;
  try {
    const st = statSync(file);
    return st.isFIFO() || st.isCharacterDevice() || st.isSocket();
  } catch {
    return false; // a missing file is reported by the ordinary file source, with its own sentence
  }
}

export interface OneWaySource extends ByteSource {
  /** Removes the temporary copy; safe to call more than once. */
  dispose(): void;
}

/**
 * A source over a stream read once. read(0) the first time gives the stream itself (copied aside as it goes);
 * any later read comes from the copy, which holds every byte the first read has passed so far.
 */
export function oneWaySource(open: () => Readable, label: string): OneWaySource {
  let spool: string | undefined;
  let copy: WriteStream | undefined;
  let started = false;
  const finishCopy = async (): Promise<void> => {
    const c = copy;
    copy = undefined;
    if (c) await new Promise<void>((resolve) => c.end(resolve));
  };
  return {
    label,
    read(start: number): AsyncIterable<Buffer> {
      if (!started) {
        started = true;
        if (start !== 0) throw new Error('a one-way input is first read from its start');
        spool = path.join(tmpdir(), `copse-input-${process.pid}-${Date.now().toString(36)}.csv`);
        const out = createWriteStream(spool, { flags: 'wx', mode: 0o600 });
        copy = out;
        // A copy that fails (a full disk) only costs the line number of a later error; the load goes on.
        out.on('error', () => undefined);
        const stream = open();
        return (async function* () {
          for await (const chunk of stream as AsyncIterable<Buffer>) {
            if (!out.destroyed && !out.write(chunk)) await new Promise<void>((resolve) => out.once('drain', () => resolve()));
            yield chunk;
          }
          await finishCopy();
        })();
      }
      const file = spool as string;
      return (async function* () {
        await finishCopy();
        yield* createReadStream(file, { start, highWaterMark: CHUNK_BYTES }) as AsyncIterable<Buffer>;
      })();
    },
    dispose(): void {
      copy?.destroy();
      copy = undefined;
      // Synchronous, so it also runs from an 'exit' handler.
      if (spool !== undefined) rmSync(spool, { force: true });
    },
  };
}

/** Standard input, or a path that is a pipe or device, as a one-way source. */
export function oneWayFileSource(file: string): OneWaySource {
  if (file === '-') return oneWaySource(() => process.stdin, STDIN_LABEL);
  // No `start`: a positioned read is exactly what a pipe refuses.
  return oneWaySource(() => createReadStream(file, { highWaterMark: CHUNK_BYTES }), file);
}

