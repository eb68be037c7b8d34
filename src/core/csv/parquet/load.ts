// Parquet into the same typed columns as a CSV: one row group and one column chunk at a time, through the CSV
// reader's own intake and column builders, so kinds, drop rules, samples and overrides are the same.

import { open, stat } from 'node:fs/promises';
import type { AsyncBuffer, FileMetaData } from 'hyparquet' with { 'resolution-mode': 'import' };
import { CellCleaner } from '../cells';
import { Intake } from '../intake';
import { finishLoad } from '../loader';
import { describeReadError } from '../sources';
import { DataError, DEFAULT_MAX_LEVELS, DEFAULT_MISSING_TOKENS, type LoadOptions, type LoadResult } from '../types';
import { plural, q } from '../wording';
import { readChunk, reason, type Hyparquet } from './chunk';
import { checkChunks, digestFile, rangeReader } from './file';
import { planColumns, TEXT_DATES, toCell, type CellMode, type ColumnPlan } from './schema';

const DEFAULT_SEED = 1;

function abortError(label: string): DOMException {
  return new DOMException(`Loading ${label} was stopped.`, 'AbortError');
}

/** A Parquet file has rows, not lines: the shared wording says "line", this reader's messages say "row". */
function inRows(text: string): string {
  return text.replace(/\bon line (\d+)/g, 'in row $1').replace(/\bline (\d+)/g, 'row $1');
}


async function readMetadata(hp: Hyparquet, file: AsyncBuffer, label: string): Promise<FileMetaData> {
  if (file.byteLength < 12) throw new DataError(`${label} is too short to be a Parquet file (${plural(file.byteLength, 'byte')}).`);
  const tail = new Uint8Array(await file.slice(file.byteLength - 4));
  if (String.fromCharCode(...tail) !== 'PAR1') {
    throw new DataError(`${label} starts like a Parquet file but does not end with its magic number PAR1, so it is truncated or damaged.`);
  }
  try {
    return await hp.parquetMetadataAsync(file, { parsers: TEXT_DATES });
  } catch (err) {
    if (err instanceof DataError) throw err;
    throw new DataError(`${label}: the Parquet footer could not be read (${reason(err)}), so the file is damaged or truncated.`);
  }
}

/** Reads a Parquet file into typed columns; see loadCsv for the rules, which are the same. */
export async function loadParquet(path: string, options: LoadOptions = {}): Promise<LoadResult> {
  const label = path;
  const signal = options.signal;
  if (signal?.aborted) throw abortError(label);
  const hp = await import('hyparquet');
  const { compressors } = await import('hyparquet-compressors');
  let handle;
  let byteLength: number;
  try {
    byteLength = (await stat(path)).size;
    handle = await open(path, 'r');
  } catch (err) {
    throw new DataError(describeReadError(err, label) ?? `Cannot read ${label}: ${reason(err)}.`);
  }
  try {
    const file = rangeReader(handle, byteLength, label);
    const meta = await readMetadata(hp, file, label);
    const plans = planColumns(hp.parquetSchema(meta));
    const read = plans.filter((p): p is Extract<ColumnPlan, { mode: CellMode }> => 'mode' in p && options.columnTypes?.[p.name] !== 'exclude');
    const target = options.target;
    const bad = plans.find((p) => p.name === target && 'unsupported' in p);
    if (bad !== undefined && 'unsupported' in bad) {
      throw new DataError(`${label}: the target ${q(bad.name)} cannot be predicted: ${bad.unsupported}.`);
    }
    checkChunks(meta, new Set(read.map((p) => p.name)), byteLength, label);

    const columnTypes = options.columnTypes ?? {};
    const maxLevels = options.maxLevels ?? DEFAULT_MAX_LEVELS;
    const sampleSeed = options.sampleSeed ?? DEFAULT_SEED;
    // Excluded columns still reach the intake by name, so its checks and drop reasons are the CSV's.
    const kept = plans.filter((p) => 'mode' in p);
    const intake = new Intake({
      label,
      target,
      columnTypes,
      cleaner: new CellCleaner(options.missingTokens ?? DEFAULT_MISSING_TOKENS),
      maxLevels,
      sample: options.sampleRows !== undefined ? { rows: options.sampleRows, seed: sampleSeed } : undefined,
    });
    intake.onRecord(kept.map((p) => p.name), 0);
    if (intake.failure !== null) throw intake.failure;

    const readIndex = read.map((p) => kept.indexOf(p));
    const fields: (string | number)[] = kept.map((p) => ('mode' in p && p.mode === 'number' ? NaN : ''));
    let rowStart = 0;
    for (let g = 0; g < meta.row_groups.length; g++) {
      const rows = Number(meta.row_groups[g].num_rows);
      const cells: ArrayLike<unknown>[] = [];
      for (const plan of read) {
        if (signal?.aborted) throw abortError(label);
        cells.push(await readChunk({ hp, compressors, file, metadata: meta, label, parsers: TEXT_DATES }, plan.name, g, rowStart, rows));
      }
      for (let i = 0; i < rows; i++) {
        for (let c = 0; c < read.length; c++) fields[readIndex[c]] = toCell(read[c].mode, cells[c][i]);
        intake.onRecord(fields, rowStart + i + 1);
        const failure = intake.failure as DataError | null; // onRecord sets it
        if (failure !== null) throw new DataError(inRows(failure.message));
      }
      rowStart += rows;
    }
    if (signal?.aborted) throw abortError(label);

    let result: LoadResult;
    try {
      result = finishLoad(intake, { label, target, columnTypes, maxLevels, sampleSeed, delimiter: ',', fingerprint: await digestFile(path), signal });
    } catch (err) {
      throw err instanceof DataError ? new DataError(inRows(err.message)) : err;
    }
    const dropped = [...result.dropped];
    for (const p of plans) if ('unsupported' in p) dropped.push({ name: p.name, reason: p.unsupported });
    return {
      ...result,
      dropped,
      notes: result.notes.map(inRows),
      warnings: result.warnings.map(inRows),
      header: plans.map((p) => p.name),
    };
  } finally {
    await handle.close();
  }
}
