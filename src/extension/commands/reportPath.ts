// Where the editor's report goes, and where it must not: no `vscode` here, so the refusal is tested directly.
import { realpathSync } from 'node:fs';
import * as path from 'node:path';

/** Beside the CSV, named for it. */
export function suggestedReportPath(csvPath: string): string {
  return path.join(path.dirname(csvPath), `${path.basename(csvPath).replace(/\.[^.]+$/, '')}-report.html`);
}

const real = (file: string): string => {
  try {
    return realpathSync(file);
  } catch {
    return path.resolve(file);
  }
};

/**
 * Why the report must not go to `target` (it is one of the inputs, which writing would destroy), or undefined.
 * One call, so a shared never-write-over-an-input check can take its place.
 */
export function reportRefusal(target: string, inputs: ReadonlyArray<{ file: string; what: string }>): string | undefined {
  const hit = inputs.find((i) => real(i.file) === real(target));
  return hit ? `Copse will not write the report over ${path.basename(target)}: it is ${hit.what}, which would be lost. Choose another name.` : undefined;
}
