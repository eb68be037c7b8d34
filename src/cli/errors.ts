// What the command line prints for an error, and its exit code. A problem with the user's input (a path, a value,
// the data, a model file) is one sentence naming it, exit 1 (2 for a wrong command line). Anything else is a
// failure inside Copse: it says so, suggests --debug, and exits 70 (EX_SOFTWARE in BSD's sysexits.h, common
// practice for an internal software error), so a script can tell a bug from bad input. Loaded only after a failure.
import { InputError } from '../core/base/input-error';
import { DataError } from '../core/csv/types';
import { TrainingMismatchError } from '../core/explain/quantiles';
import { SchemaMismatchError } from '../core/forest/predict';
import { reasonOf, systemCode } from '../core/file-errors';
import { targetOfTemp } from '../core/atomic';
import { ModelError } from '../core/model/file';
import { OverwriteError } from '../core/output-guard';
import { visible } from '../core/visible';
import { UsageError } from './args';
import { OutputError } from './output';

/** Exit codes, as `copse --help` lists them. */
export const EXIT = { ok: 0, input: 1, usage: 2, internal: 70, hangup: 129, interrupted: 130, terminated: 143 } as const;

const INPUT_ERRORS = [UsageError, OutputError, DataError, ModelError, SchemaMismatchError, OverwriteError, InputError, TrainingMismatchError];

/** Error classes whose message is a sentence for the user; a plain RangeError is not one (see InputError). */
function isUsersProblem(e: unknown): e is Error {
  return INPUT_ERRORS.some((c) => e instanceof c);
}

const VERBS: Readonly<Record<string, string>> = { open: 'open', read: 'read', write: 'write', rename: 'write', stat: 'find', lstat: 'find', scandir: 'list', mkdir: 'create', unlink: 'remove', rm: 'remove' };

/** A file-system error that reached the top unexplained, told about the user's path (never a temporary name). */
function systemSentence(e: Error): string {
  const { syscall, path: at } = e as NodeJS.ErrnoException;
  const verb = VERBS[syscall ?? ''] ?? 'use';
  const where = at ? ` ${targetOfTemp(at)}` : ' a file';
  return `Cannot ${verb}${where}: ${reasonOf(e)}.`;
}

/** The text for stderr and the exit code. */
export function describe(e: unknown, command: string): { text: string; code: number } {
  const prefix = `copse ${command}`;
  if (isUsersProblem(e)) {
    const code = e instanceof UsageError || (e instanceof OutputError && e.beforeWork) ? EXIT.usage : EXIT.input;
    // Messages that already start with the command's name are not prefixed twice.
    let text = e.message.startsWith(prefix) ? `${e.message}\n` : `${prefix}: ${e.message}\n`;
    if (e instanceof UsageError) text += `Run "copse ${command} --help" for the options.\n`;
    return { text: visible(text), code };
  }
  if (systemCode(e)) return { text: visible(`${prefix}: ${systemSentence(e as Error)}\n`), code: EXIT.input };
  const message = e instanceof Error ? e.message : String(e);
  const first = message.split('\n')[0];
  return {
    text: visible(`${prefix}: internal error, a fault in Copse rather than in your input: ${first}\nRun the same command with --debug for the details, and report it.\n`),
    code: EXIT.internal,
  };
}
