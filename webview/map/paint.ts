// Turns a region grid into RGBA pixels, one pixel per grid cell. Kept free of DOM types so the
// colour logic can be checked outside a browser; the caller wraps the bytes in ImageData.
import type { RegionMap } from '../../src/protocol/messages';
import { rampColour, regionColour, type Rgb } from '../palette';

export interface GridColours {
  background: Rgb;
  classColour(k: number): Rgb;
}

export interface ValueRange {
  min: number;
  max: number;
}

/** Value range for a regression map's colour scale: cells and shown points together, so both share one scale. */
export function valueRange(map: RegionMap): ValueRange | null {
  if (map.cells.task !== 'regression') return null;
  let min = Infinity;
  let max = -Infinity;
  for (const v of map.cells.value) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  for (const v of map.points?.target ?? []) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  if (!Number.isFinite(min)) return { min: 0, max: 1 };
  if (max === min) return { min: min - 0.5, max: max + 0.5 };
  return { min, max };
}

export function rangeShare(v: number, r: ValueRange): number {
  return (v - r.min) / (r.max - r.min);
}

/**
 * Fills `out` (nx * ny * 4 bytes, image row 0 at the top) from the grid. Grid row j = 0 is the
 * lowest y, so it lands on the bottom image row.
 */
export function paintGrid(map: RegionMap, classes: number, colours: GridColours, out: Uint8ClampedArray): void {
  const { nx, ny, cells } = map;
  const range = valueRange(map);
  for (let j = 0; j < ny; j++) {
    const rowStart = (ny - 1 - j) * nx;
    for (let i = 0; i < nx; i++) {
      const cell = j * nx + i;
      let c: Rgb;
      if (cells.task === 'classification') {
        const k = cells.predicted[cell];
        c = k < 0 ? colours.background : regionColour(colours.classColour(k), colours.background, cells.strength[cell], classes);
      } else {
        c = rampColour(rangeShare(cells.value[cell], range as ValueRange));
      }
      const o = (rowStart + i) * 4;
      out[o] = c[0];
      out[o + 1] = c[1];
      out[o + 2] = c[2];
      out[o + 3] = 255;
    }
  }
}
