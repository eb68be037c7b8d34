// Turns whatever a command threw into one sentence for a notification. Core's input errors already name
// file, line and column, so they are shown as they are; anything else is a bug and says where to look.

/** Errors whose message is written for the user (core's input and model errors, our own RangeErrors). */
const USER_ERRORS = new Set(['DataError', 'SchemaMismatchError', 'ModelError', 'RangeError', 'InputError', 'OverwriteError']);

export function isAbort(e: unknown): boolean {
  return e instanceof Error && e.name === 'AbortError';
}

export function userMessage(e: unknown): string {
  if (e instanceof Error) {
    if (USER_ERRORS.has(e.name)) return e.message;
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return `File not found: ${(e as NodeJS.ErrnoException).path ?? e.message}`;
    if (code === 'EACCES' || code === 'EPERM') return `Not allowed to read or write ${(e as NodeJS.ErrnoException).path ?? 'the file'}.`;
    return `Copse hit an unexpected error: ${e.message} (details in the Copse output).`;
  }
  return `Copse hit an unexpected error: ${String(e)} (details in the Copse output).`;
}

/** Whether the error is the user's input rather than our bug; only bugs get a stack in the log. */
export function isUserError(e: unknown): boolean {
  return e instanceof Error && (USER_ERRORS.has(e.name) || isAbort(e));
}
