// A regression row's per-tree predictions on a numeric axis: one dot per tree, stacked where trees agree,
// the trees that did not see the row in a lane of their own, and the row's label and the out-of-bag
// mean (or, for a row the forest did not train on, the mean of all trees) marked as lines with their
// values written out. Position carries the value, so nothing here relies on colour. Every row shares
// one scale so rows can be compared by eye.
import type { RowVotes } from '../../src/protocol/messages';
import { niceTicks, tickDigits } from '../map/ticks';
import { h } from '../dom';
import { num } from '../format';
import { css } from '../palette';
import type { Theme } from '../theme';

/** Columns dots are stacked in; neighbours closer than one column share a stack. */
const BINS = 90;
const DOT = 6;
/** Tallest a lane grows before its stacks squeeze together. */
const LANE_MAX = 66;

export interface ValueScale {
  min: number;
  max: number;
  ticks: number[];
}

/** One scale for all rows shown: every vote, label, out-of-bag mean and interval end, widened to round ticks. */
export function valueScale(rows: readonly RowVotes[]): ValueScale {
  let lo = Infinity;
  let hi = -Infinity;
  const take = (v: number | null | undefined) => {
    if (v === null || v === undefined || !Number.isFinite(v)) return;
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  };
  for (const r of rows) {
    r.votes.forEach(take);
    take(r.label);
    take(r.oobVote);
    if (r.lead === 'all-trees') take(r.allPredicted);
    take(r.interval?.lower);
    take(r.interval?.upper);
  }
  if (!Number.isFinite(lo)) return { min: 0, max: 1, ticks: [0, 1] };
  if (!(hi > lo)) {
    lo -= 0.5;
    hi += 0.5;
  }
  const ticks = niceTicks(lo, hi, 6);
  const step = ticks.length > 1 ? ticks[1] - ticks[0] : hi - lo;
  const min = ticks[0] > lo ? ticks[0] - step : ticks[0];
  const max = ticks[ticks.length - 1] < hi ? ticks[ticks.length - 1] + step : ticks[ticks.length - 1];
  return { min, max, ticks: [...(min < ticks[0] ? [min] : []), ...ticks, ...(max > ticks[ticks.length - 1] ? [max] : [])] };
}

export function treeValues(r: RowVotes, scale: ValueScale, theme: Theme, target: string, oobKnown: boolean): HTMLElement {
  const at = (v: number) => (v - scale.min) / (scale.max - scale.min);
  const oob = new Set(oobKnown ? r.outOfBag : []);
  const lanes: Array<{ name: string; key: string; trees: number[] }> =
    oob.size > 0
      ? [
          { name: 'out-of-bag trees', key: 'oob', trees: r.votes.map((_, t) => t).filter((t) => oob.has(t)) },
          { name: 'trees that saw it', key: 'in-bag', trees: r.votes.map((_, t) => t).filter((t) => !oob.has(t)) },
        ]
      : [{ name: 'trees', key: 'all', trees: r.votes.map((_, t) => t) }];
  const marks: Array<{ kind: 'label' | 'oob-mean' | 'all-trees'; text: string; v: number }> = [];
  if (r.label !== null) marks.push({ kind: 'label', text: `label ${num(r.label)}`, v: r.label });
  if (oobKnown && r.oobVote !== null && oob.size > 0) marks.push({ kind: 'oob-mean', text: `out-of-bag mean ${num(r.oobVote)}`, v: r.oobVote });
  // A row no tree was kept from has no out-of-bag answer; the forest's answer is then the mean of all trees.
  if (r.lead === 'all-trees') marks.push({ kind: 'all-trees', text: `mean of all trees ${num(r.allPredicted)}`, v: r.allPredicted });

  const strip = h('div', { class: 'tree-values', testid: 'vote-strip', attrs: { 'data-trees': String(r.votes.length), role: 'img' } });
  const said = marks.map((m) => m.text).join(', ');
  strip.setAttribute('aria-label', `${r.votes.length} trees’ predictions of ${target} for row ${r.row}, on an axis from ${num(scale.min)} to ${num(scale.max)}${said ? `; ${said}` : ''}`);

  // Above the lanes: each mark's value in words, one line per mark so they never overlap.
  for (const m of marks) {
    const text = h('span', { class: `mark-text ${m.kind} ${align(at(m.v))}`, testid: `mark-${m.kind}` }, m.text);
    text.style.left = `${100 * at(m.v)}%`;
    strip.append(h('span', {}), h('span', { class: 'mark-row' }, text));
  }
  for (const lane of lanes) {
    const track = h('span', { class: 'lane-track' });
    track.dataset.lane = lane.key;
    if (r.interval) {
      const band = h('span', { class: 'interval-band', title: `${Number((r.interval.level * 100).toFixed(1))}% interval: ${num(r.interval.lower)} to ${num(r.interval.upper)}` });
      band.style.left = `${100 * at(r.interval.lower)}%`;
      band.style.width = `${100 * (at(r.interval.upper) - at(r.interval.lower))}%`;
      band.style.backgroundColor = css(theme.foreground, 0.09);
      track.appendChild(band);
    }
    for (const m of marks) {
      const line = h('span', { class: `mark-line ${m.kind}` });
      line.style.left = `${100 * at(m.v)}%`;
      line.style.borderColor = css(theme.foreground);
      track.appendChild(line);
    }
    const stacks = new Map<number, number>();
    const placed = lane.trees.map((t) => {
      const bin = Math.round(at(r.votes[t]) * BINS);
      const level = stacks.get(bin) ?? 0;
      stacks.set(bin, level + 1);
      return { t, level };
    });
    const tallest = Math.max(1, ...stacks.values());
    const stepPx = tallest > 1 ? Math.min(DOT + 1, (LANE_MAX - DOT) / (tallest - 1)) : 0;
    track.style.height = `${DOT + 6 + (tallest - 1) * stepPx}px`;
    for (const { t, level } of placed) {
      const v = r.votes[t];
      const out = oob.has(t);
      const dot = h('span', { class: out ? 'tree oob' : 'tree', title: `tree ${t + 1}: ${num(v)}${out ? ' (out-of-bag)' : ''}` });
      dot.dataset.tree = String(t);
      dot.dataset.value = String(v);
      dot.style.left = `calc(${100 * at(v)}% - ${DOT / 2}px)`;
      dot.style.bottom = `${3 + level * stepPx}px`;
      dot.style.borderColor = css(theme.foreground, 0.9);
      if (out || lanes.length === 1) dot.style.backgroundColor = css(theme.foreground, 0.75);
      track.appendChild(dot);
    }
    strip.append(h('span', { class: 'lane-name muted' }, lane.name), track);
  }
  const axis = h('span', { class: 'value-axis', attrs: { 'aria-hidden': 'true' } });
  const digits = tickDigits(scale.ticks);
  for (const v of scale.ticks) {
    const tick = h('span', { class: `tick ${align(at(v))}` }, Math.abs(v) >= 1e5 ? v.toExponential(1) : v.toFixed(digits));
    tick.style.left = `${100 * at(v)}%`;
    tick.dataset.value = String(v);
    axis.appendChild(tick);
  }
  strip.append(h('span', { class: 'lane-name muted' }, `${target} per tree`), axis);
  return strip;
}

/** Text near an end of the axis hangs inward so it stays inside the strip. */
function align(x: number): 'start' | 'mid' | 'end' {
  return x < 0.08 ? 'start' : x > 0.92 ? 'end' : 'mid';
}
