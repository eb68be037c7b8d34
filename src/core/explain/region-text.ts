// The words and the table behind a decision-region map, for readers who cannot see the picture (a screen
// reader reads them) and for anyone who wants the numbers: one sentence saying where each class wins (or
// where the prediction is highest and lowest) and how much of the map is a close vote, and a coarse table of
// the grid. Computed here, once, from the same cells the panel paints.

import { formatNumber, formatShare } from '../format';
import { cellCentre, type MapAxis, type RegionCells } from './grid-axis';

/** Below this share of the vote a cell's winning class counts as a close vote (common practice: a bare majority of two is 50%). */
export const CLOSE_VOTE = 0.6;
/** Most bands along each axis in the table: enough to see the shape, few enough to read aloud. */
const MAX_BANDS = 8;

export interface RegionText {
  /** One or two sentences for a screen reader and the visible summary. */
  sentence: string;
  /** Row headers are bands of the feature up (highest first), columns bands of the feature across. */
  table: { corner: string; columns: string[]; rows: Array<{ head: string; cells: string[] }> };
}

interface Grid {
  x: MapAxis;
  y: MapAxis;
  nx: number;
  ny: number;
  cells: RegionCells;
}

interface Band {
  from: number;
  to: number; // exclusive cell index
  label: string;
}

function bands(axis: MapAxis, n: number): Band[] {
  if (axis.kind !== 'numeric') {
    if (n <= MAX_BANDS * 2) return axis.levels.map((l, i) => ({ from: i, to: i + 1, label: l }));
  }
  const k = Math.min(n, MAX_BANDS);
  const out: Band[] = [];
  for (let b = 0; b < k; b++) {
    const from = Math.floor((b * n) / k);
    const to = Math.floor(((b + 1) * n) / k);
    out.push({ from, to, label: spanText(axis, n, from, to - 1) });
  }
  return out;
}

/** The values a run of cells covers: "10–25" on a numeric axis, the level names on a level axis. */
function spanText(axis: MapAxis, n: number, first: number, last: number): string {
  if (axis.kind !== 'numeric') {
    const names = axis.levels.slice(first, last + 1);
    return names.length > 3 ? `${names.slice(0, 3).join(', ')} …` : names.join(', ');
  }
  const w = (axis.max - axis.min) / n;
  const lo = cellCentre(axis, n, first) - w / 2;
  const hi = cellCentre(axis, n, last) + w / 2;
  return `${formatNumber(lo)}–${formatNumber(hi)}`;
}

/**
 * Where along one axis a set of cells lies: the span from the first to the last line (column or row) the set
 * holds at least half of, or, when it holds half of none, the lines it holds most of.
 */
function whereAlong(axis: MapAxis, n: number, idx: number[], lineSize: number): string {
  if (idx.length === 0) return '';
  const counts = new Array<number>(n).fill(0);
  for (const i of idx) counts[i]++;
  const most = Math.max(...counts);
  const marked = counts.map((c, i) => [c, i] as const).filter(([c]) => c >= Math.min(lineSize / 2, most)).map(([, i]) => i);
  if (axis.kind !== 'numeric') {
    if (marked.length === n) return '';
    const names = marked.map((i) => axis.levels[i]);
    return `${axis.feature} is ${names.length > 3 ? `${names.slice(0, 3).join(', ')} or another ${names.length - 3}` : names.join(' or ')}`;
  }
  const lo = marked[0];
  const hi = marked[marked.length - 1];
  const edge = (i: number, side: -1 | 1) => formatNumber(cellCentre(axis, n, i) + (side * (axis.max - axis.min)) / n / 2);
  if (lo === 0 && hi === n - 1) return '';
  if (lo === 0) return `${axis.feature} is below ${edge(hi, 1)}`;
  if (hi === n - 1) return `${axis.feature} is above ${edge(lo, -1)}`;
  return `${axis.feature} is ${spanText(axis, n, lo, hi)}`;
}

function where(g: Grid, cells: number[]): string {
  const parts = [whereAlong(g.x, g.nx, cells.map((c) => c % g.nx), g.ny), whereAlong(g.y, g.ny, cells.map((c) => Math.floor(c / g.nx)), g.nx)].filter((p) => p !== '');
  return parts.length === 0 ? 'across the whole map' : `mostly where ${parts.join(' and ')}`;
}

export function describeRegions(g: Grid, classes: readonly string[]): RegionText {
  const size = g.nx * g.ny;
  const xb = bands(g.x, g.nx);
  const yb = bands(g.y, g.ny).reverse();
  const block = (b: Band, a: Band): number[] => {
    const out: number[] = [];
    for (let j = a.from; j < a.to; j++) for (let i = b.from; i < b.to; i++) out.push(j * g.nx + i);
    return out;
  };
  const corner = `${g.y.feature} ↓ · ${g.x.feature} →`;
  const columns = xb.map((b) => b.label);
  const c = g.cells;
  if (c.task === 'classification') {
    const byClass = classes.map(() => [] as number[]);
    let close = 0;
    for (let i = 0; i < size; i++) {
      if (c.predicted[i] >= 0) byClass[c.predicted[i]]?.push(i);
      if (c.predicted[i] < 0 || c.strength[i] < CLOSE_VOTE) close++;
    }
    const order = byClass.map((cells, k) => ({ k, cells })).filter((e) => e.cells.length > 0).sort((a, b) => b.cells.length - a.cells.length);
    const parts = order.map((e) => `${classes[e.k]} on ${formatShare(e.cells.length / size, 0)} of the map, ${where(g, e.cells)}`);
    const sentence =
      `The forest predicts ${parts.join('; ')}. ` +
      `${formatShare(close / size, 0)} of the map is a close vote (the winning class holds under ${formatShare(CLOSE_VOTE, 0)} of the trees).`;
    const rows = yb.map((a) => ({
      head: a.label,
      cells: xb.map((b) => {
        const ids = block(b, a);
        const votes = new Array<number>(classes.length).fill(0);
        for (const i of ids) if (c.predicted[i] >= 0) votes[c.predicted[i]]++;
        const best = votes.indexOf(Math.max(...votes));
        return votes[best] === 0 ? '—' : `${classes[best]} (${formatShare(votes[best] / ids.length, 0)})`;
      }),
    }));
    return { sentence, table: { corner, columns, rows } };
  }
  const v = c.value;
  let lo = 0;
  let hi = 0;
  for (let i = 1; i < size; i++) {
    if (v[i] < v[lo]) lo = i;
    if (v[i] > v[hi]) hi = i;
  }
  const range = v[hi] - v[lo];
  const top = [...v.keys()].filter((i) => v[i] >= v[hi] - 0.2 * range);
  const bottom = [...v.keys()].filter((i) => v[i] <= v[lo] + 0.2 * range);
  const sentence =
    range === 0
      ? `The forest predicts ${formatNumber(v[0])} everywhere on the map.`
      : `The prediction runs from ${formatNumber(v[lo])} to ${formatNumber(v[hi])}: highest ${where(g, top)}, lowest ${where(g, bottom)}.`;
  const rows = yb.map((a) => ({
    head: a.label,
    cells: xb.map((b) => {
      const ids = block(b, a);
      return formatNumber(ids.reduce((s, i) => s + v[i], 0) / ids.length);
    }),
  }));
  return { sentence, table: { corner, columns, rows } };
}
