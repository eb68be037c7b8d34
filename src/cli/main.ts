// The `copse` command line: the same engine as the editor panel, for scripts and CI.
// Only the command asked for is loaded, so help and version answer without reading the engine.
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { visible } from '../core/visible';
import { guardProcess } from './signals';

const HELP = `Usage: copse COMMAND [options]

Commands:
  fit      fit a random forest on a CSV file and report what it learned
  predict  score a CSV file with a saved forest
  votes    show how the trees vote on chosen rows
  explain  show each feature's contribution to chosen rows' predictions
  export   write a saved forest as an ONNX tree ensemble
  report   write a saved or imported forest's report on a labelled file as one HTML file

Run "copse COMMAND --help" for a command's options, "copse --version" for the version.

An output file (--save, --out, export's OUT) may be - for standard output. A symbolic link is written at its
target, a FIFO or device directly, and an output that leads to one of the command's inputs is refused.

Exit codes:
  0    done
  1    a problem with the input: a file, the data, a model, or an output that cannot be written
  2    a wrong command line (an unknown option, a missing argument, a bad value)
  70   an internal error: a fault in Copse; run again with --debug and report it
  130  stopped by Ctrl-C (SIGINT); 143 by SIGTERM; 129 by SIGHUP. Temporary files are removed.
`;

type Run = (argv: string[]) => Promise<void>;

// require() rather than import(): the compiled output is CommonJS, and a real import() would load it as ESM.
/* eslint-disable @typescript-eslint/no-require-imports -- each command is loaded only when it runs (see above). */
const COMMANDS: Record<string, () => Run> = {
  fit: () => (require('./commands/fit') as typeof import('./commands/fit')).runFit,
  predict: () => (require('./commands/predict') as typeof import('./commands/predict')).runPredict,
  votes: () => (require('./commands/votes') as typeof import('./commands/votes')).runVotes,
  explain: () => (require('./commands/explain') as typeof import('./commands/explain')).runExplain,
  export: () => (require('./commands/export') as typeof import('./commands/export')).runExport,
  report: () => (require('./commands/report') as typeof import('./commands/report')).runReport,
};
/* eslint-enable @typescript-eslint/no-require-imports */

/** The version in package.json, which sits three folders above this file in out/ and in the repository. */
export function version(): string {
  for (const up of ['../../..', '../..']) {
    try {
      return (JSON.parse(readFileSync(path.join(__dirname, up, 'package.json'), 'utf8')) as { version: string }).version;
    } catch {
      // try the next place
    }
  }
  return 'unknown';
}

export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  const debug = rest.includes('--debug');
  if (!command || command === '--help' || command === '-h' || command === 'help') {
    process.stdout.write(HELP);
    return command ? 0 : 2;
  }
  if (command === '--version' || command === '-V' || command === 'version') {
    process.stdout.write(`${version()}\n`);
    return 0;
  }
  const load = Object.hasOwn(COMMANDS, command) ? COMMANDS[command] : undefined;
  if (!load) {
    process.stderr.write(visible(`copse: unknown command "${command}". Commands: ${Object.keys(COMMANDS).join(', ')}.\n`));
    return 2;
  }
  const tell = (e: unknown) => {
    // eslint-disable-next-line @typescript-eslint/no-require-imports -- loaded only on an error, like the commands above.
    const { describe } = require('./errors') as typeof import('./errors');
    const said = describe(e, command);
    return debug ? { text: visible(`${(e as Error)?.stack ?? String(e)}\n`), code: said.code } : said;
  };
  guardProcess(tell);
  try {
    await load()(rest);
    return 0;
  } catch (e) {
    const said = tell(e);
    process.stderr.write(said.text);
    return said.code;
  }
}
