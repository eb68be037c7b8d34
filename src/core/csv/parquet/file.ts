// The Parquet file as the reader sees it: byte ranges read on demand from a read-only handle, never the whole file.

import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import type { FileHandle } from 'node:fs/promises';
import type { AsyncBuffer, FileMetaData } from 'hyparquet' with { 'resolution-mode': 'import' };
import { DataError } from '../types';
import { count, q } from '../wording';

/** Ranges the reader asks for must lie inside the file; a damaged footer can claim anything. */
export function rangeReader(handle: FileHandle, byteLength: number, label: string): AsyncBuffer {
  return {
    byteLength,
    async slice(start: number, end = byteLength): Promise<ArrayBuffer> {
      if (!(start >= 0 && end >= start && end <= byteLength)) {
        throw new DataError(`${label} is damaged or truncated: the reader was sent to bytes ${count(start)} to ${count(end)}, but the file holds ${count(byteLength)}.`);
      }
      const bytes = new Uint8Array(end - start);
      let at = 0;
      while (at < bytes.length) {
        const { bytesRead } = await handle.read(bytes, at, bytes.length - at, start + at);
        if (bytesRead === 0) throw new DataError(`${label} became shorter while it was being read.`);
        at += bytesRead;
      }
      return bytes.buffer;
    },
  };
}

/** sha256 of the file's bytes, streamed, as for a CSV. */
export function digestFile(path: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    createReadStream(path, { flags: 'r' })
      .on('data', (chunk) => hash.update(chunk))
      .on('error', reject)
      .on('end', () => resolve(hash.digest('hex')));
  });
}

/**
 * Every column chunk Copse will read must lie between the leading magic number and the footer, and decompress to a
 * size one buffer can hold; otherwise one sentence names the column and row group before anything is decoded.
 */
export function checkChunks(meta: FileMetaData, columns: ReadonlySet<string>, byteLength: number, label: string): void {
  const dataEnd = byteLength - 8 - meta.metadata_length;
  meta.row_groups.forEach((group, g) => {
    for (const chunk of group.columns) {
      const m = chunk.meta_data;
      const name = m?.path_in_schema.join('.') ?? '?';
      if (m === undefined || !columns.has(m.path_in_schema[0])) continue;
      if (chunk.file_path) {
        throw new DataError(`${label}: column ${q(name)} in row group ${g + 1} is stored in another file (${chunk.file_path}), which Copse does not follow.`);
      }
      const start = Number(m.dictionary_page_offset !== undefined && m.dictionary_page_offset > 0n ? m.dictionary_page_offset : m.data_page_offset);
      const end = start + Number(m.total_compressed_size);
      if (!(start >= 4 && end <= dataEnd && m.total_compressed_size >= 0n)) {
        throw new DataError(
          `${label}: column ${q(name)} in row group ${g + 1} claims bytes ${count(start)} to ${count(end)}, but the data part of the file ends at byte ${count(Math.max(0, dataEnd))}; the file is damaged or truncated.`,
        );
      }
      // Node's largest buffer; a chunk claiming more is damaged, or beyond any budget a quick forest should spend.
      if (m.total_uncompressed_size > 2n ** 31n) {
        throw new DataError(`${label}: column ${q(name)} in row group ${g + 1} claims ${count(Number(m.total_uncompressed_size))} bytes once decompressed, more than Copse reads in one piece.`);
      }
    }
  });
}
