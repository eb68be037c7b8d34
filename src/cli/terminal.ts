// What the command line prints for a person (reports, tables, warnings, errors) goes through here, so control
// characters from the data are shown, never obeyed (see core/visible.ts). JSON and CSV are written as they are.
import { visible } from '../core/visible';

/** Readable text on standard output. */
export function say(text: string): void {
  process.stdout.write(visible(text));
}

/** Readable text on standard error: warnings, errors, a report moved off standard output. */
export function sayError(text: string): void {
  process.stderr.write(visible(text));
}
