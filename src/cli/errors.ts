// What the command line prints for an error: one sentence for a problem with the user's input, and a plain
// "unexpected" line (the stack with --debug) for anything else, which is a bug. Loaded only after a failure.
import { DataError } from '../core/csv/types';
import { SchemaMismatchError } from '../core/forest/predict';
import { OverwriteError } from '../core/forest/score-file';
import { ModelError } from '../core/model/file';
import { UsageError } from './args';
import { OutputError } from './output';

function isExpected(e: unknown): e is Error {
  return (
    e instanceof UsageError ||
    e instanceof DataError ||
    e instanceof ModelError ||
    e instanceof SchemaMismatchError ||
    e instanceof OverwriteError ||
    e instanceof OutputError ||
    e instanceof RangeError ||
    (e instanceof Error && (e as NodeJS.ErrnoException).code !== undefined)
  );
}

/** The text for stderr and the exit code: 2 for a wrong command line, 1 for anything else. */
export function describe(e: unknown, command: string): { text: string; code: number } {
  const code = e instanceof UsageError || (e instanceof OutputError && e.beforeWork) ? 2 : 1;
  if (!isExpected(e)) {
    return { text: `copse ${command}: unexpected error: ${(e as Error)?.message ?? String(e)} (run with --debug for details)\n`, code };
  }
  // Messages that already start with the command's name are not prefixed twice.
  const prefix = `copse ${command}`;
  let text = e.message.startsWith(prefix) ? `${e.message}\n` : `${prefix}: ${e.message}\n`;
  if (e instanceof UsageError) text += `Run "copse ${command} --help" for the options.\n`;
  return { text, code };
}
