// Seeded tables of our own for the explain tests: small, mixed-type, with missing cells, so routing of
// missing values and level sets is exercised. No published data here (see ../../../fixtures/open for that).
import seedrandom from 'seedrandom';
import * as path from 'node:path';
import { loadCsv } from '../../../../src/core/csv/load';
import type { Table } from '../../../../src/core/data/table';
import { tableFrom } from '../../helpers/table';

export const root = path.join(__dirname, '..', '..', '..', '..', '..');

export async function openDataset(file: string, target: string): Promise<Table> {
  return (await loadCsv(path.join(root, 'test/fixtures/open', file), { target })).table;
}

/** Five features (two numeric with missing cells, a 5-level colour, a flag, pure noise) and both kinds of target. */
export function mixed(n: number, seed = 'explain-mixed'): Table {
  const rng = seedrandom(seed);
  const a: Array<number | null> = [];
  const b: Array<number | null> = [];
  const colour: Array<string | null> = [];
  const flag: string[] = [];
  const noise: number[] = [];
  const value: number[] = [];
  const label: string[] = [];
  const colours = ['red', 'green', 'blue', 'amber', 'violet'];
  for (let i = 0; i < n; i++) {
    const av = rng() * 4 - 2;
    const bv = rng() * 2;
    const c = Math.floor(rng() * colours.length);
    const fl = rng() < 0.4;
    const z = rng();
    const s = av + (c === 1 || c === 3 ? 1.2 : 0) + (fl ? 0.6 * bv : -0.3) + 0.4 * (rng() - 0.5);
    a.push(rng() < 0.1 ? null : av);
    b.push(rng() < 0.15 ? null : bv);
    colour.push(rng() < 0.05 ? null : colours[c]);
    flag.push(fl ? 'yes' : 'no');
    noise.push(z);
    value.push(s);
    label.push(s < -0.5 ? 'low' : s < 0.8 ? 'mid' : 'high');
  }
  return tableFrom({ a, b, colour, flag, noise, value, label });
}

/** The listed rows of a table, in that order, as a table of their own. */
export function subsetTable(table: Table, rows: ArrayLike<number>): Table {
  const pick = <T extends Float64Array | Int32Array>(a: T): T => {
    const out = new (a.constructor as new (n: number) => T)(rows.length);
    for (let i = 0; i < rows.length; i++) out[i] = a[rows[i]];
    return out;
  };
  return {
    rowCount: rows.length,
    columns: table.columns.map((c) => (c.kind === 'numeric' ? { ...c, values: pick(c.values) } : { ...c, codes: pick(c.codes) })),
    lineOfRow: pick(table.lineOfRow),
  };
}
