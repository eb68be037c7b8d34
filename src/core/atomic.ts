// Files are written beside their target under a temporary name and renamed into place, so a reader never sees
// half a file and a failed write leaves the target as it was. Every temporary name is remembered until it is
// renamed or removed, so a command stopped by a signal can remove what it left (removePendingTemps).
// An output that is a symbolic link is written at the link's target (the link stays a link); a FIFO, a
// character device or a terminal is written directly, since renaming a file over it would replace the device
// itself; "-" is standard output.
import { randomBytes } from 'node:crypto';
import { closeSync, fchmodSync, lstatSync, openSync, promises as fs, readlinkSync, rmSync, statSync, write as writeCb, writeSync } from 'node:fs';
import * as path from 'node:path';

const pending = new Set<string>();

/** A fresh temporary name in the target's folder (a rename within one folder is atomic), remembered until released. */
export function tempBeside(target: string): string {
  const tmp = `${target}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
  pending.add(tmp);
  return tmp;
}

/** The temporary file is gone (renamed into place or removed): nothing to remove on a signal. */
export function releaseTemp(tmp: string): void {
  pending.delete(tmp);
}

/** Removes every temporary file not yet renamed into place; synchronous, for signal and exit handlers. */
export function removePendingTemps(): number {
  let removed = 0;
  for (const tmp of pending) {
    try {
      rmSync(tmp, { force: true });
      removed++;
    } catch {
      // nothing more can be done from a signal handler; the next name is still worth trying
    }
  }
  pending.clear();
  return removed;
}

/** The temporary name `tmp` was made for, so a message never shows the temporary name. */
export function targetOfTemp(name: string): string {
  return name.replace(/\.\d+\.[0-9a-f]{8}\.tmp$/, '');
}

export interface OutputPlace {
  /** Where the bytes go: the file itself, or the final target of a chain of symbolic links. */
  readonly path: string;
  /** Written in place, not through a temporary file: standard output, a FIFO, a device, a /proc or /dev/fd link. */
  readonly direct: boolean;
  /** "-": standard output. */
  readonly stdout: boolean;
}

/** /dev/stdout leads to /proc/self/fd/1, which names an open file, not a place in a folder: never rename over it. */
const OPEN_FILE_LINK = /^\/(?:proc\/[^/]+|dev)\/fd\/\d+$/;
/** Our own standard output, which may be a socket that cannot be opened again by name: written as "-". */
const STDOUT_LINK = new RegExp(`^/(?:proc/(?:self|${process.pid})|dev)/fd/1$`);
const MAX_LINKS = 40;

/** Where writing `file` puts its bytes, following symbolic links (a dangling link leads to the file it names). */
export function outputPlace(file: string): OutputPlace {
  if (file === '-') return { path: '-', direct: true, stdout: true };
  let at = path.resolve(file);
  for (let hops = 0; ; hops++) {
    if (STDOUT_LINK.test(at)) return { path: '-', direct: true, stdout: true };
    if (OPEN_FILE_LINK.test(at)) return { path: file, direct: true, stdout: false };
    const link = lstatSync(at, { throwIfNoEntry: false });
    if (!link?.isSymbolicLink()) break;
    if (hops === MAX_LINKS) throw Object.assign(new Error(`Too many levels of symbolic links at ${file}`), { code: 'ELOOP', syscall: 'open', path: file });
    at = path.resolve(path.dirname(at), readlinkSync(at));
  }
  const stat = statSync(at, { throwIfNoEntry: false });
  const direct = stat !== undefined && !stat.isFile() && !stat.isDirectory();
  return { path: at, direct, stdout: false };
}

/**
 * One output being written: through a temporary file renamed onto the target by commit(), or directly for a
 * device, a FIFO or standard output. abandon() removes the temporary file and leaves the target untouched.
 */
export class OutputFile {
  readonly place: OutputPlace;
  private readonly tmp: string | undefined;
  private fd: number | undefined;

  constructor(file: string) {
    this.place = outputPlace(file);
    if (this.place.stdout) return;
    if (this.place.direct) {
      // Appending: a terminal or pipe does not care, and a file behind /dev/stdout keeps what the shell put there.
      this.fd = openSync(this.place.path, 'a');
      return;
    }
    this.tmp = tempBeside(this.place.path);
    try {
      this.fd = openSync(this.tmp, 'wx');
      // A file being replaced keeps its permissions (a private model stays private).
      const old = statSync(this.place.path, { throwIfNoEntry: false });
      if (old) fchmodSync(this.fd, old.mode & 0o7777);
    } catch (e) {
      if (this.fd !== undefined) closeSync(this.fd);
      rmSync(this.tmp, { force: true });
      releaseTemp(this.tmp);
      throw e;
    }
  }

  writeSync(data: string | Uint8Array): void {
    const bytes = typeof data === 'string' ? Buffer.from(data) : data;
    if (this.place.stdout) return void process.stdout.write(bytes);
    if (this.fd === undefined) throw new Error('The output is closed.');
    for (let at = 0; at < bytes.length; ) at += writeSync(this.fd, bytes, at, bytes.length - at);
  }

  /** The same, without blocking the thread (standard output waits for its reader to drain). */
  async write(data: string | Uint8Array): Promise<void> {
    const bytes = typeof data === 'string' ? Buffer.from(data) : data;
    if (this.place.stdout) {
      if (!process.stdout.write(bytes)) await new Promise<void>((resolve) => process.stdout.once('drain', resolve));
      return;
    }
    const fd = this.fd;
    if (fd === undefined) throw new Error('The output is closed.');
    for (let at = 0; at < bytes.length; ) {
      at += await new Promise<number>((resolve, reject) => writeCb(fd, bytes, at, bytes.length - at, null, (e, n) => (e ? reject(e) : resolve(n))));
    }
  }

  /** Closes the output and, for a file, renames it into place; on failure the temporary file is removed. */
  async commit(): Promise<void> {
    try {
      if (this.fd !== undefined) closeSync(this.fd);
      this.fd = undefined;
      if (this.tmp !== undefined) {
        await fs.rename(this.tmp, this.place.path);
        releaseTemp(this.tmp);
      }
    } catch (e) {
      this.abandon();
      throw e;
    }
  }

  /** Removes the temporary file; the target is untouched. Safe to call more than once. */
  abandon(): void {
    if (this.fd !== undefined) {
      try {
        closeSync(this.fd);
      } catch {
        // already unusable; the removal below is what matters
      }
    }
    this.fd = undefined;
    if (this.tmp !== undefined) {
      rmSync(this.tmp, { force: true });
      releaseTemp(this.tmp);
    }
  }
}

export async function writeFileAtomic(file: string, data: string | Uint8Array): Promise<void> {
  const out = new OutputFile(file);
  try {
    await out.write(data);
    await out.commit();
  } catch (e) {
    out.abandon();
    throw e;
  }
}
