// Builds in-memory tables for engine tests without going through CSV text.
import type { Column, Table } from '../../../src/core/data/table';

export type Cells = Record<string, ReadonlyArray<number | string | null>>;

export function tableFrom(cells: Cells): Table {
  const names = Object.keys(cells);
  const rowCount = names.length ? cells[names[0]].length : 0;
  const columns: Column[] = names.map((name) => {
    const v = cells[name];
    if (v.every((x) => x === null || typeof x === 'number')) {
      return { name, kind: 'numeric', values: Float64Array.from(v, (x) => (x === null ? NaN : x)) };
    }
    const levels: string[] = [];
    const index = new Map<string, number>();
    const codes = Int32Array.from(v, (x) => {
      if (x === null) return -1;
      const s = String(x);
      if (!index.has(s)) {
        index.set(s, levels.length);
        levels.push(s);
      }
      return index.get(s)!;
    });
    return { name, kind: 'categorical', codes, levels };
  });
  return { rowCount, columns, lineOfRow: Int32Array.from({ length: rowCount }, (_, i) => i + 2) };
}
