// Colours for classes, for signed quantities and for values. DOM-free so node tests can check the palette itself.
//
// Class palette (our own design, one set for every theme). The same class must look the same when a
// user switches between a light and a dark theme, so the eight colours all sit in a band of mid
// lightness: WCAG relative luminance 0.14-0.28, which gives each of them at least 3:1 contrast against
// a white or near-white background and against a near-black one (WCAG 2.1 SC 1.4.11, non-text contrast).
// Inside that band they came out of a search over sRGB (simulated annealing, then rounded to hex and
// kept): the score was the smallest CIEDE2000 difference between any two of the first k colours, for
// every k from 2 to 8, taken under normal vision and under simulated protanopia, deuteranopia and
// tritanopia, so the earliest entries are the most separable (most data sets have two to four classes).
// The first four were held to hue families (blue, ochre, rose, green) and every colour to a chroma of at
// least 40, so no class reads as grey, the colour of "no vote"; the later ones were free within the band.
// The search used the band's whole height: rose, olive and azure sit near its light end, the others near
// its dark end, so pairs that a deficiency pulls together in hue still differ in lightness. Measured
// minimum CIEDE2000 over normal, protan, deutan and tritan vision: first two 46, first three 20.5,
// first four 16.3, all eight 11.0; test/webview/palette.test.ts re-measures all of this. Beyond eight
// classes colours repeat and the legend and tooltips carry the meaning.
//
// Signed quantities (a feature raising or lowering a prediction) get their own two colours, chosen after
// the classes to sit far from all eight of them, so a bar that raises a prediction is never read as
// "this class": a muted violet for raising and a burnt orange for lowering, far apart under all four visions.

export type Rgb = readonly [number, number, number];
export type ThemeTone = 'dark' | 'light';

export const CLASS_HEX: readonly string[] = ['#3b57ff', '#896506', '#ef5986', '#018362', '#b4349d', '#8c950e', '#e50057', '#1798d3'];

export const SIGN_HEX = { raises: '#8c87c8', lowers: '#e65505' } as const;

/** Drawn where no class applies (a code below zero); mid grey reads on both backgrounds. */
const NO_CLASS: Rgb = [128, 128, 128];

export function classColour(k: number): Rgb {
  if (!(k >= 0)) return NO_CLASS;
  return parseHex(CLASS_HEX[k % CLASS_HEX.length]);
}

/** a + (b - a) t, per channel, rounded as a canvas would store it. */
export function mix(a: Rgb, b: Rgb, t: number): Rgb {
  return [
    Math.round(a[0] + (b[0] - a[0]) * t),
    Math.round(a[1] + (b[1] - a[1]) * t),
    Math.round(a[2] + (b[2] - a[2]) * t),
  ];
}

// The weakest and strongest tint of a region. Even a full-majority cell stays short of the pure
// class colour so that training points (drawn in the pure colour) stand out on their own class.
export const REGION_TINT_MIN = 0.16;
export const REGION_TINT_MAX = 0.78;

/** How strongly a cell shows its class: 0 at a vote no better than chance (1/K), 1 when unanimous. */
export function certainty(strength: number, classes: number): number {
  const chance = classes > 1 ? 1 / classes : 0;
  if (!Number.isFinite(strength)) return 0;
  return Math.min(1, Math.max(0, (strength - chance) / (1 - chance)));
}

export function regionColour(cls: Rgb, background: Rgb, strength: number, classes: number): Rgb {
  const t = REGION_TINT_MIN + (REGION_TINT_MAX - REGION_TINT_MIN) * certainty(strength, classes);
  return mix(background, cls, t);
}

// ---------------------------------------------------------------------------------------------
// Sequential scale for regression: blue-violet -> dusty rose -> wheat, interpolated in OKLab.
// Lightness rises monotonically (0.32 -> 0.62 -> 0.90), so order reads without hue; the ends sit
// on the blue-yellow axis, which every common colour-vision deficiency keeps.

