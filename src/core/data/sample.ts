// Seeded row samples for checks and drawings: reproducible for the same fit, independent of the forest's streams.

/** A seeded shuffle of 0..n-1, cut to at most `max`: reproducible across runs of the same fit. */
export function sampleRows(n: number, max: number, seed: number): Int32Array {
  const idx = new Int32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  let s = (seed ^ 0x9e3779b9) >>> 0 || 1;
  const next = (): number => {
    // xorshift32: small, seeded, good enough to split rows at random.
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 4294967296;
  };
  const m = Math.min(n, max);
  for (let i = 0; i < m; i++) {
    const j = i + Math.floor(next() * (n - i));
    const t = idx[i];
    idx[i] = idx[j];
    idx[j] = t;
  }
  return idx.subarray(0, m);
}
