// Number formatting shared by hovers, the output log and notifications, so one value reads the same everywhere.

/** Up to four significant digits, plain notation for everyday magnitudes. */
export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return Number.isNaN(v) ? 'n/a' : v > 0 ? '∞' : '−∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) return v.toExponential(3).replace(/\.?0+e/, 'e');
  if (Number.isInteger(v)) return String(v);
  return String(Number(v.toPrecision(4)));
}

/** A share 0..1 as a percentage with one decimal ("95.3%"), the form the panel also uses. */
export function formatShare(v: number): string {
  return Number.isFinite(v) ? `${(v * 100).toFixed(1)}%` : 'n/a';
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
