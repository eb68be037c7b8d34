// Checks on the raw bytes as they stream past: fingerprint, binary content, UTF-8 validity.

import { isUtf8 } from 'node:buffer';
import { createHash, type Hash } from 'node:crypto';

export interface ByteProblem {
  readonly kind: 'nul' | 'utf8' | 'utf16';
  /** Offset in the file of the offending byte. */
  readonly offset: number;
}

/** Bytes in the UTF-8 sequence a lead byte starts (1 for ASCII and for bytes that cannot start one). */
function sequenceLength(lead: number): number {
  if (lead >= 0xc2 && lead <= 0xdf) return 2;
  if (lead >= 0xe0 && lead <= 0xef) return 3;
  if (lead >= 0xf0 && lead <= 0xf4) return 4;
  return 1;
}

/**
 * Sees every chunk once, in order. The fingerprint covers every byte; the text checks stop at the first
 * problem because the load stops there too. UTF-8 is checked with isUtf8, which validates in place (TextDecoder
 * would build a string of every chunk only to throw it away); a sequence split between chunks is carried over.
 */
export class ByteGuard {
  private readonly hash: Hash = createHash('sha256');
  private offset = 0;
  /** The start of a multi-byte sequence that the previous chunk cut off, and its file offset. */
  private carry: Uint8Array | null = null;
  private carryOffset = 0;

  check(chunk: Buffer): ByteProblem | undefined {
    const base = this.offset;
    this.hash.update(chunk);
    this.offset += chunk.length;
    if (base === 0 && chunk.length >= 2) {
      const a = chunk[0];
      const b = chunk[1];
      if ((a === 0xff && b === 0xfe) || (a === 0xfe && b === 0xff)) return { kind: 'utf16', offset: 0 };
    }
    const nul = chunk.indexOf(0);
    if (nul >= 0) return { kind: 'nul', offset: base + nul };

    let start = 0;
    if (this.carry !== null) {
      const carry = this.carry;
      const need = sequenceLength(carry[0]) - carry.length;
      if (chunk.length < need) {
        this.carry = concat(carry, chunk);
        return undefined;
      }
      if (!isUtf8(concat(carry, chunk.subarray(0, need)))) return { kind: 'utf8', offset: this.carryOffset };
      this.carry = null;
      start = need;
    }
    // Leave out a sequence the end of this chunk cuts short; it is checked with the next chunk.
    let end = chunk.length;
    let k = end - 1;
    while (k >= start && k > end - 4 && (chunk[k] & 0xc0) === 0x80) k--;
    if (k >= start && chunk[k] >= 0xc0 && k + sequenceLength(chunk[k]) > end) end = k;
    const body = chunk.subarray(start, end);
    if (!isUtf8(body)) return { kind: 'utf8', offset: base + start + firstInvalidUtf8(new Uint8Array(0), body) };
    if (end < chunk.length) {
      this.carry = chunk.slice(end);
      this.carryOffset = base + end;
    }
    return undefined;
  }

  /** End of input: a multi-byte sequence cut off by the end of the file is invalid too. */
  finish(): ByteProblem | undefined {
    return this.carry !== null ? { kind: 'utf8', offset: this.carryOffset } : undefined;
  }

  digest(): string {
    return this.hash.digest('hex');
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a, 0);
  out.set(b, a.length);
  return out;
}

/** Index in `chunk` of the first byte of the first ill-formed sequence (Unicode Table 3-7), given up to three bytes before it. */
export function firstInvalidUtf8(before: Uint8Array, chunk: Uint8Array): number {
  const bytes = new Uint8Array(before.length + chunk.length);
  bytes.set(before, 0);
  bytes.set(chunk, before.length);
  // A sequence still open at the chunk boundary starts at a lead byte within the last three bytes before it.
  let i = 0;
  while (i < before.length && (bytes[i] & 0xc0) === 0x80) i++;
  const n = bytes.length;
  while (i < n) {
    const b = bytes[i];
    let need: number;
    let lo = 0x80;
    let hi = 0xbf;
    if (b < 0x80) {
      i++;
      continue;
    } else if (b >= 0xc2 && b <= 0xdf) need = 1;
    else if (b >= 0xe0 && b <= 0xef) {
      need = 2;
      if (b === 0xe0) lo = 0xa0;
      if (b === 0xed) hi = 0x9f;
    } else if (b >= 0xf0 && b <= 0xf4) {
      need = 3;
      if (b === 0xf0) lo = 0x90;
      if (b === 0xf4) hi = 0x8f;
    } else return Math.max(0, i - before.length);
    for (let k = 1; k <= need; k++) {
      if (i + k >= n) return Math.max(0, i - before.length); // cut short: only reached when the decoder already failed
      const c = bytes[i + k];
      if (c < (k === 1 ? lo : 0x80) || c > (k === 1 ? hi : 0xbf)) return Math.max(0, i - before.length);
    }
    i += need + 1;
  }
  return Math.max(0, chunk.length - 1);
}

/** 1-based physical line holding byte `offset`: LF, CRLF and a lone CR each end a line. */
export async function lineAtOffset(chunks: AsyncIterable<Uint8Array>, offset: number): Promise<number> {
  let line = 1;
  let position = 0;
  let previous = 0;
  for await (const chunk of chunks) {
    const end = Math.min(chunk.length, offset - position);
    for (let i = 0; i < end; i++) {
      const c = chunk[i];
      if (c === 0x0a) {
        if (previous !== 0x0d) line++;
      } else if (c === 0x0d) line++;
      previous = c;
    }
    position += chunk.length;
    if (position >= offset) break;
  }
  return line;
}
