// Scored output by the output's extension: .parquet is written as Parquet (hyparquet-writer), anything else as CSV,
// from a CSV, gzip or Parquet input. A batch of rows at a time, so neither file is ever held whole.

import { parse } from 'csv-parse';
import { createReadStream, createWriteStream, promises as fs, type WriteStream } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { createGunzip } from 'node:zlib';
import type { SchemaElement } from 'hyparquet' with { 'resolution-mode': 'import' };
import { OutputFile, outputPlace, releaseTemp, tempBeside } from '../atomic';
import { refuseInputAsOutput } from '../output-guard';
import { sniffFormat } from '../csv/gzip';
import { readChunk, type Hyparquet } from '../csv/parquet/chunk';
import { rangeReader } from '../csv/parquet/file';
import { planColumns } from '../csv/parquet/schema';
import { parserOptions } from '../csv/record-parser';
import { csvLine } from '../csv/write';
import { writePredictions, type AddedColumns } from './score-file';

const BATCH_ROWS = 65_536;

interface Batch {
  /** The input's columns for these rows: values as read, and (from Parquet) the column's own type. */
  readonly columns: readonly { readonly name: string; readonly values: readonly unknown[]; readonly element?: SchemaElement }[];
  readonly rows: number;
}

export function writesParquet(out: string): boolean {
  return /\.parquet$/i.test(out);
}

/**
 * Writes the input's rows with the added columns: CSV to CSV keeps each record's own text (writePredictions);
 * every other pairing writes typed Parquet columns or CSV cells. `textColumns` are the added columns that hold
 * text (a predicted class, a row's role); the rest are numbers. `rowOfRecord` is as for writePredictions.
 */
export async function writeScored(
  input: string,
  out: string,
  delimiter: string,
  added: AddedColumns,
  textColumns: readonly number[],
  rowOfRecord: (k: number) => number = (k) => k,
): Promise<void> {
  const format = await sniffFormat(input);
  if (format === 'text' && !writesParquet(out)) return writePredictions(input, out, delimiter, added, rowOfRecord);
  await refuseInputAsOutput(out, '--out', [{ file: input, what: 'the input file', refusal: `Refusing to write predictions over the input file ${input}; choose another --out.` }]);
  const batches = format === 'parquet' ? parquetBatches(input) : textBatches(input, delimiter, format === 'gzip');
  // A link is written at its target; a device, a FIFO or standard output gets the finished file copied in, so
  // the temporary file is made in the system's temporary folder, never beside a device (see core/atomic.ts).
  const place = outputPlace(out);
  const tmp = tempBeside(place.direct ? path.join(tmpdir(), `copse-scored${path.extname(out)}`) : place.path);
  try {
    if (writesParquet(out)) await toParquet(batches, tmp, added, new Set(textColumns), rowOfRecord);
    else await toCsv(batches, tmp, added, rowOfRecord);
    if (place.direct) await copyInto(tmp, out);
    else await fs.rename(tmp, place.path);
  } finally {
    await fs.rm(tmp, { force: true });
    releaseTemp(tmp);
  }
}

async function copyInto(tmp: string, out: string): Promise<void> {
  const sink = new OutputFile(out);
  try {
    for await (const chunk of createReadStream(tmp)) await sink.write(chunk as Buffer);
    await sink.commit();
  } catch (e) {
    sink.abandon();
    throw e;
  }
}

async function* parquetBatches(input: string): AsyncGenerator<Batch> {
  const hp: Hyparquet = await import('hyparquet');
  const { compressors } = await import('hyparquet-compressors');
  const handle = await fs.open(input, 'r');
  try {
    const file = rangeReader(handle, (await handle.stat()).size, input);
    const metadata = await hp.parquetMetadataAsync(file);
    const root = hp.parquetSchema(metadata);
    // Columns Copse cannot read as one value per cell are left out of the scored file too.
    const plans = planColumns(root);
    const kept = root.children.filter((_, j) => 'mode' in plans[j]);
    let rowStart = 0;
    for (let g = 0; g < metadata.row_groups.length; g++) {
      const rows = Number(metadata.row_groups[g].num_rows);
      const columns = [];
      for (const child of kept) {
        const values = await readChunk({ hp, compressors, file, metadata, label: input }, child.element.name, g, rowStart, rows);
        columns.push({ name: child.element.name, values, element: child.element });
      }
      yield { columns, rows };
      rowStart += rows;
    }
  } finally {
    await handle.close();
  }
}

