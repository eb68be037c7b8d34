// Inline SVG for the evaluation pictures: curves on the unit square (ROC, precision-recall, calibration, with a
// dashed reference such as the diagonal and, for calibration, the rows per bin drawn under it) and a scatter of
// predicted against actual. Only drawing: every point comes from the summary as core computed it.
import { formatNumber } from '../core/format';
import { clip, esc } from './escape';
import { ticks } from './svg';

const n = (v: number): string => (Math.round(v * 10) / 10).toString();

export type XY = readonly [number, number];

export interface Curve {
  readonly name: string;
  readonly colour: string;
  readonly points: readonly XY[];
}

export interface UnitChartOptions {
  readonly label: string;
  readonly xTitle: string;
  readonly yTitle: string;
  /** Dashed lines to read the curves against: the diagonal, a base rate. */
  readonly references?: ReadonlyArray<{ readonly points: readonly XY[]; readonly colour?: string }>;
  /** Rows per bin, drawn as bars in a strip under the plot on the same x axis. */
  readonly histogram?: ReadonlyArray<{ readonly lower: number; readonly upper: number; readonly rows: number }>;
  readonly size?: number;
}

const M = { l: 46, r: 10, t: 8, b: 38 };
const STRIP = 44;

function frame(W: number, top: number, bottom: number, sx: (v: number) => number, sy: (v: number) => number, lo: number, hi: number, xTicks: boolean): string {
  let body = '';
  for (const t of ticks(lo, hi, 4)) {
    body += `<line class="grid" x1="${M.l}" x2="${W - M.r}" y1="${n(sy(t))}" y2="${n(sy(t))}"/><text class="tick" x="${M.l - 4}" y="${n(sy(t) + 4)}" text-anchor="end">${esc(formatNumber(t))}</text>`;
  }
  if (xTicks) for (const t of ticks(lo, hi, 5)) body += `<text class="tick" x="${n(sx(t))}" y="${bottom + 14}" text-anchor="middle">${esc(formatNumber(t))}</text>`;
  return `${body}<path class="axis" d="M${M.l} ${top}V${bottom}H${W - M.r}"/>`;
}

const titles = (W: number, H: number, plotBottom: number, xTitle: string, yTitle: string): string =>
  `<text class="axis-title" x="${n((M.l + W - M.r) / 2)}" y="${H - 6}" text-anchor="middle">${esc(clip(xTitle, 50))}</text>` +
  `<text class="axis-title" transform="translate(12 ${n((M.t + plotBottom) / 2)}) rotate(-90)" text-anchor="middle">${esc(clip(yTitle, 40))}</text>`;

const svg = (W: number, H: number, label: string, body: string): string =>
  `<svg class="chart" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${esc(label)}">${body}</svg>`;

/** Curves on [0, 1] × [0, 1], square, with dashed references and an optional count strip under the plot. */
export function unitChart(curves: readonly Curve[], o: UnitChartOptions): string {
  const side = o.size ?? 260;
  const W = M.l + side + M.r;
  const plotBottom = M.t + side;
  const strip = o.histogram ? STRIP + 8 : 0;
  const H = plotBottom + strip + M.b;
  const sx = (v: number) => M.l + v * side;
  const sy = (v: number) => plotBottom - v * side;
  let body = frame(W, M.t, plotBottom, sx, sy, 0, 1, !o.histogram);
  for (const ref of o.references ?? []) body += `<polyline class="ref"${ref.colour ? ` style="stroke:${ref.colour}"` : ''} points="${ref.points.map(([x, y]) => `${n(sx(x))},${n(sy(y))}`).join(' ')}"/>`;
  for (const c of curves) {
    const pts = c.points.filter(([x, y]) => Number.isFinite(x) && Number.isFinite(y)).map(([x, y]) => `${n(sx(x))},${n(sy(y))}`);
    body += `<polyline class="series" stroke="${c.colour}" points="${pts.join(' ')}"><title>${esc(c.name)}</title></polyline>`;
    // Few points (calibration bins) are marked, so a bin is visible even where the line is short.
    if (pts.length <= 20) for (const p of pts) body += `<circle cx="${p.split(',')[0]}" cy="${p.split(',')[1]}" r="2.5" fill="${c.colour}"><title>${esc(c.name)}</title></circle>`;
  }
  if (o.histogram) {
    const top = plotBottom + 8;
    const bottom = top + STRIP;
    const most = Math.max(1, ...o.histogram.map((b) => b.rows));
    body += `<path class="axis" d="M${M.l} ${top}V${bottom}H${W - M.r}"/><text class="tick" x="${M.l - 4}" y="${top + 8}" text-anchor="end">${esc(formatNumber(most))}</text><text class="tick" x="${M.l - 4}" y="${bottom}" text-anchor="end">0</text>`;
    for (const b of o.histogram) {
      const h = (b.rows / most) * (STRIP - 2);
      if (h > 0) body += `<rect class="hist" x="${n(sx(b.lower) + 0.5)}" y="${n(bottom - h)}" width="${n(Math.max(0.5, (b.upper - b.lower) * side - 1))}" height="${n(h)}"><title>${b.rows} rows</title></rect>`;
    }
    for (const t of ticks(0, 1, 5)) body += `<text class="tick" x="${n(sx(t))}" y="${bottom + 14}" text-anchor="middle">${esc(formatNumber(t))}</text>`;
  }
  return svg(W, H, o.label, body + titles(W, H, plotBottom, o.xTitle, o.yTitle));
}

/** Dots of predicted against actual on one shared scale, with the diagonal where the two agree. */
export function scatterChart(pairs: ReadonlyArray<{ readonly actual: number; readonly predicted: number }>, o: { label: string; xTitle: string; yTitle: string; colour: string; size?: number }): string {
  const side = o.size ?? 300;
  const W = M.l + side + M.r;
  const plotBottom = M.t + side;
  const H = plotBottom + M.b;
  const all = pairs.flatMap((p) => [p.actual, p.predicted]).filter(Number.isFinite);
  let lo = all.length ? Math.min(...all) : 0;
  let hi = all.length ? Math.max(...all) : 1;
  if (!(hi > lo)) [lo, hi] = [lo - 0.5, lo + 0.5];
  const pad = (hi - lo) * 0.04;
  [lo, hi] = [lo - pad, hi + pad];
  const sx = (v: number) => M.l + ((v - lo) / (hi - lo)) * side;
  const sy = (v: number) => plotBottom - ((v - lo) / (hi - lo)) * side;
  let body = frame(W, M.t, plotBottom, sx, sy, lo, hi, true);
  body += `<polyline class="ref" points="${n(sx(lo))},${n(sy(lo))} ${n(sx(hi))},${n(sy(hi))}"/>`;
  body += `<g class="dots" fill="${o.colour}">${pairs.map((p) => `<circle cx="${n(sx(p.actual))}" cy="${n(sy(p.predicted))}" r="2.2"/>`).join('')}</g>`;
  return svg(W, H, o.label, body + titles(W, H, plotBottom, o.xTitle, o.yTitle));
}
