// Training rows over the large map: where each lands in canvas pixels, how it is drawn, and which one
// (if any) lies under the pointer. Kept apart from the grid so the grid's pixels stay exact.
import { axisSpan, type RegionMap } from '../../src/protocol/messages';
import { css, rampColour } from '../palette';
import type { Theme } from '../theme';
import { rangeShare, valueRange } from './paint';

/** How close (CSS pixels) the pointer must be for a point to count as under it. */
const HIT_RADIUS = 6;

export interface Placed {
  x: number;
  y: number;
  row: number;
  target: number;
}

/** Canvas positions (0..S, y down) of the map's point sample. */
export function placePoints(map: RegionMap, S: number): Placed[] {
  const pts = map.points;
  const placed: Placed[] = [];
  if (!pts) return placed;
  const xs = axisSpan(map.x);
  const ys = axisSpan(map.y);
  for (let k = 0; k < pts.x.length; k++) {
    const row = pts.row[k];
    // Level axes stack every row of a level on one spot; a fixed per-row jitter spreads them
    // inside their cell without moving them on redraw.
    const jx = map.x.kind === 'numeric' ? 0 : (jitter(row, 1) - 0.5) * 0.7;
    const jy = map.y.kind === 'numeric' ? 0 : (jitter(row, 2) - 0.5) * 0.7;
    const x = ((pts.x[k] + jx - xs.min) / (xs.max - xs.min)) * S;
    const y = S - ((pts.y[k] + jy - ys.min) / (ys.max - ys.min)) * S;
    placed.push({ x, y, row, target: pts.target[k] });
  }
  return placed;
}

/** Draws the points (and rings around highlighted rows) on an overlay canvas S CSS pixels square. */
export function drawPoints(overlay: HTMLCanvasElement, S: number, map: RegionMap, placed: readonly Placed[], highlighted: ReadonlySet<number>, theme: Theme): void {
  const ctx = overlay.getContext('2d');
  if (!ctx) return;
  const dpr = overlay.width / S;
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  ctx.clearRect(0, 0, S, S);
  const range = valueRange(map);
  const r = placed.length > 800 ? 2.2 : 3;
  ctx.lineWidth = theme.highContrast ? 1.5 : 1;
  ctx.strokeStyle = css(theme.highContrast ? theme.foreground : theme.background);
  for (const p of placed) {
    const c = range ? rampColour(rangeShare(p.target, range)) : theme.classColour(p.target);
    ctx.fillStyle = css(c);
    ctx.beginPath();
    ctx.arc(p.x, p.y, r, 0, Math.PI * 2);
    ctx.fill();
    ctx.stroke();
  }
  if (highlighted.size > 0) {
    ctx.strokeStyle = css(theme.foreground);
    ctx.lineWidth = 2;
    for (const p of placed) {
      if (!highlighted.has(p.row)) continue;
      ctx.beginPath();
      ctx.arc(p.x, p.y, r + 3.5, 0, Math.PI * 2);
      ctx.stroke();
    }
  }
}

/** The point nearest to (x, y) within the hit radius, or null. */
export function pointNear(placed: readonly Placed[], x: number, y: number): Placed | null {
  let best: Placed | null = null;
  let bestD = HIT_RADIUS * HIT_RADIUS;
  for (const p of placed) {
    const d = (p.x - x) ** 2 + (p.y - y) ** 2;
    if (d <= bestD) {
      bestD = d;
      best = p;
    }
  }
  return best;
}

function jitter(row: number, salt: number): number {
  let x = (row * 2654435761 + salt * 40503) >>> 0;
  x ^= x >>> 13;
  x = Math.imul(x, 0x5bd1e995) >>> 0;
  x ^= x >>> 15;
  return (x >>> 0) / 4294967296;
}
