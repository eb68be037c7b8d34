// Writing a forest as an ONNX file, for the CLI and the editor alike.
import { randomBytes } from 'node:crypto';
import { promises as fs } from 'node:fs';
import type { Forest } from '../forest/forest';
import { exportOnnx } from './export';

/** Writes to a temporary file beside the target, then renames: a reader never sees half a file. Returns the size. */
export async function saveOnnxFile(path: string, forest: Forest): Promise<number> {
  const bytes = exportOnnx(forest);
  const tmp = `${path}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
  try {
    await fs.writeFile(tmp, bytes, { flag: 'wx' });
    await fs.rename(tmp, path);
  } catch (e) {
    await fs.rm(tmp, { force: true });
    throw e;
  }
  return bytes.length;
}
