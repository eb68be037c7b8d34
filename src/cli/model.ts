// Commands that score a data file (predict, votes, explain) open the model the same way: a Copse model file or an
// ONNX tree ensemble, with a foreign model's positional features named by the data file's columns on request.
import { isOneWayInput } from '../core/csv/pipe-source';
import { secondPass } from './limits';
import { readHeader } from '../core/csv/header';
import type { Forest } from '../core/forest/forest';
import { nameByPosition, namedByPosition, openModelFile, targetColumn, type ModelOrigin } from '../core/open/open';
import { list, flag, UsageError, type Options, type Parsed } from './args';
import type { HelpEntry } from './help';

export const MODEL_OPTIONS: Options = { 'by-position': { type: 'boolean' }, 'leave-out': { type: 'string' } };

export const MODEL_ENTRIES: readonly HelpEntry[] = [
  ['--by-position', "take DATA.csv's columns in order as the model's features: for an ONNX or XGBoost file\nwhose features have no names (f0, f1, ...); the column named like the model's target is left out"],
  ['--leave-out LIST', 'with --by-position: comma-separated columns of DATA.csv that are not features'],
];

/** The same as text, for a help laid out by hand (descriptions in column 24). */
export const MODEL_HELP = MODEL_ENTRIES.map(([f, d]) => `  ${f.padEnd(21)}${d.split('\n').join(`\n${' '.repeat(23)}`)}\n`).join('');

export interface OpenedForData {
  readonly forest: Forest;
  readonly origin: ModelOrigin;
  /** What the user should know about the model before reading its output. */
  readonly notes: string[];
}

export async function openForData(modelPath: string, dataPath: string, args: Parsed, command: string): Promise<OpenedForData> {
  const { forest: opened, origin } = await openModelFile(modelPath);
  const notes: string[] = [];
  let forest = opened;
  const leaveOut = list(args, 'leave-out');
  if (leaveOut.length && !flag(args, 'by-position')) throw new UsageError('--leave-out goes with --by-position.', command);
  if (flag(args, 'by-position')) {
    if (isOneWayInput(dataPath)) throw new UsageError(secondPass('--by-position reads the header before the rows'), command);
    const { header } = await readHeader(dataPath);
    const missing = leaveOut.filter((c) => !header.includes(c));
    if (missing.length) throw new UsageError(`--leave-out: ${dataPath} has no column ${missing.map((c) => `"${c}"`).join(', ')}.`, command);
    const skip = leaveOut.length ? leaveOut : targetColumn(opened, header);
    const p = opened.schema.features.length;
    const left = header.filter((h) => !skip.includes(h));
    if (left.length !== p) {
      const without = skip.length ? ` besides ${skip.map((c) => `"${c}"`).join(', ')}` : '';
      throw new UsageError(
        `The model reads ${p} features by position, but ${dataPath} has ${left.length} columns${without} (${left.join(', ')}); ` +
          `name the columns that are not features with --leave-out${left.length > p ? `, such as --leave-out ${left[left.length - 1]}` : ''}.`,
        command,
      );
    }
    forest = nameByPosition(opened, header, skip);
    notes.push(`Features taken by position from ${dataPath}: ${forest.schema.features.map((f) => f.name).join(', ')}.`);
  } else if (namedByPosition(origin)) {
    const { header } = await readHeader(dataPath);
    const unnamed = opened.schema.features.filter((f) => !header.includes(f.name));
    if (unnamed.length) {
      const p = opened.schema.features.length;
      throw new UsageError(
        `${modelPath} names its ${p} features by position (f0 to f${p - 1}), and ${dataPath} has no such columns; ` +
          `add --by-position to take its columns in order.`,
        command,
      );
    }
  }
  if (origin.kind === 'onnx') {
    const from = origin.producer ? ` written by ${origin.producer}` : '';
    notes.push(`Imported from an ONNX ${origin.operator}${from}.`, ...origin.notes);
  }
  if (origin.kind === 'xgboost') notes.push(`Read from an XGBoost ${origin.version} model (objective ${origin.objective}).`, ...origin.notes);
  return { forest, origin, notes };
}
