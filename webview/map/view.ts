// The large decision-region map: pickers, the grid image, training points on a separate overlay
// canvas (so the grid pixels stay readable for tests and the overlay can be hit-tested), axes and
// a legend. Scoring happens in the host; this only draws what arrives.
import {
  axisSpan,
  cellCentre,
  type FitSummary,
  type MapAxis,
  type ReferenceChoice,
  type RegionMap,
} from '../../src/protocol/messages';
import { append, clear, custom, h } from '../dom';
import { count, num, percent, truncate } from '../format';
import { css, rampColour, regionColour } from '../palette';
import type { Theme } from '../theme';
import { drawGrid, sizeCanvas } from './canvas';
import { rangeShare, valueRange } from './paint';
import { niceTicks, tickDigits } from './ticks';

const MARGIN = { left: 56, right: 12, top: 8, bottom: 40 };
const HIT_RADIUS = 6;

interface Placed {
  x: number;
  y: number;
  row: number;
  target: number;
}

type SelectEl = HTMLElement & { value: string };

export interface MapCallbacks {
  choose(x: string, y: string, reference: ReferenceChoice): void;
  reveal(row: number): void;
}

export class RegionMapView {
  readonly root: HTMLElement;
  private readonly xSel: SelectEl;
  private readonly ySel: SelectEl;
  private readonly refSel: SelectEl;
  private readonly rowField: HTMLElement & { value: string };
  private readonly rowWrap: HTMLElement;
  private readonly plot: HTMLElement;
  private readonly frame: HTMLCanvasElement;
  private readonly grid: HTMLCanvasElement;
  private readonly overlay: HTMLCanvasElement;
  private readonly xTitle: HTMLElement;
  private readonly yTitle: HTMLElement;
  private readonly legend: HTMLElement;
  private readonly note: HTMLElement;
  private readonly tip: HTMLElement;
  private readonly empty: HTMLElement;
  private summary: FitSummary | null = null;
  private map: RegionMap | null = null;
  private theme: Theme | null = null;
  private placed: Placed[] = [];
  private highlighted = new Set<number>();
  private size = 360;
  private lastX = '';
  private lastY = '';
  private suggestedRow = 1;

  constructor(private readonly cb: MapCallbacks) {
    this.xSel = custom('vscode-single-select', { testid: 'region-x', attrs: { 'aria-label': 'Feature across' } }) as SelectEl;
    this.ySel = custom('vscode-single-select', { testid: 'region-y', attrs: { 'aria-label': 'Feature up' } }) as SelectEl;
    this.refSel = custom('vscode-single-select', { testid: 'region-reference', attrs: { 'aria-label': 'Other features' } }) as SelectEl;
    for (const [value, label] of [
      ['typical', 'Typical values (medians / most frequent)'],
      ['row', 'Taken from one row'],
      ['averaged', 'Averaged over rows (partial dependence)'],
    ]) {
      const opt = custom('vscode-option', { attrs: { value } }, label);
      this.refSel.appendChild(opt);
    }
    this.rowField = custom('vscode-textfield', {
      testid: 'region-row',
      attrs: { type: 'number', min: '1', value: '1', 'aria-label': 'Row number' },
    }) as HTMLElement & { value: string };
    this.rowWrap = h('label', { class: 'inline-field hidden' }, 'row', this.rowField);

    this.xSel.addEventListener('change', () => this.onAxisChange('x'));
    this.ySel.addEventListener('change', () => this.onAxisChange('y'));
    this.refSel.addEventListener('change', () => {
      this.rowWrap.classList.toggle('hidden', this.refSel.value !== 'row');
      if (this.refSel.value === 'row') this.rowField.value = String(this.suggestedRow);
      this.emit();
    });
    this.rowField.addEventListener('change', () => this.emit());

    this.frame = h('canvas', { class: 'map-frame', attrs: { 'aria-hidden': 'true' } });
    this.grid = h('canvas', { class: 'map-grid', testid: 'region-map', attrs: { role: 'img' } });
    this.overlay = h('canvas', { class: 'map-points', testid: 'region-points' });
    this.tip = h('div', { class: 'map-tip hidden', attrs: { role: 'status' } });
    this.xTitle = h('div', { class: 'axis-title x' });
    this.yTitle = h('div', { class: 'axis-title y' });
    this.plot = h('div', { class: 'map-plot' }, this.frame, this.grid, this.overlay, this.tip, this.xTitle, this.yTitle);
    this.legend = h('div', { class: 'map-legend', testid: 'region-legend' });
    this.note = h('p', { class: 'map-note muted' });
    this.empty = h('p', { class: 'muted' }, 'The map appears once the host has scored the grid.');

    this.overlay.addEventListener('mousemove', (ev) => this.onHover(ev));
    this.overlay.addEventListener('mouseleave', () => this.tip.classList.add('hidden'));
    this.overlay.addEventListener('click', (ev) => {
      const p = this.pointAt(ev);
      if (p) this.cb.reveal(p.row);
    });

    this.root = h(
      'div',
      { class: 'region-map' },
      h(
        'div',
        { class: 'controls' },
        h('label', { class: 'field' }, h('span', {}, 'Across'), this.xSel),
        h('label', { class: 'field' }, h('span', {}, 'Up'), this.ySel),
        h('label', { class: 'field wide' }, h('span', {}, 'Other features'), this.refSel),
        this.rowWrap,
      ),
      this.empty,
      this.plot,
      this.legend,
      this.note,
    );
    this.plot.classList.add('hidden');

    new ResizeObserver(() => {
      const width = this.root.clientWidth;
      const next = Math.max(200, Math.min(560, Math.floor(width - MARGIN.left - MARGIN.right)));
      if (next !== this.size) {
        this.size = next;
        this.draw();
      }
    }).observe(this.root);
  }

