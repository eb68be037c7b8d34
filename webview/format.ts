// Number formatting in one place so the same quantity reads the same everywhere in the panel.

export function percent(x: number | null | undefined, digits = 1): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '–' : `${(x * 100).toFixed(digits)}%`;
}

export function fixed(x: number | null | undefined, digits: number): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '–' : x.toFixed(digits);
}

export function count(n: number): string {
  return Math.round(n).toLocaleString('en-US');
}

/** Compact general-purpose number: 3 significant digits, no exponent for everyday magnitudes. */
export function num(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  const a = Math.abs(x);
  if (a !== 0 && (a >= 1e6 || a < 1e-3)) return x.toExponential(2);
  if (a >= 100) return x.toFixed(Math.max(0, 3 - Math.floor(Math.log10(a)) - 1)).replace(/\.0+$/, '');
  return String(Number(x.toPrecision(3)));
}

/** The headline OOB figure in the form the UI contract fixes: accuracy "95.3%", or R² "0.912". */
export function headline(kind: 'classification' | 'regression', value: number): string {
  return kind === 'classification' ? percent(value, 1) : fixed(value, 3);
}

export function truncate(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, Math.max(1, max - 1))}…`;
}

/** A permutation drop in the units its caption states: percentage points of accuracy for a classifier (the
 * host sends a share of rows), the error's own units for a regression. */
export function permutationDrop(task: 'classification' | 'regression', v: number | null): string {
  if (v === null || !Number.isFinite(v)) return '–';
  return task === 'classification' ? num(v * 100) : num(v);
}

/**
 * What a capped list holds: "50 of 261 rows …" when the sender says how many there are, otherwise only
 * what is known. The host sends every item up to the cap, so a shorter list is complete; a full one may not be.
 */
export function listed(shown: number, total: number | null, cap: number, what: string): string {
  if (total !== null && total > shown) return `${count(shown)} of ${count(total)} ${what}.`;
  if (total !== null || shown < cap) return `All ${count(shown)} ${what}.`;
  return `The first ${count(shown)} ${what}; the list stops at ${count(cap)}, so there may be more.`;
}
