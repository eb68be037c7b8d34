// Fixtures written to a temporary folder, and checks shared by the CSV loader tests.

import * as assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Column, LevelColumn, Table } from '../../../src/core/data/table';
import { loadCsv } from '../../../src/core/csv/load';
import type { LoadOptions, LoadResult } from '../../../src/core/csv/types';

export class FixtureDir {
  readonly path = mkdtempSync(join(tmpdir(), 'copse-csv-'));

  write(name: string, content: string | Uint8Array): string {
    const file = join(this.path, name);
    writeFileSync(file, content);
    return file;
  }

  remove(): void {
    rmSync(this.path, { recursive: true, force: true });
  }
}

/** The file's bytes and modification time, to show a load left it alone. */
export function snapshot(file: string): { bytes: Buffer; mtimeMs: number } {
  return { bytes: readFileSync(file), mtimeMs: statSync(file).mtimeMs };
}

export function assertUnchanged(file: string, before: { bytes: Buffer; mtimeMs: number }): void {
  const after = snapshot(file);
  assert.equal(after.mtimeMs, before.mtimeMs, `${file} was touched`);
  assert.ok(after.bytes.equals(before.bytes), `${file} changed`);
}

/**
 * Loads a file that must fail: returns the DataError's message after checking it names the file and each
 * expected piece (line, column...), and that the file was not written to.
 */
export async function loadError(file: string, options: LoadOptions | undefined, ...expected: (string | RegExp)[]): Promise<string> {
  const before = snapshot(file);
  let message = '';
  await assert.rejects(loadCsv(file, options), (err: unknown) => {
    assert.ok(err instanceof Error);
    assert.equal(err.name, 'DataError', `expected a DataError, got ${err.name}: ${err.message}`);
    message = err.message;
    return true;
  });
  assertUnchanged(file, before);
  assert.ok(message.includes(file), `message does not name the file: ${message}`);
  for (const piece of expected) {
    if (typeof piece === 'string') assert.ok(message.includes(piece), `message lacks ${JSON.stringify(piece)}: ${message}`);
    else assert.match(message, piece);
  }
  // One sentence: no line breaks, a final full stop and no second sentence starting after one.
  assert.ok(!/[\r\n]/.test(message), `message spans lines: ${message}`);
  assert.ok(message.endsWith('.'), `message does not end a sentence: ${message}`);
  assert.ok(!/[.!?]\s+[A-Z]/.test(message), `message has two sentences: ${message}`);
  return message;
}

export function column(table: Table, name: string): Column {
  const c = table.columns.find((col) => col.name === name);
  assert.ok(c, `no column ${name}; have ${table.columns.map((col) => col.name).join(', ')}`);
  return c;
}

export function numeric(result: LoadResult | Table, name: string): number[] {
  const table = 'table' in result ? result.table : result;
  const c = column(table, name);
  assert.equal(c.kind, 'numeric', `${name} is ${c.kind}`);
  return Array.from(c.values);
}

/** Cells of a level column as text, null for missing. */
export function texts(result: LoadResult | Table, name: string): (string | null)[] {
  const table = 'table' in result ? result.table : result;
  const c = column(table, name);
  assert.notEqual(c.kind, 'numeric', `${name} is numeric`);
  const lc = c as LevelColumn;
  return Array.from(lc.codes, (code) => (code < 0 ? null : lc.levels[code]));
}

export function kinds(result: LoadResult): Record<string, string> {
  return Object.fromEntries(result.table.columns.map((c) => [c.name, c.kind]));
}

export function reasonOf(result: LoadResult, name: string): string {
  const d = result.dropped.find((x) => x.name === name);
  assert.ok(d, `${name} was not dropped; dropped: ${JSON.stringify(result.dropped)}`);
  return d.reason;
}
