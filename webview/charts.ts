// chart.js, registered once with only the parts the panel uses so the bundle stays lean.
import {
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartConfiguration,
  type ChartType,
} from 'chart.js';
import { css } from './palette';
import type { Theme } from './theme';

Chart.register(BarController, BarElement, CategoryScale, LinearScale, LineController, LineElement, PointElement, Tooltip, Legend);

export { Chart };

export function applyTheme(theme: Theme): void {
  Chart.defaults.color = css(theme.muted);
  Chart.defaults.borderColor = css(theme.border, theme.highContrast ? 1 : 0.6);
  Chart.defaults.font.family = theme.font;
  Chart.defaults.font.size = Math.max(10, theme.fontSize - 1);
  // Charts are redrawn on every message; animation would only make numbers hard to read.
  Chart.defaults.animation = false;
}

/** Replaces any chart on the canvas: themes and data change together, so rebuilding is simplest. */
export function replaceChart<T extends ChartType>(canvas: HTMLCanvasElement, config: ChartConfiguration<T>): Chart<T> {
  Chart.getChart(canvas)?.destroy();
  return new Chart(canvas, config);
}
