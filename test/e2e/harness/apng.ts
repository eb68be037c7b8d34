// Assembles an animated PNG (APNG, the W3C PNG specification's animation chunks) from PNG frames of one size,
// so the README's short capture comes from the e2e run's own screenshots with no outside tool. Each frame's
// image data is copied as it is (IDAT for the first, fdAT after), which needs frames with the same header.

import * as fs from 'fs';
import * as zlib from 'zlib';

interface Chunk {
  type: string;
  data: Buffer;
}

const SIGNATURE = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);

function chunks(png: Buffer): Chunk[] {
  if (!png.subarray(0, 8).equals(SIGNATURE)) throw new Error('not a PNG');
  const out: Chunk[] = [];
  for (let at = 8; at < png.length; ) {
    const length = png.readUInt32BE(at);
    out.push({ type: png.toString('latin1', at + 4, at + 8), data: png.subarray(at + 8, at + 8 + length) });
    at += 12 + length;
  }
  return out;
}

function chunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'latin1');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(zlib.crc32(Buffer.concat([head.subarray(4), data])) >>> 0, 0);
  return Buffer.concat([head, data, crc]);
}

/** Writes `frames` (PNG files' bytes, same size and format) as one looping APNG, each shown `delaysMs[i]`. */
export function writeApng(file: string, frames: Buffer[], delaysMs: number[]): number {
  const parsed = frames.map(chunks);
  const ihdr = parsed[0].find((c) => c.type === 'IHDR')!.data;
  for (const p of parsed) {
    if (!p.find((c) => c.type === 'IHDR')!.data.equals(ihdr)) throw new Error('APNG frames must share one size and pixel format');
  }
  const width = ihdr.readUInt32BE(0);
  const height = ihdr.readUInt32BE(4);
  const parts: Buffer[] = [SIGNATURE, chunk('IHDR', ihdr)];
  const actl = Buffer.alloc(8);
  actl.writeUInt32BE(frames.length, 0);
  actl.writeUInt32BE(0, 4); // loop for ever
  parts.push(chunk('acTL', actl));
  let seq = 0;
  parsed.forEach((p, n) => {
    const fctl = Buffer.alloc(26);
    fctl.writeUInt32BE(seq++, 0);
    fctl.writeUInt32BE(width, 4);
    fctl.writeUInt32BE(height, 8);
    fctl.writeUInt32BE(0, 12);
    fctl.writeUInt32BE(0, 16);
    fctl.writeUInt16BE(Math.round(delaysMs[n] ?? 1000), 20);
    fctl.writeUInt16BE(1000, 22);
    fctl.writeUInt8(0, 24); // dispose: none
    fctl.writeUInt8(0, 25); // blend: source (every frame is whole)
    parts.push(chunk('fcTL', fctl));
    for (const c of p.filter((c) => c.type === 'IDAT')) {
      if (n === 0) parts.push(chunk('IDAT', c.data));
      else {
        const seqBuf = Buffer.alloc(4);
        seqBuf.writeUInt32BE(seq++, 0);
        parts.push(chunk('fdAT', Buffer.concat([seqBuf, c.data])));
      }
    }
  });
  parts.push(chunk('IEND', Buffer.alloc(0)));
  const bytes = Buffer.concat(parts);
  fs.writeFileSync(file, bytes);
  return bytes.length;
}
