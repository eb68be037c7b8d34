// The class palette must stay distinguishable for colour-blind viewers and visible on the theme
// backgrounds; the value scale must read in order without relying on hue.
import * as assert from 'node:assert/strict';
import { CLASS_HEX, certainty, linearToOklab, parseHex, rampColour, regionColour, srgbToLinear, type Rgb } from '../../webview/palette';

// Machado, Oliveira & Fernandes (2009), "A physiologically-based model for simulation of color
// vision deficiency", IEEE TVCG 15(6): the severity-1.0 matrices, written here from memory and
// applied to linear RGB as is commonly done.
const SIMULATIONS: Record<string, number[][]> = {
  normal: [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
};

function seenAs(c: Rgb, m: number[][]): [number, number, number] {
  const lin = c.map(srgbToLinear);
  const out = m.map((row) => Math.min(1, Math.max(0, row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2])));
  return linearToOklab(out[0], out[1], out[2]);
}

function minSeparation(colours: Rgb[]): { d: number; where: string } {
  let best = { d: Infinity, where: '' };
  for (const [name, m] of Object.entries(SIMULATIONS)) {
    const lab = colours.map((c) => seenAs(c, m));
    for (let i = 0; i < lab.length; i++) {
      for (let j = i + 1; j < lab.length; j++) {
        const d = Math.hypot(lab[i][0] - lab[j][0], lab[i][1] - lab[j][1], lab[i][2] - lab[j][2]);
        if (d < best.d) best = { d, where: `${name}: ${i} vs ${j}` };
      }
    }
  }
  return best;
}

// WCAG 2.x relative luminance and contrast ratio.
function contrast(a: Rgb, b: Rgb): number {
  const lum = (c: Rgb) => 0.2126 * srgbToLinear(c[0]) + 0.7152 * srgbToLinear(c[1]) + 0.0722 * srgbToLinear(c[2]);
  const [hi, lo] = [lum(a), lum(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

describe('class palette and value scale', () => {
  // Common practice: a distance of about 0.02 in OKLab is a just-noticeable difference; the
  // thresholds below ask for several times that under every simulated vision.
  for (const tone of ['dark', 'light'] as const) {
    const colours = CLASS_HEX[tone].map(parseHex);

    it(`${tone} set: the first four classes stay well apart under normal, protan, deutan and tritan vision`, () => {
      const s = minSeparation(colours.slice(0, 4));
      assert.ok(s.d >= 0.15, `closest pair ${s.where} at ${s.d.toFixed(3)}`);
    });

    it(`${tone} set: all eight classes stay apart under every simulated vision`, () => {
      const s = minSeparation(colours);
      assert.ok(s.d >= 0.09, `closest pair ${s.where} at ${s.d.toFixed(3)}`);
    });
  }

  it('every class colour has 3:1 contrast with its theme background (WCAG 2.1 SC 1.4.11, non-text contrast)', () => {
    // Backgrounds: VS Code's default dark editor (about #1e1e1e, from memory), high-contrast black, and white.
    for (const bg of ['#1e1e1e', '#000000']) {
      for (const hex of CLASS_HEX.dark) assert.ok(contrast(parseHex(hex), parseHex(bg)) >= 3, `${hex} on ${bg}`);
    }
    for (const hex of CLASS_HEX.light) assert.ok(contrast(parseHex(hex), parseHex('#ffffff')) >= 3, `${hex} on #ffffff`);
  });

  it('the value scale rises in lightness from end to end, and its ends differ under every simulated vision', () => {
    let last = -Infinity;
    for (let i = 0; i <= 50; i++) {
      const [L] = seenAs(rampColour(i / 50), SIMULATIONS.normal);
      assert.ok(L > last, `lightness at ${i / 50}`);
      last = L;
    }
    for (const m of Object.values(SIMULATIONS)) {
      const a = seenAs(rampColour(0), m);
      const b = seenAs(rampColour(1), m);
      assert.ok(Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]) > 0.4);
    }
  });

  it('shades a region by how far its majority is above chance', () => {
    assert.equal(certainty(1 / 3, 3), 0);
    assert.equal(certainty(1, 3), 1);
    assert.equal(certainty(0.75, 2), 0.5);
    assert.equal(certainty(Number.NaN, 2), 0);
    const bg: Rgb = [30, 30, 30];
    const cls = parseHex(CLASS_HEX.dark[0]);
    const dist = (s: number) => {
      const c = regionColour(cls, bg, s, 3);
      return Math.hypot(c[0] - bg[0], c[1] - bg[1], c[2] - bg[2]);
    };
    assert.ok(dist(0.34) < dist(0.6) && dist(0.6) < dist(0.9) && dist(0.9) < dist(1));
    // Even a chance-level cell keeps a tint, so its class can still be told from "no vote".
    assert.ok(dist(1 / 3) > 10);
  });
});
