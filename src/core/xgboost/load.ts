// Reading an XGBoost JSON model from disk: the size is checked before the file is read, so an oversized file
// costs no memory, and the content (not the file's name) says whether a .json file is XGBoost's or Copse's.
import { promises as fs } from 'node:fs';
import { ModelError } from '../model/validate';
import { looksLikeXgboostStart, readXgboost, XGBOOST_LIMITS, type XgboostImport, type XgboostLimits } from './read';

export async function loadXgboostFile(path: string, limits: XgboostLimits = XGBOOST_LIMITS): Promise<XgboostImport> {
  let text: string;
  try {
    const { size } = await fs.stat(path);
    if (size > limits.maxBytes) throw new ModelError(`${path} is not a usable XGBoost model: it has ${size} bytes, more than the limit of ${limits.maxBytes}.`);
    text = await fs.readFile(path, 'utf8');
  } catch (e) {
    if (e instanceof ModelError) throw e;
    throw new ModelError(`Cannot read the model ${path}: ${(e as Error).message}`);
  }
  return readXgboost(text, path, limits);
}

/** Whether the file's first bytes are those of an XGBoost JSON model (a Copse model file starts with its own format name). */
export async function isXgboostFile(path: string): Promise<boolean> {
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(path, 'r');
    const { buffer, bytesRead } = await handle.read(Buffer.alloc(4096), 0, 4096, 0);
    return looksLikeXgboostStart(buffer.subarray(0, bytesRead).toString('utf8'));
  } catch {
    return false; // the Copse loader reports the unreadable file
  } finally {
    await handle?.close();
  }
}
