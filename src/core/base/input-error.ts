// A sentence about something the user gave (a setting, a column, a table) that cannot be used. It is a RangeError,
// as these checks always were, so code that catches RangeError still does; what it adds is the promise that the
// message is written for the user. A plain RangeError, including the engine's own ("Invalid string length",
// "Maximum call stack size exceeded"), is a failure inside Copse, and the command line says so.
export class InputError extends RangeError {
  constructor(message: string) {
    super(message);
    this.name = 'InputError';
  }
}