const RAMP_ANCHORS_OKLCH: ReadonlyArray<readonly [number, number, number]> = [
  [0.32, 0.11, 275],
  [0.62, 0.1, 20],
  [0.9, 0.12, 90],
];
const RAMP_LAB = RAMP_ANCHORS_OKLCH.map(([L, C, h]) => [L, C * Math.cos((h * Math.PI) / 180), C * Math.sin((h * Math.PI) / 180)]);

/** t in 0..1 (clamped) to a colour on the value scale. */
export function rampColour(t: number): Rgb {
  const u = Number.isFinite(t) ? Math.min(1, Math.max(0, t)) : 0;
  const seg = Math.min(RAMP_LAB.length - 2, Math.floor(u * (RAMP_LAB.length - 1)));
  const f = u * (RAMP_LAB.length - 1) - seg;
  const a = RAMP_LAB[seg];
  const b = RAMP_LAB[seg + 1];
  return oklabToRgb(a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f, a[2] + (b[2] - a[2]) * f);
}

// ---------------------------------------------------------------------------------------------
// Colour arithmetic (OKLab: Ottosson 2020; sRGB transfer: IEC 61966-2-1).

export function srgbToLinear(c: number): number {
  const v = c / 255;
  return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
}

function linearToSrgb(c: number): number {
  const v = c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
  return Math.round(Math.min(1, Math.max(0, v)) * 255);
}

export function linearToOklab(r: number, g: number, b: number): [number, number, number] {
  const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [
    0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s,
  ];
}

function oklabToRgb(L: number, a: number, b: number): Rgb {
  const l = (L + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (L - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (L - 0.0894841775 * a - 1.291485548 * b) ** 3;
  return [
    linearToSrgb(4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s),
    linearToSrgb(-1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s),
    linearToSrgb(-0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s),
  ];
}

/** Relative luminance (WCAG 2), used to tell a dark theme from a light one by its background. */
export function luminance(c: Rgb): number {
  return 0.2126 * srgbToLinear(c[0]) + 0.7152 * srgbToLinear(c[1]) + 0.0722 * srgbToLinear(c[2]);
}

/** WCAG 2 contrast ratio, 1 to 21. */
export function contrastRatio(a: Rgb, b: Rgb): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/**
 * A tint of `ink` over `background` for counts: weakest at `share` 0, strongest at 1, never so strong
 * that text in `ink` on it falls below 4.5:1 (WCAG 2.1 SC 1.4.3), whatever the theme's two colours are.
 */
export function countTint(background: Rgb, ink: Rgb, share: number): Rgb {
  const weakest = 0.08;
  let strongest = 0.6;
  while (strongest > weakest && contrastRatio(ink, mix(background, ink, strongest)) < 4.5) strongest -= 0.01;
  const s = Number.isFinite(share) ? Math.min(1, Math.max(0, share)) : 0;
  return mix(background, ink, weakest + (strongest - weakest) * s);
}

export function parseHex(hex: string): Rgb {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})/i.exec(hex);
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`);
  return [parseInt(m[1], 16), parseInt(m[2], 16), parseInt(m[3], 16)];
}

/** Parses the forms a browser hands back for a resolved colour: #rgb, #rrggbb[aa], rgb()/rgba(). */
export function parseColour(text: string): Rgb | null {
  const t = text.trim();
  let m = /^#([0-9a-f])([0-9a-f])([0-9a-f])$/i.exec(t);
  if (m) return [parseInt(m[1] + m[1], 16), parseInt(m[2] + m[2], 16), parseInt(m[3] + m[3], 16)];
  if (/^#[0-9a-f]{6}([0-9a-f]{2})?$/i.test(t)) return parseHex(t);
  m = /^rgba?\(\s*([\d.]+)[\s,]+([\d.]+)[\s,]+([\d.]+)/i.exec(t);
  if (m) return [Math.round(Number(m[1])), Math.round(Number(m[2])), Math.round(Number(m[3]))];
  return null;
}

export function css(c: Rgb, alpha = 1): string {
  return alpha >= 1 ? `rgb(${c[0]}, ${c[1]}, ${c[2]})` : `rgba(${c[0]}, ${c[1]}, ${c[2]}, ${alpha})`;
}
