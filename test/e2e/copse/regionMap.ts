// Reads the drawn decision-region map out of the panel and checks it against
// the forest: each sampled grid cell is scored independently here, with core's
// predictor on a saved model, and the cell's pixel must be a tint of the
// colour the legend gives that class.
//
// What the panel promises its tests: the canvas `region-map` exposes
// `data-grid` {nx, ny, xMin, xMax, yMin, yMax}; cell (i, j) is evaluated at
// its centre, j = 0 is the lowest y and is drawn at the bottom; the features
// not on the axes are held at their typical values (the model's reference row)
// while "Typical values" is chosen. The tint itself (how much of the class
// colour a cell carries) is the panel's design, so only its direction is checked:
// a cell is a mix of the background and its class's legend colour, never of another's.

import { Frame } from 'playwright-core';
import { predictEncoded } from '../../../src/core/forest/predict';
import type { Forest } from '../../../src/core/forest/forest';

export type Rgb = [number, number, number];

export interface MapGrid {
  nx: number;
  ny: number;
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
}

export interface MapPicture {
  x: string;
  y: string;
  reference: string;
  grid: MapGrid;
  width: number;
  height: number;
  /** RGBA bytes of the grid canvas, row-major from the top. */
  pixels: Buffer;
  legend: { label: string; colour: Rgb }[];
  background: Rgb;
}

/** Everything the map shows, read from the panel's DOM and canvas (not from the host). */
export async function readRegionMap(frame: Frame): Promise<MapPicture> {
  const raw = await frame.evaluate<{
    x: string;
    y: string;
    reference: string;
    grid: string | undefined;
    width: number;
    height: number;
    pixels: string;
    legend: { label: string; colour: string }[];
    background: string;
  }>(`(() => {
    const canvas = document.querySelector('[data-testid=region-map]');
    const data = canvas.getContext('2d').getImageData(0, 0, canvas.width, canvas.height).data;
    let binary = '';
    for (let i = 0; i < data.length; i += 0x8000) binary += String.fromCharCode.apply(null, data.subarray(i, i + 0x8000));
    // The theme's editor background, resolved to rgb() by the canvas parser as the panel itself does.
    const probe = document.createElement('canvas').getContext('2d');
    probe.fillStyle = getComputedStyle(document.body).getPropertyValue('--vscode-editor-background').trim() || getComputedStyle(document.body).backgroundColor;
    probe.fillRect(0, 0, 1, 1);
    const bg = probe.getImageData(0, 0, 1, 1).data;
    return {
      x: document.querySelector('[data-testid=region-x]').value,
      y: document.querySelector('[data-testid=region-y]').value,
      reference: document.querySelector('[data-testid=region-reference]').value,
      grid: canvas.dataset.grid,
      width: canvas.width,
      height: canvas.height,
      pixels: btoa(binary),
      legend: [...document.querySelectorAll('[data-testid=region-legend] .legend-item')].map((item) => ({
        label: item.innerText.trim(),
        colour: getComputedStyle(item.querySelector('.swatch')).backgroundColor,
      })),
      background: 'rgb(' + bg[0] + ', ' + bg[1] + ', ' + bg[2] + ')',
    };
  })()`);
  if (!raw.grid) throw new Error('the region map canvas has no data-grid attribute');
  return {
    x: raw.x,
    y: raw.y,
    reference: raw.reference,
    grid: JSON.parse(raw.grid) as MapGrid,
    width: raw.width,
    height: raw.height,
    pixels: Buffer.from(raw.pixels, 'base64'),
    legend: raw.legend.map((l) => ({ label: l.label, colour: parseRgb(l.colour) })),
    background: parseRgb(raw.background),
  };
}

