// Which Parquet columns Copse can read, and how each cell becomes what the CSV reader would have seen.

import type { SchemaElement, SchemaTree } from 'hyparquet' with { 'resolution-mode': 'import' };

/**
 * - number: integers, floats, decimals and times of day reach the column builder as numbers;
 * - text: strings, enums and dictionary-encoded strings, cleaned and typed exactly as CSV cells;
 * - boolean: true/false, which the builder reads as the known pair false/true;
 * - date: dates and timestamps as ISO text, so they become days since 1970-01-01 with the same note as in a CSV.
 */
export type CellMode = 'number' | 'text' | 'boolean' | 'date';

export type ColumnPlan = { readonly name: string; readonly mode: CellMode } | { readonly name: string; readonly unsupported: string };

/** A cell mode, or what the column holds when Copse cannot read it. */
function leafMode(e: SchemaElement): string {
  const logical = e.logical_type?.type;
  const converted = e.converted_type;
  if (logical === 'DATE' || logical === 'TIMESTAMP' || converted === 'DATE' || converted === 'TIMESTAMP_MILLIS' || converted === 'TIMESTAMP_MICROS') {
    return 'date';
  }
  if (e.type === 'INT96') return 'date'; // the old timestamp encoding
  if (logical === 'STRING' || logical === 'ENUM' || converted === 'UTF8' || converted === 'ENUM') return 'text';
  if (logical === 'UUID') return 'text';
  if (logical === 'DECIMAL' || converted === 'DECIMAL' || logical === 'FLOAT16') return 'number';
  if (logical === 'JSON' || converted === 'JSON' || logical === 'BSON' || converted === 'BSON') return 'JSON or BSON documents';
  if (logical === 'INTERVAL' || converted === 'INTERVAL') return 'intervals';
  if (logical === 'GEOMETRY' || logical === 'GEOGRAPHY') return 'geometries';
  if (logical === 'VARIANT') return 'variant values';
  if (logical === 'NULL') return 'no values (its type is null)';
  switch (e.type) {
    case 'BOOLEAN':
      return 'boolean';
    case 'INT32':
    case 'INT64':
    case 'FLOAT':
    case 'DOUBLE':
      return 'number';
    case 'BYTE_ARRAY':
    case 'FIXED_LEN_BYTE_ARRAY':
      return 'raw bytes, not text';
    default:
      return `values of type ${String(e.type)}`;
  }
}

/** One plan per top-level column, in file order. Nested columns are left out: a forest needs one value per cell. */
export function planColumns(root: SchemaTree): ColumnPlan[] {
  return root.children.map((child): ColumnPlan => {
    const e = child.element;
    const name = e.name;
    if (child.children.length > 0) {
      const what = e.logical_type?.type ?? e.converted_type;
      const kind = what === 'LIST' ? 'a list' : what === 'MAP' || what === 'MAP_KEY_VALUE' ? 'a map' : 'a struct (nested fields)';
      return { name, unsupported: `${kind} in each cell; a forest needs one value per cell` };
    }
    if (e.repetition_type === 'REPEATED') return { name, unsupported: 'a repeated field (a list in each cell); a forest needs one value per cell' };
    const mode = leafMode(e);
    if (mode === 'number' || mode === 'text' || mode === 'boolean' || mode === 'date') return { name, mode };
    return { name, unsupported: `it holds ${mode}, which Copse does not read` };
  });
}

function isoDate(ms: number): string {
  return new Date(ms).toISOString();
}

/** Hyparquet's parsers for dates and timestamps, as the ISO text a CSV would hold. */
export const TEXT_DATES = {
  dateFromDays: (days: number): string => isoDate(days * 86_400_000).slice(0, 10),
  timestampFromMilliseconds: (ms: bigint): string => isoDate(Number(ms)),
  timestampFromMicroseconds: (us: bigint): string => isoDate(Number(us / 1000n)),
  timestampFromNanoseconds: (ns: bigint): string => isoDate(Number(ns / 1_000_000n)),
};

/** Text for a value that is not one of the kinds its column promised (a writer's oddity), rather than a crash. */
function asText(v: unknown): string {
  if (typeof v === 'string') return v;
  if (typeof v === 'number' || typeof v === 'bigint' || typeof v === 'boolean') return String(v);
  if (v instanceof Date) return Number.isNaN(v.getTime()) ? '' : v.toISOString();
  return JSON.stringify(v) ?? '';
}

/** A decoded Parquet value as a cell: a number (NaN missing) or text ('' missing), as CellMode says. */
export function toCell(mode: CellMode, v: unknown): string | number {
  if (v === null || v === undefined) return mode === 'number' ? NaN : '';
  switch (mode) {
    case 'number':
      return typeof v === 'number' ? v : typeof v === 'bigint' ? Number(v) : Number(asText(v));
    case 'boolean':
      return v === true ? 'true' : v === false ? 'false' : asText(v);
    default:
      return asText(v);
  }
}
