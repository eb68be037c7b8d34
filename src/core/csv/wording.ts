// How names and values appear inside messages, so every message quotes them the same way.

const LONGEST = 40;

/** A column name or cell value in quotes, shortened when long so the sentence stays readable. */
export function q(text: string): string {
  const shown = text.length > LONGEST ? `${text.slice(0, LONGEST - 1)}…` : text;
  return `'${shown}'`;
}

export function plural(count: number, one: string, many = `${one}s`): string {
  return `${count.toLocaleString('en-US')} ${count === 1 ? one : many}`;
}

export function count(n: number): string {
  return n.toLocaleString('en-US');
}

/** A few names, then how many there are in all, for "available columns" style lists. */
export function someNames(names: readonly string[], shown = 6): string {
  const listed = names.slice(0, shown).map(q).join(', ');
  return names.length > shown ? `${listed}, … (${names.length} in all)` : listed;
}