  setSummary(summary: FitSummary): void {
    this.summary = summary;
    for (const sel of [this.xSel, this.ySel]) {
      clear(sel);
      for (const f of summary.features) sel.appendChild(custom('vscode-option', { attrs: { value: f.name } }, f.name));
    }
    const [a, b] = summary.features;
    if (!this.map && a && b) this.setPickers(a.name, b.name);
  }

  /** Forgets the map of an earlier fit, so its feature pair is not kept against the next fit's features. */
  reset(): void {
    this.map = null;
    this.draw();
  }

  setMap(map: RegionMap): void {
    this.map = map;
    this.setPickers(map.x.feature, map.y.feature);
    const ref = map.reference.mode;
    this.refSel.value = ref;
    this.rowWrap.classList.toggle('hidden', ref !== 'row');
    if (map.reference.mode === 'row') this.rowField.value = String(map.reference.row);
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  setHighlight(rows: readonly number[]): void {
    this.highlighted = new Set(rows);
    if (rows.length > 0) this.suggestedRow = rows[0];
    this.drawPoints();
  }

  /** What the pickers currently ask for, for state saving. */
  choice(): { x: string; y: string; reference: ReferenceChoice } | null {
    if (!this.xSel.value || !this.ySel.value) return null;
    return { x: this.xSel.value, y: this.ySel.value, reference: this.reference() };
  }

  private setPickers(x: string, y: string): void {
    this.xSel.value = x;
    this.ySel.value = y;
    this.lastX = x;
    this.lastY = y;
  }

  private reference(): ReferenceChoice {
    const mode = this.refSel.value;
    if (mode === 'row') {
      const row = Math.floor(Number(this.rowField.value));
      return { mode: 'row', row: Number.isFinite(row) && row >= 1 ? row : this.suggestedRow };
    }
    return mode === 'averaged' ? { mode: 'averaged' } : { mode: 'typical' };
  }

  private onAxisChange(which: 'x' | 'y'): void {
    // The same feature on both axes would be a line, not a map: swap instead.
    if (this.xSel.value === this.ySel.value) {
      if (which === 'x') this.ySel.value = this.lastX;
      else this.xSel.value = this.lastY;
    }
    this.lastX = this.xSel.value;
    this.lastY = this.ySel.value;
    this.emit();
  }

  private emit(): void {
    const c = this.choice();
    if (c) this.cb.choose(c.x, c.y, c.reference);
  }

  // -------------------------------------------------------------------------------------------

  private draw(): void {
    const map = this.map;
    const theme = this.theme;
    if (!map || !theme || !this.summary) return;
    this.empty.classList.add('hidden');
    this.plot.classList.remove('hidden');
    const S = this.size;
    const W = S + MARGIN.left + MARGIN.right;
    const H = S + MARGIN.top + MARGIN.bottom;
    this.plot.style.width = `${W}px`;
    this.plot.style.height = `${H}px`;
    for (const c of [this.grid, this.overlay]) {
      c.style.left = `${MARGIN.left}px`;
      c.style.top = `${MARGIN.top}px`;
    }
    sizeCanvas(this.grid, S, S);
    sizeCanvas(this.overlay, S, S);
    const xs = axisSpan(map.x);
    const ys = axisSpan(map.y);
    this.grid.dataset.grid = JSON.stringify({ nx: map.nx, ny: map.ny, xMin: xs.min, xMax: xs.max, yMin: ys.min, yMax: ys.max });
    this.grid.setAttribute('aria-label', `Decision regions of ${map.x.feature} against ${map.y.feature}`);
    drawGrid(this.grid, map, this.summary.classes.length, theme);
    this.drawFrame(S, W, H);
    this.placePoints();
    this.drawPoints();
    this.drawLegend();
    this.drawNote();
  }

  private drawFrame(S: number, W: number, H: number): void {
    const map = this.map as RegionMap;
    const theme = this.theme as Theme;
    const dpr = sizeCanvas(this.frame, W, H);
    const ctx = this.frame.getContext('2d');
    if (!ctx) return;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.clearRect(0, 0, W, H);
    ctx.strokeStyle = css(theme.border);
    ctx.lineWidth = 1;
    ctx.strokeRect(MARGIN.left - 0.5, MARGIN.top - 0.5, S + 1, S + 1);
    ctx.fillStyle = css(theme.muted);
    ctx.strokeStyle = css(theme.muted);
    ctx.font = `${Math.max(10, theme.fontSize - 2)}px ${theme.font}`;
    const xTicks = ticksFor(map.x, S);
    ctx.textAlign = 'center';
    ctx.textBaseline = 'top';
    for (const t of xTicks) {
      const px = MARGIN.left + t.at * S;
      ctx.beginPath();
      ctx.moveTo(px, MARGIN.top + S);
      ctx.lineTo(px, MARGIN.top + S + 4);
      ctx.stroke();
      ctx.fillText(t.label, px, MARGIN.top + S + 6);
    }
    const yTicks = ticksFor(map.y, S);
    ctx.textAlign = 'right';
    ctx.textBaseline = 'middle';
    for (const t of yTicks) {
      const py = MARGIN.top + S - t.at * S;
      ctx.beginPath();
      ctx.moveTo(MARGIN.left - 4, py);
      ctx.lineTo(MARGIN.left, py);
      ctx.stroke();
      ctx.fillText(truncate(t.label, 7), MARGIN.left - 6, py);
    }
    this.xTitle.textContent = map.x.feature;
    this.xTitle.style.left = `${MARGIN.left}px`;
    this.xTitle.style.width = `${S}px`;
    this.xTitle.style.top = `${MARGIN.top + S + 22}px`;
    this.yTitle.textContent = map.y.feature;
    this.yTitle.style.width = `${S}px`;
    this.yTitle.style.left = `${-S / 2 + 10}px`;
    this.yTitle.style.top = `${MARGIN.top + S / 2}px`;
  }

  private placePoints(): void {
    const map = this.map as RegionMap;
    const pts = map.points;
    this.placed = [];
    if (!pts) return;
    const S = this.size;
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
      this.placed.push({ x, y, row, target: pts.target[k] });
    }
  }

