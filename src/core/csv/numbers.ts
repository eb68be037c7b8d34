// Cell text to numbers. These run once per cell, so they avoid allocation and regular expressions.

const POW10: readonly number[] = Array.from({ length: 23 }, (_, i) => Number(`1e${i}`));
const MAX_EXACT = 9007199254740991; // 2^53 - 1: integers up to here are exact doubles

/**
 * A plain decimal number (optional sign, digits with an optional point, optional exponent), else NaN.
 * Stricter than Number(): no hex/binary/octal, no Infinity, no inner spaces, never '' -> 0.
 * With at most 2^53 as mantissa and |exponent| <= 22 both operands are exact, so one multiply or divide
 * rounds correctly (Clinger's fast path); anything else goes to Number(), which also rounds correctly.
 */
export function parseDecimal(s: string): number {
  const n = s.length;
  let i = 0;
  let c = s.charCodeAt(0);
  let negative = false;
  if (c === 45 || c === 43) {
    negative = c === 45;
    i = 1;
  }
  let mantissa = 0;
  let digits = 0;
  let exponent = 0;
  for (; i < n; i++) {
    const d = s.charCodeAt(i) - 48;
    if (d < 0 || d > 9) break;
    mantissa = mantissa * 10 + d;
    digits++;
  }
  if (i < n && s.charCodeAt(i) === 46) {
    i++;
    for (; i < n; i++) {
      const d = s.charCodeAt(i) - 48;
      if (d < 0 || d > 9) break;
      mantissa = mantissa * 10 + d;
      digits++;
      exponent--;
    }
  }
  if (digits === 0) return NaN;
  if (i < n) {
    c = s.charCodeAt(i);
    if (c !== 101 && c !== 69) return NaN;
    i++;
    let expNegative = false;
    c = s.charCodeAt(i);
    if (c === 45 || c === 43) {
      expNegative = c === 45;
      i++;
    }
    let e = 0;
    let expDigits = 0;
    for (; i < n; i++) {
      const d = s.charCodeAt(i) - 48;
      if (d < 0 || d > 9) return NaN;
      if (e < 100000) e = e * 10 + d;
      expDigits++;
    }
    if (expDigits === 0) return NaN;
    exponent += expNegative ? -e : e;
  }
  if (mantissa > MAX_EXACT || exponent < -22 || exponent > 22) {
    // The syntax is already checked, so Number() sees a plain decimal here.
    const v = Number(s);
    return Number.isFinite(v) ? v : NaN;
  }
  const v = exponent < 0 ? mantissa / POW10[-exponent] : mantissa * POW10[exponent];
  return negative ? -v : v;
}

const DAY_MS = 86400000;
const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

function digitsAt(s: string, at: number, count: number): number {
  let v = 0;
  for (let i = at; i < at + count; i++) {
    const d = s.charCodeAt(i) - 48; // NaN past the end, which the test below also rejects
    if (!(d >= 0 && d <= 9)) return -1;
    v = v * 10 + d;
  }
  return v;
}

/**
 * An ISO 8601 calendar date or date-time (YYYY-MM-DD, optionally 'T' or one space, then HH:MM[:SS[.fff]],
 * optionally 'Z' or +HH:MM / -HH:MM) as days since 1970-01-01, fractional for times; else NaN.
 * A time without an offset is taken as UTC so that the same text always gives the same number.
 */
export function parseIsoDate(s: string): number {
  const n = s.length;
  if (n < 10 || s.charCodeAt(4) !== 45 || s.charCodeAt(7) !== 45) return NaN;
  const year = digitsAt(s, 0, 4);
  const month = digitsAt(s, 5, 2);
  const day = digitsAt(s, 8, 2);
  if (year < 0 || month < 1 || month > 12 || day < 1) return NaN;
  const leap = month === 2 && (year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0));
  if (day > DAYS_IN_MONTH[month - 1] + (leap ? 1 : 0)) return NaN;
  let ms = Date.UTC(year, month - 1, day);
  if (year < 100) ms = new Date(ms).setUTCFullYear(year); // Date.UTC maps years 0-99 to 1900-1999
  if (n === 10) return ms / DAY_MS;

  const sep = s.charCodeAt(10);
  if (sep !== 84 && sep !== 32 && sep !== 116) return NaN; // 'T', ' ', 't'
  if (n < 16 || s.charCodeAt(13) !== 58) return NaN;
  const hour = digitsAt(s, 11, 2);
  const minute = digitsAt(s, 14, 2);
  if (hour < 0 || hour > 24 || minute < 0 || minute > 59) return NaN;
  let i = 16;
  let second = 0;
  let fraction = 0;
  if (i < n && s.charCodeAt(i) === 58) {
    second = digitsAt(s, i + 1, 2);
    if (second < 0 || second > 60) return NaN;
    i += 3;
    if (i < n && (s.charCodeAt(i) === 46 || s.charCodeAt(i) === 44)) {
      i++;
      let scale = 0.1;
      const start = i;
      for (; i < n; i++) {
        const d = s.charCodeAt(i) - 48;
        if (d < 0 || d > 9) break;
        fraction += d * scale;
        scale /= 10;
      }
      if (i === start) return NaN;
    }
  }
  if (hour === 24 && (minute !== 0 || second !== 0 || fraction !== 0)) return NaN;
  let offsetMinutes = 0;
  if (i < n) {
    const z = s.charCodeAt(i);
    if (z === 90 || z === 122) {
      i++;
    } else if (z === 43 || z === 45) {
      const oh = digitsAt(s, i + 1, 2);
      let om = 0;
      let after = i + 3;
      if (after < n && s.charCodeAt(after) === 58) after++;
      if (after < n) {
        om = digitsAt(s, after, 2);
        after += 2;
      }
      if (oh < 0 || oh > 23 || om < 0 || om > 59) return NaN;
      offsetMinutes = (z === 45 ? -1 : 1) * (oh * 60 + om);
      i = after;
    } else {
      return NaN;
    }
  }
  if (i !== n) return NaN;
  ms += ((hour * 60 + minute - offsetMinutes) * 60 + second + fraction) * 1000;
  return ms / DAY_MS;
}
