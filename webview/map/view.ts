// The large decision-region map: pickers, the grid image, training points on a separate overlay
// canvas (so the grid pixels stay readable for tests and the overlay can be hit-tested), axes and
// a legend. Scoring happens in the host; this only draws what arrives.
import { axisSpan, type FitSummary, type ReferenceChoice, type RegionMap } from '../../src/protocol/messages';
import { nameControl, PictureText } from '../a11y';
import { append, clear, custom, h } from '../dom';
import { num, percent } from '../format';
import type { Theme } from '../theme';
import { axisText, drawAxes, MARGIN } from './axes';
import { drawGrid, sizeCanvas } from './canvas';
import { drawLegend, drawNote } from './legend';
import { drawPoints, placePoints, pointNear, type Placed } from './points';

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
  private readonly text: PictureText;
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
    this.xSel = nameControl(custom('vscode-single-select', { testid: 'region-x' }), 'Feature across') as SelectEl;
    this.ySel = nameControl(custom('vscode-single-select', { testid: 'region-y' }), 'Feature up') as SelectEl;
    this.refSel = nameControl(custom('vscode-single-select', { testid: 'region-reference' }), 'Other features') as SelectEl;
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
      attrs: { type: 'number', min: '1', value: '1' },
    }) as HTMLElement & { value: string };
    nameControl(this.rowField, 'Row number');
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
    // The points layer repeats the grid for the mouse; assistive technology reads the grid's text instead.
    this.overlay = h('canvas', { class: 'map-points', testid: 'region-points', attrs: { 'aria-hidden': 'true' } });
    this.tip = h('div', { class: 'map-tip hidden', attrs: { role: 'status' } });
    this.xTitle = h('div', { class: 'axis-title x' });
    this.yTitle = h('div', { class: 'axis-title y' });
    this.plot = h('div', { class: 'map-plot' }, this.frame, this.grid, this.overlay, this.tip, this.xTitle, this.yTitle);
    this.legend = h('div', { class: 'map-legend', testid: 'region-legend' });
    this.note = h('p', { class: 'map-note muted' });
    this.empty = h('p', { class: 'muted' }, 'The map appears once the host has scored the grid.');
    this.text = new PictureText('region-text');

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
      this.text.root,
    );
    this.plot.classList.add('hidden');
    this.text.root.classList.add('hidden');

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
    this.text.root.classList.add('hidden');
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
    this.text.describe(this.grid, `Decision regions: ${map.x.feature} across, ${map.y.feature} up`);
    this.text.root.classList.toggle('hidden', !map.text);
    if (map.text) {
      const t = map.text.table;
      const what = map.cells.task === 'classification' ? 'the class most cells predict (its share of the cells)' : `the mean predicted ${this.summary.target}`;
      this.text.set(map.text.sentence, { caption: `Decision regions, coarsened: ${what} per band`, corner: t.corner, columns: t.columns, rows: t.rows });
    }
    drawGrid(this.grid, map, this.summary.classes.length, theme);
    drawAxes(this.frame, { x: this.xTitle, y: this.yTitle }, map, theme, S, W, H);
    this.placed = placePoints(map, S);
    this.drawPoints();
    drawLegend(this.legend, map, this.summary, theme);
    drawNote(this.note, map);
  }

  private drawPoints(): void {
    if (this.map && this.theme) drawPoints(this.overlay, this.size, this.map, this.placed, this.highlighted, this.theme);
  }

  // -------------------------------------------------------------------------------------------

  private localPos(ev: MouseEvent): { x: number; y: number } {
    const r = this.overlay.getBoundingClientRect();
    return { x: ((ev.clientX - r.left) * this.size) / r.width, y: ((ev.clientY - r.top) * this.size) / r.height };
  }

  private pointAt(ev: MouseEvent): Placed | null {
    const { x, y } = this.localPos(ev);
    return pointNear(this.placed, x, y);
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
