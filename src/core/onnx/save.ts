// Writing a forest as an ONNX file, for the CLI and the editor alike.
import { writeFileAtomic } from '../atomic';
import type { Forest } from '../forest/forest';
import { exportOnnx } from './export';

/** Writes atomically beside the target (see writeFileAtomic). Returns the size. */
export async function saveOnnxFile(path: string, forest: Forest): Promise<number> {
  const bytes = exportOnnx(forest);
  await writeFileAtomic(path, bytes);
  return bytes.length;
}
