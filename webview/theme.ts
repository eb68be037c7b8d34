// Canvas and chart.js cannot read CSS variables, so the theme is resolved to concrete colours here
// and re-read whenever VS Code swaps the theme class on <body>.
import { classColour, css, luminance, parseColour, parseHex, SIGN_HEX, type Rgb, type ThemeTone } from './palette';

export interface Theme {
  tone: ThemeTone;
  highContrast: boolean;
  background: Rgb;
  foreground: Rgb;
  muted: Rgb;
  border: Rgb;
  focus: Rgb;
  error: Rgb;
  /** Signed quantities (contributions): what pushes a prediction up, and what pulls it down. Never class colours. */
  increase: Rgb;
  decrease: Rgb;
  font: string;
  fontSize: number;
  classColour(k: number): Rgb;
}

let probe: CanvasRenderingContext2D | null = null;

/** Resolves any CSS colour (including var() fallbacks already substituted) through the canvas parser. */
function resolve(value: string, fallback: Rgb): Rgb {
  const v = value.trim();
  if (!v) return fallback;
  const direct = parseColour(v);
  if (direct) return direct;
  probe ??= document.createElement('canvas').getContext('2d');
  if (!probe) return fallback;
  probe.fillStyle = css(fallback);
  probe.fillStyle = v;
  return parseColour(String(probe.fillStyle)) ?? fallback;
}

export function readTheme(): Theme {
  const style = getComputedStyle(document.body);
  const v = (name: string) => style.getPropertyValue(name);
  const cls = document.body.classList;
  const highContrast = cls.contains('vscode-high-contrast') || cls.contains('vscode-high-contrast-light');
  const background = resolve(v('--vscode-editor-background'), resolve(style.backgroundColor, [30, 30, 30]));
  // Decide tone by the actual background rather than the class name, so custom themes work too.
  const tone: ThemeTone = luminance(background) > 0.35 ? 'light' : 'dark';
  const foreground = resolve(v('--vscode-editor-foreground') || v('--vscode-foreground'), tone === 'dark' ? [212, 212, 212] : [40, 40, 40]);
  const muted = resolve(v('--vscode-descriptionForeground'), tone === 'dark' ? [150, 150, 150] : [110, 110, 110]);
  const border = resolve(
    highContrast ? v('--vscode-contrastBorder') : v('--vscode-panel-border') || v('--vscode-widget-border'),
    tone === 'dark' ? [70, 70, 70] : [200, 200, 200],
  );
  const focus = resolve(v('--vscode-focusBorder'), tone === 'dark' ? [0, 120, 212] : [0, 95, 184]);
  const error = resolve(v('--vscode-errorForeground'), tone === 'dark' ? [241, 76, 76] : [200, 30, 30]);
  // Our own pair rather than the theme's chart colours: a theme's blue could be a class's blue, and a
  // contribution bar must never read as a class (see palette.ts).
  const increase = parseHex(SIGN_HEX.raises);
  const decrease = parseHex(SIGN_HEX.lowers);
  const font = v('--vscode-font-family').trim() || 'system-ui, sans-serif';
  const fontSize = parseFloat(v('--vscode-font-size')) || 13;
  return { tone, highContrast, background, foreground, muted, border, focus, error, increase, decrease, font, fontSize, classColour };
}

export function onThemeChange(fn: () => void): void {
  // VS Code marks the theme kind on <body> and writes the colour variables into <html style>.
  const obs = new MutationObserver(fn);
  obs.observe(document.body, { attributes: true, attributeFilter: ['class', 'data-vscode-theme-kind'] });
  obs.observe(document.documentElement, { attributes: true, attributeFilter: ['style'] });
}
