// The panel's number formatting is the host's and the command line's (src/core/format.ts, through the
// protocol), under the short names the sections use; only text helpers of the panel's own live here.
import { formatCount, formatFixed, formatHeadline, formatNumber, formatShare } from '../src/protocol/format';

export const percent = formatShare;
export const fixed = formatFixed;
export const count = formatCount;
export const num = formatNumber;
export const headline = formatHeadline;

export function truncate(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, Math.max(1, max - 1))}…`;
}

/** A permutation drop in the units its caption states: percentage points of accuracy for a classifier (the
 * host sends a share of rows), the error's own units for a regression. */
export function permutationDrop(task: 'classification' | 'regression', v: number | null): string {
  if (v === null || !Number.isFinite(v)) return 'n/a';
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
