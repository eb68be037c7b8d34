// What sits under the large map: the colour key (classes and how shading reads, or the value scale)
// and the note saying how the other features were set and which training rows the dots are.
import type { FitSummary, RegionMap } from '../../src/protocol/messages';
import { append, clear, h } from '../dom';
import { count, num } from '../format';
import { css, rampColour, regionColour } from '../palette';
import type { Theme } from '../theme';
import { sizeCanvas } from './canvas';
import { valueRange } from './paint';

export function drawLegend(legend: HTMLElement, map: RegionMap, summary: FitSummary, theme: Theme): void {
  clear(legend);
  if (map.cells.task === 'classification') {
    const K = summary.classes.length;
    const items = summary.classes.map((label, k) => h('span', { class: 'legend-item' }, swatch(css(theme.classColour(k))), h('span', {}, label)));
    append(legend, h('div', { class: 'legend-classes' }, ...items));
    // The shading key uses the first class colour; every class fades the same way.
    const steps = [0, 0.25, 0.5, 0.75, 1].map((t) => {
      const s = 1 / Math.max(2, K) + t * (1 - 1 / Math.max(2, K));
      return swatch(css(regionColour(theme.classColour(0), theme.background, s, K)));
    });
    append(
      legend,
      h(
        'div',
        { class: 'legend-shade muted' },
        h('span', {}, map.reference.mode === 'averaged' ? 'weak average' : 'split vote'),
        ...steps,
        h('span', {}, map.reference.mode === 'averaged' ? 'strong average' : 'all trees agree'),
      ),
    );
    return;
  }
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
  append(legend, h('div', { class: 'legend-shade muted' }, h('span', {}, num(range.min)), bar, h('span', {}, num(range.max)), h('span', {}, `predicted ${summary.target}`)));
}

export function drawNote(note: HTMLElement, map: RegionMap): void {
  clear(note);
  const ref = map.reference;
  let lead: string;
  if (ref.mode === 'averaged') {
    lead = `Each cell averages the forest's answer over ${count(ref.sampleRows)} rows whose other features stay as they were (two-way partial dependence).`;
  } else if (ref.mode === 'row') {
    lead = `Other features taken from row ${ref.row}: `;
  } else {
    lead = 'Other features held at their median or most frequent level: ';
  }
  append(note, lead);
  if (ref.mode !== 'averaged') append(note, map.heldAt.map((h) => `${h.feature} = ${h.value}`).join(' · ') || 'none');
  const pts = map.points;
  if (pts) {
    append(
      note,
      h('br'),
      pts.x.length < pts.total
        ? `Dots: ${count(pts.x.length)} of ${count(pts.total)} training rows, sampled. Click one to go to its row.`
        : `Dots: all ${count(pts.total)} training rows. Click one to go to its row.`,
    );
  }
}

function swatch(colour: string): HTMLElement {
  const s = h('span', { class: 'swatch' });
  s.style.backgroundColor = colour;
  return s;
}