async function* textBatches(input: string, delimiter: string, gzip: boolean): AsyncGenerator<Batch> {
  const raw = createReadStream(input, { flags: 'r' });
  const parser = (gzip ? raw.pipe(createGunzip()) : raw).pipe(parse(parserOptions(delimiter)));
  let header: string[] | null = null;
  let cells: string[][] = [];
  const flush = (): Batch => {
    const names = header as string[];
    const batch = { columns: names.map((name, j) => ({ name, values: cells.map((r) => r[j] ?? '') })), rows: cells.length };
    cells = [];
    return batch;
  };
  for await (const record of parser as AsyncIterable<string[]>) {
    if (header === null) {
      header = record.map((n) => n.trim());
      continue;
    }
    cells.push(record);
    if (cells.length === BATCH_ROWS) yield flush();
  }
  if (header !== null && cells.length > 0) yield flush();
}

/** The added cells of rows first .. first + rows, column by column. */
function addedCells(added: AddedColumns, first: number, rows: number, rowOfRecord: (k: number) => number): string[][] {
  const byColumn = added.names.map(() => new Array<string>(rows));
  for (let i = 0; i < rows; i++) {
    const r = rowOfRecord(first + i);
    const cells = r < 0 ? undefined : added.cells(r);
    for (let j = 0; j < byColumn.length; j++) byColumn[j][i] = cells?.[j] ?? '';
  }
  return byColumn;
}

async function toParquet(batches: AsyncGenerator<Batch>, tmp: string, added: AddedColumns, text: ReadonlySet<number>, rowOfRecord: (k: number) => number): Promise<void> {
  const hw = await import('hyparquet-writer');
  let writer: InstanceType<typeof hw.ParquetWriter> | null = null;
  let first = 0;
  for await (const batch of batches) {
    const extra = addedCells(added, first, batch.rows, rowOfRecord);
    const columnData = [
      ...batch.columns.map((c) => (c.element ? { name: c.name, data: c.values as unknown[] } : { name: c.name, data: c.values as unknown[], type: 'STRING' as const, nullable: true })),
      ...extra.map((cells, j) => ({
        name: added.names[j],
        data: text.has(j) ? cells.map((c) => (c === '' ? null : c)) : cells.map((c) => (c === '' ? null : Number(c))),
        type: text.has(j) ? ('STRING' as const) : ('DOUBLE' as const),
        nullable: true,
      })),
    ];
    if (writer === null) {
      const overrides: Record<string, SchemaElement> = {};
      for (const c of batch.columns) if (c.element) overrides[c.name] = { ...c.element, repetition_type: 'OPTIONAL' };
      // The input's own columns keep their Parquet types; the writer's copy of the reader's types differs only in name.
      type Overrides = Parameters<typeof hw.schemaFromColumnData>[0]['schemaOverrides'];
      const schema = hw.schemaFromColumnData({
        columnData: columnData.map((c) => (c.name in overrides ? { name: c.name, data: c.data } : c)),
        schemaOverrides: overrides as unknown as Overrides,
      });
      writer = new hw.ParquetWriter({ writer: hw.fileWriter(tmp), schema, codec: 'SNAPPY' });
    }
    await writer.write({ columnData, rowGroupSize: BATCH_ROWS });
    first += batch.rows;
  }
  if (writer === null) throw new Error('the input has no rows to write');
  await writer.finish();
}

async function toCsv(batches: AsyncGenerator<Batch>, tmp: string, added: AddedColumns, rowOfRecord: (k: number) => number): Promise<void> {
  const sink = createWriteStream(tmp, { flags: 'wx' });
  const put = async (text: string): Promise<void> => {
    if (!sink.write(text)) await new Promise<void>((resolve) => sink.once('drain', () => resolve()));
  };
  try {
    let first = 0;
    for await (const batch of batches) {
      if (first === 0) await put(csvLine([...batch.columns.map((c) => c.name), ...added.names]));
      const extra = addedCells(added, first, batch.rows, rowOfRecord);
      for (let i = 0; i < batch.rows; i++) {
        await put(csvLine([...batch.columns.map((c) => cellText(c.values[i], c.element)), ...extra.map((cells) => cells[i])]));
      }
      first += batch.rows;
    }
    await closeSink(sink);
  } catch (e) {
    sink.destroy();
    throw e;
  }
}

function cellText(v: unknown, element?: SchemaElement): string {
  if (v === null || v === undefined) return '';
  if (v instanceof Date) {
    const iso = v.toISOString();
    return element?.converted_type === 'DATE' || element?.logical_type?.type === 'DATE' ? iso.slice(0, 10) : iso;
  }
  if (typeof v === 'string') return v;
  if (typeof v === 'number' || typeof v === 'bigint' || typeof v === 'boolean') return String(v);
  return JSON.stringify(v) ?? '';
}

function closeSink(sink: WriteStream): Promise<void> {
  return new Promise<void>((resolve, reject) => sink.end((e?: Error | null) => (e ? reject(e) : resolve())));
}
