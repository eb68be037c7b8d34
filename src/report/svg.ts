// Inline SVG charts for the report: bars and lines, drawn with no script, so the file opens anywhere, prints
// sharp and needs nothing outside itself. Colours of the page (text, rules, bars) come from CSS classes, so the
// reader's light or dark preference applies; class colours come from the panel's palette.
import { CLASS_HEX } from '../protocol/palette';
import { formatNumber } from '../core/format';
import { clip, esc } from './escape';

/** Up to about `count` round tick values spanning [lo, hi]. */
export function ticks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? raw;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

export const classHex = (k: number): string => (k >= 0 ? CLASS_HEX[k % CLASS_HEX.length] : '#808080');

const n = (v: number): string => (Math.round(v * 10) / 10).toString();

export interface Bar {
  readonly label: string;
  readonly value: number;
  readonly spread?: number;
}

/** Horizontal bars, one per feature, with the value written at the end of each. */
export function barChart(bars: readonly Bar[], label: string, format: (v: number) => string = formatNumber): string {
  const rowH = 20;
  const left = 150;
  const width = 420;
  const plot = width - left - 60;
  const finite = bars.filter((b) => Number.isFinite(b.value));
  const lo = Math.min(0, ...finite.map((b) => b.value - (b.spread ?? 0)));
  const hi = Math.max(1e-12, ...finite.map((b) => b.value + (b.spread ?? 0)));
  const sx = (v: number) => left + ((v - lo) / (hi - lo)) * plot;
  const height = bars.length * rowH + 8;
  let body = `<line class="axis" x1="${n(sx(0))}" y1="2" x2="${n(sx(0))}" y2="${height - 4}"/>`;
  bars.forEach((b, i) => {
    const y = 4 + i * rowH;
    body += `<text class="label" x="${left - 6}" y="${y + 13}" text-anchor="end"><title>${esc(b.label)}</title>${esc(clip(b.label, 22))}</text>`;
    if (!Number.isFinite(b.value)) {
      body += `<text class="muted" x="${left + 4}" y="${y + 13}">n/a</text>`;
      return;
    }
    const [a, z] = [sx(Math.min(0, b.value)), sx(Math.max(0, b.value))];
    body += `<rect class="bar" x="${n(a)}" y="${y + 3}" width="${n(Math.max(0.5, z - a))}" height="${rowH - 8}"/>`;
    if (b.spread && Number.isFinite(b.spread)) {
      const [s0, s1] = [sx(b.value - b.spread), sx(b.value + b.spread)];
      body += `<path class="whisker" d="M${n(s0)} ${y + 9}H${n(s1)}M${n(s0)} ${y + 5}V${y + 13}M${n(s1)} ${y + 5}V${y + 13}"/>`;
    }
    body += `<text class="value" x="${n(Math.max(z, b.spread ? sx(b.value + b.spread) : z) + 4)}" y="${y + 13}">${esc(format(b.value))}</text>`;
  });
  return `<svg class="chart" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="${esc(label)}">${body}</svg>`;
}

export interface Line {
  readonly name: string;
  readonly colour: string;
  readonly values: readonly number[];
}

export interface LineChartOptions {
  readonly label: string;
  readonly xTitle: string;
  readonly yTitle: string;
  /** Numeric positions of the points; level names make a chart of dots over categories instead. */
  readonly at: ReadonlyArray<number | string>;
  readonly width?: number;
  readonly height?: number;
  /** Start the value axis at zero (errors, shares). */
  readonly fromZero?: boolean;
}

/** Lines over a numeric axis, or dots joined across levels; axes with round ticks and titles. */
export function lineChart(lines: readonly Line[], o: LineChartOptions): string {
  const W = o.width ?? 420;
  const H = o.height ?? 220;
  const m = { l: 52, r: 12, t: 10, b: 40 };
  const levels = o.at.some((v) => typeof v === 'string');
  const xs = o.at.map((v, i) => (levels ? i : (v as number)));
  const x0 = levels ? -0.5 : Math.min(...xs);
  const x1 = levels ? xs.length - 0.5 : Math.max(...xs);
  const all = lines.flatMap((l) => l.values.filter(Number.isFinite));
  let y0 = o.fromZero ? Math.min(0, ...all) : Math.min(...all);
  let y1 = Math.max(...all);
  if (!(y1 > y0)) [y0, y1] = [y0 - 0.5, y0 + 0.5];
  const pad = (y1 - y0) * 0.05;
  if (!o.fromZero) y0 -= pad;
  y1 += pad;
  const sx = (v: number) => m.l + ((v - x0) / (x1 - x0 || 1)) * (W - m.l - m.r);
  const sy = (v: number) => H - m.b - ((v - y0) / (y1 - y0)) * (H - m.t - m.b);
  let body = '';
  for (const t of ticks(y0, y1, 4)) {
    body += `<line class="grid" x1="${m.l}" x2="${W - m.r}" y1="${n(sy(t))}" y2="${n(sy(t))}"/><text class="tick" x="${m.l - 4}" y="${n(sy(t) + 4)}" text-anchor="end">${esc(formatNumber(t))}</text>`;
  }
  const xt = levels ? xs : ticks(x0, x1, 5);
  const every = levels ? Math.max(1, Math.ceil(xs.length / 8)) : 1;
  xt.forEach((t, i) => {
    if (i % every) return;
    const text = levels ? clip(String(o.at[i]), 10) : formatNumber(t);
    body += `<text class="tick" x="${n(sx(t))}" y="${H - m.b + 14}" text-anchor="middle">${esc(text)}</text>`;
  });
  body += `<path class="axis" d="M${m.l} ${m.t}V${H - m.b}H${W - m.r}"/>`;
  for (const l of lines) {
    const pts = l.values.map((v, i) => (Number.isFinite(v) ? `${n(sx(xs[i]))},${n(sy(v))}` : null)).filter((s): s is string => s !== null);
    // Levels have no order between them, so their values stand as dots, unjoined.
    if (!levels) body += `<polyline class="series" stroke="${l.colour}" points="${pts.join(' ')}"><title>${esc(l.name)}</title></polyline>`;
    if (levels || pts.length === 1) for (const pt of pts) body += `<circle cx="${pt.split(',')[0]}" cy="${pt.split(',')[1]}" r="${levels ? 4 : 3}" fill="${l.colour}"><title>${esc(l.name)}</title></circle>`;
  }
  body += `<text class="axis-title" x="${n((m.l + W - m.r) / 2)}" y="${H - 6}" text-anchor="middle">${esc(clip(o.xTitle, 50))}</text>`;
  body += `<text class="axis-title" transform="translate(12 ${n((m.t + H - m.b) / 2)}) rotate(-90)" text-anchor="middle">${esc(clip(o.yTitle, 40))}</text>`;
  return `<svg class="chart" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${esc(o.label)}">${body}</svg>`;
}

/** A legend of coloured swatches, as HTML (it wraps, which SVG text does not). */
export function legend(items: ReadonlyArray<{ name: string; colour: string }>): string {
  return `<ul class="legend">${items.map((i) => `<li><span class="swatch" style="background:${i.colour}"></span>${esc(i.name)}</li>`).join('')}</ul>`;
}
