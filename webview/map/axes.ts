// The large map's frame: border, tick marks and labels on a canvas behind the grid, and the two axis
// titles as text elements (so long feature names wrap and clip like the rest of the panel's text).
import { axisSpan, cellCentre, type MapAxis, type RegionMap } from '../../src/protocol/messages';
import { num, truncate } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';
import { sizeCanvas } from './canvas';
import { niceTicks, tickDigits } from './ticks';

/** Room around the square grid for ticks and titles, in CSS pixels. */
export const MARGIN = { left: 56, right: 12, top: 8, bottom: 40 };

export interface AxisTitles {
  x: HTMLElement;
  y: HTMLElement;
}

/** Draws the frame for a grid S pixels square inside a W x H plot, and places the axis titles. */
export function drawAxes(frame: HTMLCanvasElement, titles: AxisTitles, map: RegionMap, theme: Theme, S: number, W: number, H: number): void {
  const dpr = sizeCanvas(frame, W, H);
  const ctx = frame.getContext('2d');
  if (!ctx) return;
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  ctx.clearRect(0, 0, W, H);
  ctx.strokeStyle = css(theme.border);
  ctx.lineWidth = 1;
  ctx.strokeRect(MARGIN.left - 0.5, MARGIN.top - 0.5, S + 1, S + 1);
  ctx.fillStyle = css(theme.muted);
  ctx.strokeStyle = css(theme.muted);
  ctx.font = `${Math.max(10, theme.fontSize - 2)}px ${theme.font}`;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const t of ticksFor(map.x, S)) {
    const px = MARGIN.left + t.at * S;
    ctx.beginPath();
    ctx.moveTo(px, MARGIN.top + S);
    ctx.lineTo(px, MARGIN.top + S + 4);
    ctx.stroke();
    ctx.fillText(t.label, px, MARGIN.top + S + 6);
  }
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const t of ticksFor(map.y, S)) {
    const py = MARGIN.top + S - t.at * S;
    ctx.beginPath();
    ctx.moveTo(MARGIN.left - 4, py);
    ctx.lineTo(MARGIN.left, py);
    ctx.stroke();
    ctx.fillText(truncate(t.label, 7), MARGIN.left - 6, py);
  }
  titles.x.textContent = map.x.feature;
  titles.x.style.left = `${MARGIN.left}px`;
  titles.x.style.width = `${S}px`;
  titles.x.style.top = `${MARGIN.top + S + 22}px`;
  titles.y.textContent = map.y.feature;
  titles.y.style.width = `${S}px`;
  titles.y.style.left = `${-S / 2 + 10}px`;
  titles.y.style.top = `${MARGIN.top + S / 2}px`;
}

/** The value (or level) at the centre of cell i, as the tooltip shows it. */
export function axisText(axis: MapAxis, n: number, i: number): string {
  return axis.kind === 'numeric' ? num(cellCentre(axis, n, i)) : axis.levels[i];
}

function ticksFor(axis: MapAxis, S: number): Array<{ at: number; label: string }> {
  const span = axisSpan(axis);
  if (axis.kind !== 'numeric') {
    const n = axis.levels.length;
    const every = Math.max(1, Math.ceil((n * 48) / S));
    const out: Array<{ at: number; label: string }> = [];
    for (let k = 0; k < n; k += every) out.push({ at: (k - span.min) / (span.max - span.min), label: truncate(axis.levels[k], 10) });
    return out;
  }
  const ticks = niceTicks(span.min, span.max, Math.max(2, Math.round(S / 70)));
  const digits = tickDigits(ticks);
  return ticks.map((v) => ({ at: (v - span.min) / (span.max - span.min), label: Math.abs(v) >= 1e5 ? v.toExponential(1) : v.toFixed(digits) }));
}