  private drawPoints(): void {
    const map = this.map;
    const theme = this.theme;
    if (!map || !theme) return;
    const ctx = this.overlay.getContext('2d');
    if (!ctx) return;
    const dpr = this.overlay.width / this.size;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.clearRect(0, 0, this.size, this.size);
    const range = valueRange(map);
    const r = this.placed.length > 800 ? 2.2 : 3;
    ctx.lineWidth = theme.highContrast ? 1.5 : 1;
    ctx.strokeStyle = css(theme.highContrast ? theme.foreground : theme.background);
    for (const p of this.placed) {
      const c = range ? rampColour(rangeShare(p.target, range)) : theme.classColour(p.target);
      ctx.fillStyle = css(c);
      ctx.beginPath();
      ctx.arc(p.x, p.y, r, 0, Math.PI * 2);
      ctx.fill();
      ctx.stroke();
    }
    if (this.highlighted.size > 0) {
      ctx.strokeStyle = css(theme.foreground);
      ctx.lineWidth = 2;
      for (const p of this.placed) {
        if (!this.highlighted.has(p.row)) continue;
        ctx.beginPath();
        ctx.arc(p.x, p.y, r + 3.5, 0, Math.PI * 2);
        ctx.stroke();
      }
    }
  }

  private drawLegend(): void {
    const map = this.map as RegionMap;
    const theme = this.theme as Theme;
    const summary = this.summary as FitSummary;
    clear(this.legend);
    if (map.cells.task === 'classification') {
      const K = summary.classes.length;
      const items = summary.classes.map((label, k) =>
        h('span', { class: 'legend-item' }, swatch(css(theme.classColour(k))), h('span', {}, label)),
      );
      append(this.legend, h('div', { class: 'legend-classes' }, ...items));
      // The shading key uses the first class colour; every class fades the same way.
      const steps = [0, 0.25, 0.5, 0.75, 1].map((t) => {
        const s = 1 / Math.max(2, K) + t * (1 - 1 / Math.max(2, K));
        return swatch(css(regionColour(theme.classColour(0), theme.background, s, K)));
      });
      append(
        this.legend,
        h(
          'div',
          { class: 'legend-shade muted' },
          h('span', {}, map.reference.mode === 'averaged' ? 'weak average' : 'split vote'),
          ...steps,
          h('span', {}, map.reference.mode === 'averaged' ? 'strong average' : 'all trees agree'),
        ),
      );
    } else {
      const range = valueRange(map);
      if (!range) return;
      const bar = h('canvas', { class: 'legend-ramp' });
      sizeCanvas(bar, 160, 10);
      const ctx = bar.getContext('2d');
      if (ctx) {
        for (let px = 0; px < bar.width; px++) {
          ctx.fillStyle = css(rampColour(px / (bar.width - 1)));
          ctx.fillRect(px, 0, 1, bar.height);
        }
      }
      append(
        this.legend,
        h('div', { class: 'legend-shade muted' }, h('span', {}, num(range.min)), bar, h('span', {}, num(range.max)), h('span', {}, `predicted ${summary.target}`)),
      );
    }
  }

