// Reading an ONNX file from disk, and giving a foreign model's positional features the names of a CSV's columns.
import { promises as fs } from 'node:fs';
import { reasonOf, systemCode } from '../file-errors';
import type { Forest } from '../forest/forest';
import { ModelError } from '../model/validate';
import { DEFAULT_LIMITS } from './ensemble';
import { readOnnx, type ImportOptions, type OnnxImport } from './import';

/** Checks the size before reading, so an oversized file costs no memory. */
export async function loadOnnxFile(path: string, options: ImportOptions = {}): Promise<OnnxImport> {
  const maxBytes = options.limits?.maxBytes ?? DEFAULT_LIMITS.maxBytes;
  let bytes: Uint8Array;
  try {
    const { size } = await fs.stat(path);
    if (size > maxBytes) throw new ModelError(`${path} is not a usable ONNX tree ensemble: it has ${size} bytes, more than the limit of ${maxBytes}.`);
    bytes = await fs.readFile(path);
  } catch (e) {
    if (e instanceof ModelError) throw e;
    throw new ModelError(`Cannot read the model ${path}: ${systemCode(e) ? `${reasonOf(e)}.` : (e as Error).message}`);
  }
  return readOnnx(bytes, path, options);
}

/**
 * The forest with its features renamed, in order. Trees refer to features by position, so nothing else changes;
 * this is how a model whose file carries no names (f0, f1, ...) is matched to a CSV's columns.
 */
export function nameFeatures(forest: Forest, names: readonly string[]): Forest {
  const p = forest.schema.features.length;
  if (names.length !== p) throw new ModelError(`The model reads ${p} features; ${names.length} names were given.`);
  const seen = new Set<string>();
  for (const n of names) {
    if (n === '') throw new ModelError('A feature name is empty.');
    if (seen.has(n)) throw new ModelError(`The feature name "${n}" is given twice.`);
    seen.add(n);
  }
  return { ...forest, schema: { ...forest.schema, features: forest.schema.features.map((f, j) => ({ ...f, name: names[j] })) } };
}

/**
 * A CSV header's columns as feature names by position, leaving out the named columns (such as the target). It
 * must leave exactly as many columns as the model reads: guessing which extra column to drop would score the
 * wrong values without a word.
 */
export function columnsInOrder(header: readonly string[], count: number, leaveOut: readonly string[] = []): string[] {
  const skip = new Set(leaveOut);
  const columns = header.filter((h) => !skip.has(h));
  if (columns.length !== count) {
    const without = leaveOut.length ? ` besides ${leaveOut.map((c) => `"${c}"`).join(', ')}` : '';
    throw new ModelError(`The model reads ${count} features by position, but the file has ${columns.length} columns${without}; leave out the columns that are not features.`);
  }
  return columns;
}
