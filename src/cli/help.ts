// Option lists for --help, laid out by one function so every description starts in the same column.

/** A flag with its argument, and its description; '\n' in the description starts a continuation line. */
export type HelpEntry = readonly [string, string];

/** The entries as an indented two-column list, the descriptions aligned two spaces after the longest flag. */
export function optionList(entries: readonly HelpEntry[]): string {
  const width = Math.max(...entries.map(([f]) => f.length)) + 2;
  const pad = ' '.repeat(2 + width);
  return entries
    .map(([f, d]) => {
      const [first, ...more] = d.split('\n');
      return [`  ${f.padEnd(width)}${first}`, ...more.map((m) => pad + m)].join('\n') + '\n';
    })
    .join('');
}

export const DEBUG_ENTRY: HelpEntry = ['--debug', 'show stack traces on errors'];
