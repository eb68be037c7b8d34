// Reading a CSV to score with an existing forest. The loader would leave out a column that looks constant
// or identifier-like in *this* file (a small file where a feature happens not to vary), and the forest
// needs every feature; so its features' kinds are forced. A loader that refuses a forced name the file
// lacks (core's first CSV contract did) gets a second try forcing only the features the header holds;
// either way encodeTable then names exactly what is missing.

import type { ColumnKind, LoadOptions, LoadResult, Schema } from '../engine';

/** Feature kinds to force. Boolean features are read as categorical: a file may hold only one of the two values. */
export function columnTypesFor(schema: Schema): Record<string, ColumnKind> {
  const out: Record<string, ColumnKind> = {};
  for (const f of schema.features) out[f.name] = f.kind === 'numeric' ? 'numeric' : 'categorical';
  return out;
}

export async function loadForForest(
  load: (options: LoadOptions) => Promise<LoadResult>,
  schema: Schema,
  options: LoadOptions = {},
): Promise<LoadResult> {
  const forced = (types: Record<string, ColumnKind>) => load({ ...options, columnTypes: { ...types, ...(options.columnTypes ?? {}) } });
  const types = columnTypesFor(schema);
  try {
    return await forced(types);
  } catch (e) {
    if (e instanceof Error && e.name === 'AbortError') throw e;
  }
  // Some feature is absent (or will not read as its kind). Force only the columns the header has, so the
  // ones present are kept and encodeTable names exactly what is missing.
  const plain = await load(options);
  const present = new Set(plain.header);
  const some = Object.fromEntries(Object.entries(types).filter(([name]) => present.has(name)));
  try {
    return await forced(some);
  } catch (e) {
    if (e instanceof Error && e.name === 'AbortError') throw e;
    return plain;
  }
}
