// A file's header alone, without loading its rows: what naming a foreign model's features by position needs
// before the file can be loaded for that model.
import { promises as fs } from 'node:fs';
import { parse } from 'csv-parse/sync';
import { parserOptions } from './record-parser';
import { SNIFF_BYTES, sniffDelimiter } from './sniff';
import { DataError } from './types';

const HEAD_BYTES = 1024 * 1024;

export async function readHeader(path: string): Promise<{ header: string[]; delimiter: string }> {
  let head: Buffer;
  let complete: boolean;
  try {
    const handle = await fs.open(path, 'r');
    try {
      const { buffer, bytesRead } = await handle.read(Buffer.alloc(HEAD_BYTES), 0, HEAD_BYTES, 0);
      head = buffer.subarray(0, bytesRead);
      complete = bytesRead < HEAD_BYTES;
    } finally {
      await handle.close();
    }
  } catch (e) {
    throw new DataError(`Cannot read ${path}: ${(e as Error).message}`);
  }
  // Sniffed on the same bytes as a full load, so both read the header with the same delimiter.
  const delimiter = sniffDelimiter(head.subarray(0, SNIFF_BYTES), complete && head.length <= SNIFF_BYTES);
  let records: string[][];
  try {
    records = parse(head, { ...parserOptions(delimiter), to_line: 1 });
  } catch (e) {
    throw new DataError(`${path}: the header line cannot be read (${(e as Error).message}).`);
  }
  if (records.length === 0 || records[0].length === 0) throw new DataError(`${path} is empty: it has no header line.`);
  return { header: records[0].map((name) => name.trim()), delimiter };
}
