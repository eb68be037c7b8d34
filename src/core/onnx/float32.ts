// Float32 stepping and the double thresholds that reproduce a float32 comparison. An ONNX tree ensemble with a
// float input compares float32 values, while Copse's predictor compares the doubles a CSV holds; these helpers
// translate between the two exactly, so neither side is off by a rounding at a threshold.

const f32 = new Float32Array(1);
const u32 = new Uint32Array(f32.buffer);
const f64 = new Float64Array(1);
const u64 = new BigUint64Array(f64.buffer);

const F32_MAX = 3.4028234663852886e38;

function bits32(v: number): number {
  f32[0] = v;
  return u32[0];
}

function fromBits32(b: number): number {
  u32[0] = b >>> 0;
  return f32[0];
}

/** The next float32 above a float32 value v. */
export function next32(v: number): number {
  if (Number.isNaN(v) || v === Infinity) return v;
  if (v === 0) return fromBits32(1);
  const b = bits32(v);
  return v > 0 ? fromBits32(b + 1) : fromBits32(b - 1);
}

/** The next float32 below a float32 value v. */
export function prev32(v: number): number {
  return -next32(-v);
}

/** The largest float32 that is <= t: for every float32 x, x <= t exactly when x <= roundDown32(t). */
export function roundDown32(t: number): number {
  const f = Math.fround(t);
  return f > t ? prev32(f) : f;
}

/** The next double below x. */
export function nextDown64(x: number): number {
  if (Number.isNaN(x) || x === -Infinity) return x;
  if (x === 0) return -Number.MIN_VALUE;
  f64[0] = x;
  u64[0] = x > 0 ? u64[0] - 1n : u64[0] + 1n;
  return f64[0];
}

/**
 * The largest double d whose float32 rounding (to nearest, ties to even) is <= the float32 value v: for every
 * double x, Math.fround(x) <= v exactly when x <= atMost32(v). Infinite for v = +Infinity.
 */
export function atMost32(v: number): number {
  if (v === Infinity) return Infinity;
  // Doubles from the midpoint past F32_MAX down all round to -Infinity (the tie too: infinity counts as even).
  if (v === -Infinity) return -(F32_MAX + (F32_MAX - prev32(F32_MAX)) / 2);
  const up = v === F32_MAX ? v + (v - prev32(v)) : next32(v);
  // Both are float32 values, so their midpoint is exact in double; on the tie, rounding picks the even one.
  const mid = v + (up - v) / 2;
  return (bits32(v) & 1) === 0 ? mid : nextDown64(mid);
}
