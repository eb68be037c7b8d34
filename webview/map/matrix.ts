// Small maps for pairs among the most important features: a quick scan for where the forest
// draws interesting boundaries; clicking one asks the host for the full-size map of that pair
// (and the panel scrolls to it).
import type { FitSummary, RegionMap } from '../../src/protocol/messages';
import { visuallyHidden } from '../a11y';
import { append, clear, h } from '../dom';
import type { Theme } from '../theme';
import { drawGrid, sizeCanvas } from './canvas';

const TILE = 116;

export class MapMatrixView {
  readonly root: HTMLElement;
  private maps: RegionMap[] = [];
  private summary: FitSummary | null = null;
  private theme: Theme | null = null;

  constructor(private readonly open: (x: string, y: string) => void) {
    this.root = h('div', { class: 'map-matrix', testid: 'map-matrix' });
  }

  setSummary(summary: FitSummary): void {
    this.summary = summary;
    this.draw();
  }

  setMaps(maps: RegionMap[]): void {
    this.maps = maps;
    this.draw();
  }

  setTheme(theme: Theme): void {
    this.theme = theme;
    this.draw();
  }

  private draw(): void {
    clear(this.root);
    const { summary, theme } = this;
    if (!summary || !theme) return;
    if (this.maps.length === 0) {
      append(this.root, h('p', { class: 'muted' }, 'No pairs to show: the forest uses fewer than two features, or the host has not sent them yet.'));
      return;
    }
    for (const map of this.maps) {
      const canvas = h('canvas', { attrs: { 'aria-hidden': 'true' } });
      sizeCanvas(canvas, TILE, TILE);
      drawGrid(canvas, map, summary.classes.length, theme);
      // Each small map names its axes as the large one does: the feature across under it, the feature
      // up along its left edge, reading upwards.
      const tile = h(
        'button',
        {
          class: 'map-tile',
          title: `Open ${map.x.feature} against ${map.y.feature} as the large map`,
          attrs: {
            type: 'button',
            'data-x': map.x.feature,
            'data-y': map.y.feature,
          },
          on: { click: () => this.open(map.x.feature, map.y.feature) },
        },
        // The name is read from the hidden sentence; the drawn axis titles would read as "a → b →".
        h('span', { class: 'tile-axis y', attrs: { 'aria-hidden': 'true' } }, `${map.y.feature} →`),
        canvas,
        h('span', { class: 'tile-axis x', attrs: { 'aria-hidden': 'true' } }, `${map.x.feature} →`),
        visuallyHidden(`${map.x.feature} across, ${map.y.feature} up: open as the large map. `, map.text?.sentence ?? ''),
      );
      this.root.appendChild(tile);
    }
  }
}
