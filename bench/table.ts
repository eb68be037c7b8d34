// Plain-text table for the terminal: one row per measured figure, one column per implementation,
// then Copse's ratio to each of the others.

export type Kind = 'seconds' | 'megabytes' | 'accuracy';

export interface Row {
  readonly label: string;
  readonly kind: Kind;
  /** In column order; undefined prints as "-". */
  readonly values: ReadonlyArray<number | undefined>;
}

function cell(value: number | undefined, kind: Kind): string {
  if (value === undefined) return '-';
  if (kind === 'accuracy') return value.toFixed(4);
  if (kind === 'megabytes') return value.toFixed(0);
  return value < 10 ? value.toFixed(3) : value.toFixed(1);
}

/** Times and memory: Copse / other, so above 1 means Copse is slower or larger. Accuracy: the difference in points. */
function compare(ours: number | undefined, theirs: number | undefined, kind: Kind): string {
  if (ours === undefined || theirs === undefined) return '-';
  if (kind === 'accuracy') {
    const d = (ours - theirs) * 100;
    return `${d >= 0 ? '+' : ''}${d.toFixed(2)} pt`;
  }
  if (theirs === 0) return '-';
  return `${(ours / theirs).toFixed(2)}x`;
}

export function renderTable(columns: readonly string[], rows: readonly Row[]): string {
  const header = ['', ...columns, ...columns.slice(1).map((c) => `${columns[0]}/${c}`)];
  const body = rows.map((r) => [
    r.label,
    ...r.values.map((v) => cell(v, r.kind)),
    ...r.values.slice(1).map((v) => compare(r.values[0], v, r.kind)),
  ]);
  const all = [header, ...body];
  const widths = header.map((_, j) => Math.max(...all.map((line) => line[j].length)));
  const format = (line: string[]): string =>
    line.map((text, j) => (j === 0 ? text.padEnd(widths[j]) : text.padStart(widths[j]))).join('  ');
  const rule = widths.map((w) => '-'.repeat(w)).join('  ');
  return [format(header), rule, ...body.map(format)].join('\n');
}
