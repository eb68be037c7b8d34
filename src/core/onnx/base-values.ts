// base_values of the legacy tree operators: one per output, added to the summed leaf weights. A two-class
// classifier whose weights all go to one class (the runtime's one-score binary case) may give one base value for
// that score; it is kept for the class the weights go to, and import.ts places it.
import type { Fail } from './attributes';

export function readBase(values: ArrayLike<number> | undefined, outputs: number, fail: Fail, where: string): Float64Array {
  const base = new Float64Array(outputs);
  if (!values || values.length === 0) return base;
  if (values.length === 1 && outputs === 2) return Float64Array.of(values[0], NaN);
  if (values.length !== outputs) fail(`${where} has ${values.length} base values for ${outputs} outputs`);
  for (let k = 0; k < outputs; k++) {
    if (!Number.isFinite(values[k])) fail(`${where} base value ${k} is not a finite number`);
    base[k] = values[k];
  }
  return base;
}
