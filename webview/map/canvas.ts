// Puts a region grid on a canvas: one ImageData pixel per cell, scaled up without smoothing so the
// grid resolution stays honest (blocks, not invented gradients between cells).
import type { RegionMap } from '../../src/protocol/messages';
import type { Theme } from '../theme';
import { paintGrid } from './paint';

export function sizeCanvas(canvas: HTMLCanvasElement, cssWidth: number, cssHeight: number): number {
  const dpr = Math.max(1, Math.min(3, window.devicePixelRatio || 1));
  canvas.style.width = `${cssWidth}px`;
  canvas.style.height = `${cssHeight}px`;
  canvas.width = Math.round(cssWidth * dpr);
  canvas.height = Math.round(cssHeight * dpr);
  return dpr;
}

export function drawGrid(canvas: HTMLCanvasElement, map: RegionMap, classes: number, theme: Theme): void {
  const ctx = canvas.getContext('2d');
  if (!ctx) return;
  const cells = document.createElement('canvas');
  cells.width = map.nx;
  cells.height = map.ny;
  const cctx = cells.getContext('2d');
  if (!cctx) return;
  const image = cctx.createImageData(map.nx, map.ny);
  paintGrid(map, classes, theme, image.data);
  cctx.putImageData(image, 0, 0);
  ctx.imageSmoothingEnabled = false;
  ctx.clearRect(0, 0, canvas.width, canvas.height);
  ctx.drawImage(cells, 0, 0, canvas.width, canvas.height);
}