function parseRgb(text: string): Rgb {
  const m = /rgba?\(\s*(\d+)[\s,]+(\d+)[\s,]+(\d+)/.exec(text);
  if (!m) throw new Error(`not an rgb() colour: ${text}`);
  return [Number(m[1]), Number(m[2]), Number(m[3])];
}

/** The pixel at the centre of grid cell (i, j). */
export function cellPixel(map: MapPicture, i: number, j: number): Rgb {
  const px = Math.floor(((i + 0.5) * map.width) / map.grid.nx);
  const py = Math.floor(((map.grid.ny - 1 - j + 0.5) * map.height) / map.grid.ny);
  const o = (py * map.width + px) * 4;
  return [map.pixels[o], map.pixels[o + 1], map.pixels[o + 2]];
}

/** A spread of about `perAxis` x `perAxis` cells over the grid. */
export function sampleCells(grid: MapGrid, perAxis = 12): Array<[number, number]> {
  const along = (n: number): number[] => {
    const step = Math.max(1, Math.floor(n / perAxis));
    const out: number[] = [];
    for (let i = Math.floor(step / 2); i < n; i += step) out.push(i);
    return out;
  };
  const cells: Array<[number, number]> = [];
  for (const j of along(grid.ny)) for (const i of along(grid.nx)) cells.push([i, j]);
  return cells;
}

export interface ScoredCell {
  i: number;
  j: number;
  /** The forest's class at the cell centre (argmax of the averaged tree probabilities). */
  k: number;
  /** Its probability, and the runner-up's. */
  top: number;
  second: number;
}

/** Scores the centres of `cells` with the forest, other features at the model's reference values. */
export function scoreCells(forest: Forest, map: MapPicture, cells: Array<[number, number]>): ScoredCell[] {
  const features = forest.schema.features;
  const fx = features.findIndex((f) => f.name === map.x);
  const fy = features.findIndex((f) => f.name === map.y);
  if (fx < 0 || fy < 0) throw new Error(`the model has no feature ${fx < 0 ? map.x : map.y}`);
  const p = features.length;
  const K = forest.schema.target.classes?.length ?? 0;
  const { nx, ny, xMin, xMax, yMin, yMax } = map.grid;
  const x = new Float64Array(cells.length * p);
  cells.forEach(([i, j], r) => {
    features.forEach((f, c) => (x[r * p + c] = f.reference));
    // For level axes the span is [-0.5, L - 0.5], so the centre is the level code itself.
    x[r * p + fx] = xMin + ((i + 0.5) * (xMax - xMin)) / nx;
    x[r * p + fy] = yMin + ((j + 0.5) * (yMax - yMin)) / ny;
  });
  const prediction = predictEncoded(forest, x, cells.length);
  return cells.map(([i, j], r) => {
    const proba = Array.from(prediction.proba!.subarray(r * K, r * K + K));
    const sorted = [...proba].sort((a, b) => b - a);
    return { i, j, k: prediction.predicted[r], top: sorted[0], second: sorted[1] ?? 0 };
  });
}

export interface Tint {
  /** The class whose background-to-colour line passes nearest the pixel. */
  nearest: number;
  /** Distance (RGB units) from the pixel to that class's line, and how far along it the pixel sits (0 = background). */
  distance: number;
  along: number;
}

/** Which legend colour a pixel is a tint of. */
export function tintOf(pixel: Rgb, legend: Rgb[], background: Rgb): Tint {
  let best: Tint = { nearest: -1, distance: Infinity, along: 0 };
  legend.forEach((colour, k) => {
    const d = colour.map((c, n) => c - background[n]);
    const v = pixel.map((c, n) => c - background[n]);
    const dd = d.reduce((s, a) => s + a * a, 0);
    const t = Math.min(1, Math.max(0, d.reduce((s, a, n) => s + a * v[n], 0) / dd));
    const distance = Math.hypot(...v.map((a, n) => a - t * d[n]));
    if (distance < best.distance) best = { nearest: k, distance, along: t };
  });
  return best;
}

export interface MapCheck {
  checked: number;
  classesSeen: number;
  problems: string[];
}

/**
 * Compares sampled cells' pixels with the forest's answers there. Cells where
 * two classes are within `margin` of each other are skipped: the panel's
 * scorer sums probabilities in worker threads, and a near tie may legitimately
 * go either way.
 */
export function checkMap(forest: Forest, map: MapPicture, margin = 0.1): MapCheck {
  const classes = forest.schema.target.classes ?? [];
  const legendLabels = map.legend.map((l) => l.label);
  const problems: string[] = [];
  if (JSON.stringify(legendLabels) !== JSON.stringify(classes)) {
    problems.push(`legend shows ${JSON.stringify(legendLabels)}, the model's classes are ${JSON.stringify(classes)}`);
    return { checked: 0, classesSeen: 0, problems };
  }
  const legend = map.legend.map((l) => l.colour);
  const clear = scoreCells(forest, map, sampleCells(map.grid)).filter((c) => c.top - c.second >= margin);
  const seen = new Set<number>();
  const byClass = new Map<number, Array<{ top: number; along: number }>>();
  for (const cell of clear) {
    const pixel = cellPixel(map, cell.i, cell.j);
    const tint = tintOf(pixel, legend, map.background);
    seen.add(cell.k);
    const where = `cell (${cell.i}, ${cell.j}) of ${map.x} x ${map.y}`;
    // 2.5 RGB units: the panel rounds each channel of its mix to a byte.
    if (tint.nearest !== cell.k || tint.distance > 2.5 || tint.along <= 0) {
      problems.push(
        `${where}: the forest says ${classes[cell.k]} (${(cell.top * 100).toFixed(0)}%), the pixel rgb(${pixel.join(', ')}) ` +
          `is nearest ${classes[tint.nearest] ?? 'none'} (off its line by ${tint.distance.toFixed(1)}, ${(tint.along * 100).toFixed(0)}% along)`,
      );
      continue;
    }
    const list = byClass.get(cell.k) ?? [];
    list.push({ top: cell.top, along: tint.along });
    byClass.set(cell.k, list);
  }
  // A surer vote must not be drawn fainter (the legend's "split vote ... all trees agree" key).
  for (const [k, list] of byClass) {
    list.sort((a, b) => a.top - b.top);
    for (let n = 1; n < list.length; n++) {
      if (list[n].top > list[n - 1].top + 1e-9 && list[n].along < list[n - 1].along - 0.02) {
        problems.push(`${classes[k]}: a ${(list[n].top * 100).toFixed(0)}% vote is drawn fainter than a ${(list[n - 1].top * 100).toFixed(0)}% one`);
        break;
      }
    }
  }
  return { checked: clear.length, classesSeen: seen.size, problems };
}

/** Share of pixels that differ between two pictures of the same canvas size. */
export function changedShare(a: MapPicture, b: MapPicture): number {
  if (a.pixels.length !== b.pixels.length) return 1;
  let changed = 0;
  for (let o = 0; o < a.pixels.length; o += 4) {
    if (a.pixels[o] !== b.pixels[o] || a.pixels[o + 1] !== b.pixels[o + 1] || a.pixels[o + 2] !== b.pixels[o + 2]) changed++;
  }
  return changed / (a.pixels.length / 4);
}
