// The one number formatter: hovers, the output log, the panel (through src/protocol/format.ts) and the command
// line's readable report all write a value through these, so it reads the same everywhere: the same
// precision, one minus sign (U+2212), and "n/a" for a number that is missing. This file imports nothing, so
// the webview bundle can take it as it is. JSON and CSV output keep full precision and are not formatted.

type Maybe = number | null | undefined;

const MISSING = 'n/a';
const missing = (v: Maybe): v is null | undefined => v === null || v === undefined || Number.isNaN(v);
/** Replaces the ASCII hyphen JavaScript writes for negative numbers with the minus sign. */
const minus = (text: string): string => text.replace(/^-/, '\u2212').replace(/e-/, 'e\u2212');

/** Up to four significant digits, plain notation for everyday magnitudes. */
export function formatNumber(v: Maybe): string {
  if (missing(v)) return MISSING;
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '\u2212∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) return minus(v.toExponential(3).replace(/\.?0+e/, 'e'));
  if (Number.isInteger(v)) return minus(String(v));
  return minus(String(Number(v.toPrecision(4))));
}

/** A share 0..1 as a percentage ("95.3%", one decimal unless told otherwise). */
export function formatShare(v: Maybe, digits = 1): string {
  return missing(v) || !Number.isFinite(v) ? MISSING : minus(`${(v * 100).toFixed(digits)}%`);
}

/** A fixed number of decimals, for figures read side by side (R² "0.912", margins "−0.45"). */
export function formatFixed(v: Maybe, digits: number): string {
  return missing(v) || !Number.isFinite(v) ? MISSING : minus(v.toFixed(digits));
}

/** A signed change: "+0.5", "−0.5". */
export function formatSigned(v: Maybe): string {
  if (missing(v)) return MISSING;
  return v > 0 ? `+${formatNumber(v)}` : formatNumber(v);
}

/** A whole count with thousands separators ("3,000"). */
export function formatCount(n: number): string {
  return Math.round(n).toLocaleString('en-US');
}

/** The headline out-of-bag figure: accuracy as a share ("95.3%"), R² with three decimals ("0.912"). */
export function formatHeadline(kind: 'classification' | 'regression', v: Maybe): string {
  return kind === 'classification' ? formatShare(v) : formatFixed(v, 3);
}

export function formatSeconds(s: number): string {
  if (!Number.isFinite(s)) return 'n/a';
  if (s < 1) return `${Math.round(s * 1000)} ms`;
  if (s < 60) return `${s.toFixed(1)} s`;
  return `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 ** 2) return `${(n / 1024).toFixed(1)} KB`;
  if (n < 1024 ** 3) return `${(n / 1024 ** 2).toFixed(1)} MB`;
  return `${(n / 1024 ** 3).toFixed(2)} GB`;
}