  private drawNote(): void {
    const map = this.map as RegionMap;
    clear(this.note);
    const ref = map.reference;
    let lead: string;
    if (ref.mode === 'averaged') {
      lead = `Each cell averages the forest's answer over ${count(ref.sampleRows)} rows whose other features stay as they were (two-way partial dependence).`;
    } else if (ref.mode === 'row') {
      lead = `Other features taken from row ${ref.row}: `;
    } else {
      lead = 'Other features held at their median or most frequent level: ';
    }
    append(this.note, lead);
    if (ref.mode !== 'averaged') append(this.note, map.heldAt.map((h) => `${h.feature} = ${h.value}`).join(' · ') || 'none');
    const pts = map.points;
    if (pts) {
      append(
        this.note,
        h('br'),
        pts.x.length < pts.total
          ? `Dots: ${count(pts.x.length)} of ${count(pts.total)} training rows, sampled. Click one to go to its row.`
          : `Dots: all ${count(pts.total)} training rows. Click one to go to its row.`,
      );
    }
  }

  // -------------------------------------------------------------------------------------------

  private localPos(ev: MouseEvent): { x: number; y: number } {
    const r = this.overlay.getBoundingClientRect();
    return { x: ((ev.clientX - r.left) * this.size) / r.width, y: ((ev.clientY - r.top) * this.size) / r.height };
  }

  private pointAt(ev: MouseEvent): Placed | null {
    const { x, y } = this.localPos(ev);
    let best: Placed | null = null;
    let bestD = HIT_RADIUS * HIT_RADIUS;
    for (const p of this.placed) {
      const d = (p.x - x) ** 2 + (p.y - y) ** 2;
      if (d <= bestD) {
        bestD = d;
        best = p;
      }
    }
    return best;
  }

  private onHover(ev: MouseEvent): void {
    const map = this.map;
    const summary = this.summary;
    if (!map || !summary) return;
    const { x, y } = this.localPos(ev);
    const p = this.pointAt(ev);
    this.overlay.style.cursor = p ? 'pointer' : 'crosshair';
    const lines: string[] = [];
    if (p) {
      const label = map.cells.task === 'classification' ? (summary.classes[p.target] ?? '?') : num(p.target);
      lines.push(`Row ${p.row}: ${summary.target} = ${label}`, 'click to show it in the editor');
    } else {
      const i = Math.min(map.nx - 1, Math.max(0, Math.floor((x / this.size) * map.nx)));
      const j = Math.min(map.ny - 1, Math.max(0, Math.floor(((this.size - y) / this.size) * map.ny)));
      const cell = j * map.nx + i;
      lines.push(`${map.x.feature} = ${axisText(map.x, map.nx, i)}`, `${map.y.feature} = ${axisText(map.y, map.ny, j)}`);
      if (map.cells.task === 'classification') {
        const k = map.cells.predicted[cell];
        const share = map.cells.strength[cell];
        lines.push(k < 0 ? 'no vote' : `${summary.classes[k] ?? '?'}: ${percent(share, 0)} ${map.reference.mode === 'averaged' ? 'average probability' : 'of trees'}`);
      } else {
        lines.push(`predicted ${summary.target} = ${num(map.cells.value[cell])}`);
      }
    }
    clear(this.tip);
    for (const l of lines) append(this.tip, h('div', {}, l));
    this.tip.classList.remove('hidden');
    const left = MARGIN.left + x + 14;
    this.tip.style.left = `${Math.min(left, MARGIN.left + this.size - 120)}px`;
    this.tip.style.top = `${MARGIN.top + y + 12}px`;
  }
}

function swatch(colour: string): HTMLElement {
  const s = h('span', { class: 'swatch' });
  s.style.backgroundColor = colour;
  return s;
}

function jitter(row: number, salt: number): number {
  let x = (row * 2654435761 + salt * 40503) >>> 0;
  x ^= x >>> 13;
  x = Math.imul(x, 0x5bd1e995) >>> 0;
  x ^= x >>> 15;
  return (x >>> 0) / 4294967296;
}

function axisText(axis: MapAxis, n: number, i: number): string {
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
