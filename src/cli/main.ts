// The `copse` command line: the same engine as the editor panel, for scripts and CI.
import { DataError } from '../core/csv/types';
import { SchemaMismatchError } from '../core/forest/predict';
import { OverwriteError } from '../core/forest/score-file';
import { ModelError } from '../core/model/file';
import { UsageError } from './args';
import { EXPLAIN_HELP, runExplain } from './commands/explain';
import { EXPORT_HELP, runExport } from './commands/export';
import { FIT_HELP, runFit } from './commands/fit';
import { PREDICT_HELP, runPredict } from './commands/predict';
import { runVotes, VOTES_HELP } from './commands/votes';

const HELP = `Usage: copse COMMAND [options]

Commands:
  fit      fit a random forest on a CSV file and report what it learned
  predict  score a CSV file with a saved forest
  votes    show how every tree votes on chosen rows
  explain  show each feature's contribution to chosen rows' predictions
  export   write a saved forest as an ONNX tree ensemble

Run "copse COMMAND --help" for a command's options.
`;

const COMMANDS: Record<string, { run: (argv: string[]) => Promise<void>; help: string }> = {
  fit: { run: runFit, help: FIT_HELP },
  predict: { run: runPredict, help: PREDICT_HELP },
  votes: { run: runVotes, help: VOTES_HELP },
  explain: { run: runExplain, help: EXPLAIN_HELP },
  export: { run: runExport, help: EXPORT_HELP },
};

/** Errors that are about the user's input get one sentence; anything else is a bug and says so. */
function isExpected(e: unknown): e is Error {
  return e instanceof UsageError || e instanceof DataError || e instanceof ModelError || e instanceof SchemaMismatchError || e instanceof OverwriteError || e instanceof RangeError || (e instanceof Error && (e as NodeJS.ErrnoException).code !== undefined);
}

export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  const debug = rest.includes('--debug');
  if (!command || command === '--help' || command === '-h' || command === 'help') {
    process.stdout.write(HELP);
    return command ? 0 : 2;
  }
  const entry = COMMANDS[command];
  if (!entry) {
    process.stderr.write(`copse: unknown command "${command}". Commands: ${Object.keys(COMMANDS).join(', ')}.\n`);
    return 2;
  }
  try {
    await entry.run(rest);
    return 0;
  } catch (e) {
    if (debug) process.stderr.write(`${(e as Error).stack ?? String(e)}\n`);
    else if (isExpected(e)) {
      process.stderr.write(`copse ${command}: ${e.message}\n`);
      if (e instanceof UsageError) process.stderr.write(`Run "copse ${command} --help" for the options.\n`);
    } else process.stderr.write(`copse ${command}: unexpected error: ${(e as Error).message ?? String(e)} (run with --debug for details)\n`);
    return e instanceof UsageError ? 2 : 1;
  }
}

