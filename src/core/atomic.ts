// Files are written beside their target under a temporary name and renamed into place, so a reader never sees
// half a file and a failed write leaves the target as it was.
import { randomBytes } from 'node:crypto';
import { promises as fs } from 'node:fs';

/** A fresh temporary name in the target's folder (a rename within one folder is atomic). */
export function tempBeside(path: string): string {
  return `${path}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
}

export async function writeFileAtomic(path: string, data: string | Uint8Array): Promise<void> {
  const tmp = tempBeside(path);
  try {
    await fs.writeFile(tmp, data, { flag: 'wx' });
    await fs.rename(tmp, path);
  } catch (e) {
    await fs.rm(tmp, { force: true });
    throw e;
  }
}
