// A command stopped by Ctrl-C (SIGINT), kill (SIGTERM) or a closed terminal (SIGHUP) removes the temporary files
// it was writing and exits with the shell's code for that signal (128 + its number), leaving every output as it
// was. An error no code path caught is still told in one sentence and still removes them.
import { removePendingTemps } from '../core/atomic';

const SIGNAL_CODES = { SIGHUP: 129, SIGINT: 130, SIGTERM: 143 } as const;

let installed = false;

/** Installs the handlers once per process; `tell` turns an uncaught error into the text and exit code main gives. */
export function guardProcess(tell: (e: unknown) => { text: string; code: number }): void {
  if (installed) return;
  installed = true;
  for (const [signal, code] of Object.entries(SIGNAL_CODES)) {
    process.on(signal, () => {
      removePendingTemps();
      process.exit(code);
    });
  }
  // process.exit() from anywhere (a closed pipe, say) still removes them.
  process.on('exit', () => removePendingTemps());
  const fatal = (e: unknown) => {
    removePendingTemps();
    const said = tell(e);
    try {
      process.stderr.write(said.text);
    } finally {
      process.exit(said.code);
    }
  };
  process.on('uncaughtException', fatal);
  process.on('unhandledRejection', fatal);
}
