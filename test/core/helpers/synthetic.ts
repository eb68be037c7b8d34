// Seeded synthetic tables for engine tests: shapes of our own, no published data.
import seedrandom from 'seedrandom';
import type { Table } from '../../../src/core/data/table';
import { tableFrom } from './table';

/** Three classes from a smooth rule on four of p uniform features, some label noise, a categorical column and missing cells. */
export function threeClass(n: number, p = 8, seed = 'three-class'): Table {
  const rng = seedrandom(seed);
  const cells: Record<string, Array<number | string | null>> = {};
  for (let f = 0; f < p; f++) cells[`x${f}`] = [];
  cells.colour = [];
  cells.label = [];
  for (let i = 0; i < n; i++) {
    const x = Array.from({ length: p }, () => rng() * 2 - 1);
    const colour = ['red', 'green', 'blue'][Math.floor(rng() * 3)];
    const s = x[0] + x[1] * x[2] + 0.5 * Math.sin(3 * x[3]) + (colour === 'red' ? 0.4 : 0) + 0.3 * (rng() - 0.5);
    x.forEach((v, f) => cells[`x${f}`].push(f === 1 && rng() < 0.1 ? null : v));
    cells.colour.push(colour);
    cells.label.push(s < -0.3 ? 'low' : s < 0.3 ? 'mid' : 'high');
  }
  return tableFrom(cells);
}
