// Decision-region maps as inline SVG: the grid core scored is one PNG image (a cell per pixel, scaled up without
// smoothing), axes and the sampled training rows are vector marks over it. Class tints are the class colour at
// partial opacity, so the page's own background, light or dark, shows through as the panel's mix does.
import { axisSpan, type MapAxis } from '../core/explain/grid-axis';
import { formatNumber } from '../core/format';
import { certainty, classColour, rampColour, REGION_TINT_MAX, REGION_TINT_MIN } from '../protocol/palette';
import { clip, esc } from './escape';
import { pngDataUri } from './png';
import { classHex, ticks } from './svg';
import type { ReportMap } from './types';

const n = (v: number): string => (Math.round(v * 10) / 10).toString();

/** The cells as RGBA pixels, top row first (the map's y axis grows upward). */
function cellPixels(map: ReportMap, classes: number): { rgba: Uint8Array; lo: number; hi: number } {
  const { nx, ny, cells } = map;
  const rgba = new Uint8Array(nx * ny * 4);
  let lo = Infinity;
  let hi = -Infinity;
  if (cells.task === 'regression') for (const v of cells.value) if (Number.isFinite(v)) [lo, hi] = [Math.min(lo, v), Math.max(hi, v)];
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const c = j * nx + i;
      const o = ((ny - 1 - j) * nx + i) * 4;
      if (cells.task === 'classification') {
        const k = cells.predicted[c];
        const [r, g, b] = classColour(k);
        const t = REGION_TINT_MIN + (REGION_TINT_MAX - REGION_TINT_MIN) * certainty(cells.strength[c], classes);
        rgba.set([r, g, b, k >= 0 ? Math.round(255 * t) : 0], o);
      } else {
        const v = cells.value[c];
        const [r, g, b] = rampColour(hi > lo ? (v - lo) / (hi - lo) : 0.5);
        rgba.set([r, g, b, Number.isFinite(v) ? 255 : 0], o);
      }
    }
  }
  return { rgba, lo, hi };
}

function scale(axis: MapAxis, from: number, to: number): (v: number) => number {
  const { min, max } = axisSpan(axis);
  return (v) => from + ((v - min) / (max - min || 1)) * (to - from);
}

function axisTicks(axis: MapAxis, most: number, chars: number): Array<{ at: number; text: string }> {
  if (axis.kind !== 'numeric') {
    const every = Math.max(1, Math.ceil(axis.levels.length / most));
    return axis.levels.map((l, k) => ({ at: k, text: clip(l, chars) })).filter((_, k) => k % every === 0);
  }
  return ticks(axis.min, axis.max, most).map((t) => ({ at: t, text: formatNumber(t) }));
}

export interface MapDrawing {
  readonly svg: string;
  /** Regression: the value range the colours span. */
  readonly range?: { lo: number; hi: number };
}

/** One map: `size` is the plot's side in CSS pixels; small maps get fewer ticks and no axis titles. */
export function mapSvg(map: ReportMap, classes: readonly string[], size: number, small = false): MapDrawing {
  const { rgba, lo, hi } = cellPixels(map, classes.length);
  // The left margin holds level names up to the clip length (about 6 px a character at the tick size).
  const m = small ? { l: 40, b: 22, t: 4, r: 4 } : { l: 80, b: 42, t: 6, r: 8 };
  const W = m.l + size + m.r;
  const H = m.t + size + m.b;
  const sx = scale(map.x, m.l, m.l + size);
  const sy = scale(map.y, m.t + size, m.t);
  let body = `<image x="${m.l}" y="${m.t}" width="${size}" height="${size}" preserveAspectRatio="none" class="cells" href="${pngDataUri(map.nx, map.ny, rgba)}"/>`;
  body += `<rect class="frame" x="${m.l}" y="${m.t}" width="${size}" height="${size}"/>`;
  const most = small ? 3 : 6;
  for (const t of axisTicks(map.x, most, small ? 6 : 10)) body += `<text class="tick" x="${n(sx(t.at))}" y="${m.t + size + 12}" text-anchor="middle">${esc(t.text)}</text>`;
  for (const t of axisTicks(map.y, most, small ? 5 : 10)) body += `<text class="tick" x="${m.l - 3}" y="${n(sy(t.at) + 3)}" text-anchor="end">${esc(t.text)}</text>`;
  if (!small) {
    body += `<text class="axis-title" x="${m.l + size / 2}" y="${H - 6}" text-anchor="middle">${esc(clip(map.x.feature, 60))}</text>`;
    body += `<text class="axis-title" transform="translate(12 ${m.t + size / 2}) rotate(-90)" text-anchor="middle">${esc(clip(map.y.feature, 50))}</text>`;
  }
  if (map.points) body += pointMarks(map, sx, sy, lo, hi);
  const label = `Decision regions over ${map.x.feature} and ${map.y.feature}`;
  const svg = `<svg class="map" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${esc(label)}">${body}</svg>`;
  return { svg, range: map.cells.task === 'regression' ? { lo, hi } : undefined };
}

function pointMarks(map: ReportMap, sx: (v: number) => number, sy: (v: number) => number, lo: number, hi: number): string {
  const pts = map.points!;
  // Level axes stack rows on one position; a fixed spread by index (no randomness) keeps them apart.
  const spread = (axis: MapAxis, i: number) => (axis.kind === 'numeric' ? 0 : (((i * 0.618034) % 1) - 0.5) * 0.6);
  let out = '<g class="points">';
  pts.x.forEach((xv, i) => {
    const t = pts.target[i];
    const fill = map.cells.task === 'classification' ? classHex(t) : rgbHex(rampColour(hi > lo ? (t - lo) / (hi - lo) : 0.5));
    out += `<circle cx="${n(sx(xv + spread(map.x, i)))}" cy="${n(sy(pts.y[i] + spread(map.y, i + 7)))}" r="2.6" fill="${fill}"/>`;
  });
  return out + '</g>';
}

export function rgbHex(c: readonly [number, number, number]): string {
  return `#${c.map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}

/** The regression colour scale as a small strip image, for a legend. */
export function rampStrip(): string {
  const w = 64;
  const rgba = new Uint8Array(w * 4);
  for (let i = 0; i < w; i++) rgba.set([...rampColour(i / (w - 1)), 255], i * 4);
  return pngDataUri(w, 1, rgba);
}
