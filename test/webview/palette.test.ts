// The class palette must stay distinguishable for colour-blind viewers and visible on both theme
// backgrounds, the two sign colours must not be mistaken for classes, and the value scale must read in
// order without relying on hue.
import * as assert from 'node:assert/strict';
import { CLASS_HEX, certainty, classColour, linearToOklab, parseHex, rampColour, regionColour, SIGN_HEX, srgbToLinear, type Rgb } from '../../webview/palette';

type Lab = readonly [number, number, number];

// Machado, Oliveira & Fernandes (2009), "A physiologically-based model for simulation of color
// vision deficiency", IEEE TVCG 15(6): the severity-1.0 matrices, written here from memory and
// applied to linear RGB as is commonly done. Each row sums to 1 (white stays white), checked below.
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

function simulate(c: Rgb, m: number[][]): [number, number, number] {
  const lin = c.map(srgbToLinear);
  return m.map((row) => Math.min(1, Math.max(0, row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2]))) as [number, number, number];
}

/** CIELAB (D65) from linear sRGB: the sRGB-to-XYZ matrix of IEC 61966-2-1 and the CIE 1976 formulas (common practice). */
function labOf(lin: readonly [number, number, number]): Lab {
  const [r, g, b] = lin;
  const X = (0.4124564 * r + 0.3575761 * g + 0.1804375 * b) / 0.95047;
  const Y = 0.2126729 * r + 0.7151522 * g + 0.072175 * b;
  const Z = (0.0193339 * r + 0.119192 * g + 0.9503041 * b) / 1.08883;
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  return [116 * f(Y) - 16, 500 * (f(X) - f(Y)), 200 * (f(Y) - f(Z))];
}

const seenAs = (c: Rgb, vision: string): Lab => labOf(simulate(c, SIMULATIONS[vision]));

/** CIEDE2000 colour difference (kL = kC = kH = 1), following Sharma, Wu & Dalal (2005), Color Res. Appl. 30(1). */
export function ciede2000(p: Lab, q: Lab): number {
  const rad = Math.PI / 180;
  const [L1, a1, b1] = p;
  const [L2, a2, b2] = q;
  const Cbar = (Math.hypot(a1, b1) + Math.hypot(a2, b2)) / 2;
  const G = 0.5 * (1 - Math.sqrt(Cbar ** 7 / (Cbar ** 7 + 25 ** 7)));
  const a1p = (1 + G) * a1;
  const a2p = (1 + G) * a2;
  const C1 = Math.hypot(a1p, b1);
  const C2 = Math.hypot(a2p, b2);
  const hue = (a: number, b: number) => (a === 0 && b === 0 ? 0 : ((Math.atan2(b, a) / rad) + 360) % 360);
  const h1 = hue(a1p, b1);
  const h2 = hue(a2p, b2);
  let dh = 0;
  if (C1 * C2 !== 0) {
    dh = h2 - h1;
    if (dh > 180) dh -= 360;
    else if (dh < -180) dh += 360;
  }
  const dL = L2 - L1;
  const dC = C2 - C1;
  const dH = 2 * Math.sqrt(C1 * C2) * Math.sin((dh * rad) / 2);
  const Lbar = (L1 + L2) / 2;
  const Cp = (C1 + C2) / 2;
  let hbar = h1 + h2;
  if (C1 * C2 !== 0) hbar = (Math.abs(h1 - h2) > 180 ? (h1 + h2 < 360 ? h1 + h2 + 360 : h1 + h2 - 360) : h1 + h2) / 2;
  const T = 1 - 0.17 * Math.cos((hbar - 30) * rad) + 0.24 * Math.cos(2 * hbar * rad) + 0.32 * Math.cos((3 * hbar + 6) * rad) - 0.2 * Math.cos((4 * hbar - 63) * rad);
  const dTheta = 30 * Math.exp(-(((hbar - 275) / 25) ** 2));
  const RC = 2 * Math.sqrt(Cp ** 7 / (Cp ** 7 + 25 ** 7));
  const SL = 1 + (0.015 * (Lbar - 50) ** 2) / Math.sqrt(20 + (Lbar - 50) ** 2);
  const SC = 1 + 0.045 * Cp;
  const SH = 1 + 0.015 * Cp * T;
  const RT = -Math.sin(2 * dTheta * rad) * RC;
  return Math.sqrt((dL / SL) ** 2 + (dC / SC) ** 2 + (dH / SH) ** 2 + RT * (dC / SC) * (dH / SH));
}

/** The closest pair among the colours, under one simulated vision. */
function closest(colours: Rgb[], vision: string): { d: number; pair: string } {
  const lab = colours.map((c) => seenAs(c, vision));
  let best = { d: Infinity, pair: '' };
  for (let i = 0; i < lab.length; i++) {
    for (let j = i + 1; j < lab.length; j++) {
      const d = ciede2000(lab[i], lab[j]);
      if (d < best.d) best = { d, pair: `${i} vs ${j}` };
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

// Panel backgrounds, written from memory: VS Code's light editor (white) and side bar (about #f8f8f8), its
// dark editor (about #1e1e1e) and the darker #181818 of newer dark themes, and high-contrast black.
const LIGHT_BACKGROUNDS = ['#ffffff', '#f8f8f8'];
const DARK_BACKGROUNDS = ['#1e1e1e', '#181818', '#000000'];

const classes = CLASS_HEX.map(parseHex);
const signs = [parseHex(SIGN_HEX.raises), parseHex(SIGN_HEX.lowers)];

describe('colour arithmetic the palette checks rely on', () => {
  it('reproduces published CIEDE2000 test pairs', () => {
    // Sharma, Wu & Dalal (2005), table 1, pairs 1, 2, 3, 4, 7, 17, 18, 19 and 20; values written from memory.
    const pairs: Array<[Lab, Lab, number]> = [
      [[50, 2.6772, -79.7751], [50, 0, -82.7485], 2.0425],
      [[50, 3.1571, -77.2803], [50, 0, -82.7485], 2.8615],
      [[50, 2.8361, -74.02], [50, 0, -82.7485], 3.4412],
      [[50, -1.3802, -84.2814], [50, 0, -82.7485], 1.0],
      [[50, 0, 0], [50, -1, 2], 2.3669],
      [[50, 2.5, 0], [73, 25, -18], 27.1492],
      [[50, 2.5, 0], [61, -5, 29], 22.8977],
      [[50, 2.5, 0], [56, -27, -3], 31.903],
      [[50, 2.5, 0], [58, 24, 15], 19.4535],
    ];
    for (const [p, q, want] of pairs) {
      assert.ok(Math.abs(ciede2000(p, q) - want) < 5e-4, `${p.join(',')} / ${q.join(',')}: ${ciede2000(p, q)} vs ${want}`);
      assert.ok(Math.abs(ciede2000(q, p) - want) < 5e-4, 'symmetric');
    }
  });

  it('simulates deficiencies with matrices that keep greys grey', () => {
    for (const [name, m] of Object.entries(SIMULATIONS)) {
      for (const row of m) assert.ok(Math.abs(row[0] + row[1] + row[2] - 1) < 1e-5, name);
    }
    // And they do change colour: a saturated red and green collapse for protan and deutan eyes, not for normal ones.
    const red: Rgb = [200, 60, 40];
    const green: Rgb = [90, 140, 40];
    assert.ok(ciede2000(seenAs(red, 'normal'), seenAs(green, 'normal')) > 40);
    assert.ok(ciede2000(seenAs(red, 'deuteranopia'), seenAs(green, 'deuteranopia')) < 15);
    assert.ok(ciede2000(seenAs(red, 'protanopia'), seenAs(green, 'protanopia')) < 20);
  });
});

describe('class palette, sign colours and value scale', () => {
  // Common practice: a CIEDE2000 difference of about 1 is just noticeable side by side; the floors below
  // ask for many times that, between every pair, under each vision.
  const floors: Array<[number, number]> = [
    [2, 40],
    [3, 20],
    [4, 15],
    [8, 10],
  ];
  for (const vision of Object.keys(SIMULATIONS)) {
    it(`the first 2, 3, 4 and all 8 class colours stay apart under ${vision} (CIEDE2000 ≥ 40, 20, 15, 10)`, () => {
      for (const [n, floor] of floors) {
        const c = closest(classes.slice(0, n), vision);
        assert.ok(c.d >= floor, `first ${n}: closest pair ${c.pair} at ${c.d.toFixed(1)}`);
      }
    });
  }

  it('uses one class palette for every theme', () => {
    assert.equal(CLASS_HEX.length, 8);
    for (let k = 0; k < 8; k++) assert.deepEqual(classColour(k), parseHex(CLASS_HEX[k]));
    assert.deepEqual(classColour(9), classColour(1), 'colours repeat beyond eight classes');
  });

  it('every class and sign colour has 3:1 contrast on light and on dark backgrounds (WCAG 2.1 SC 1.4.11, non-text contrast)', () => {
    for (const c of [...classes, ...signs]) {
      for (const bg of [...LIGHT_BACKGROUNDS, ...DARK_BACKGROUNDS]) {
        const r = contrast(c, parseHex(bg));
        assert.ok(r >= 3, `${c.join(',')} on ${bg}: ${r.toFixed(2)}`);
      }
    }
  });

  it('sign colours are apart from each other under every vision, and are not class colours', () => {
    for (const vision of Object.keys(SIMULATIONS)) {
      const d = ciede2000(seenAs(signs[0], vision), seenAs(signs[1], vision));
      assert.ok(d >= 30, `${vision}: raises vs lowers at ${d.toFixed(1)}`);
    }
    for (const [s, sign] of signs.entries()) {
      for (const [k, cls] of classes.entries()) {
        const d = ciede2000(seenAs(sign, 'normal'), seenAs(cls, 'normal'));
        assert.ok(d >= 15, `sign ${s} vs class ${k} at ${d.toFixed(1)}`);
      }
    }
  });

  it('the value scale rises in lightness from end to end, and its ends differ under every simulated vision', () => {
    let last = -Infinity;
    for (let i = 0; i <= 50; i++) {
      const [L] = linearToOklab(...simulate(rampColour(i / 50), SIMULATIONS.normal));
      assert.ok(L > last, `lightness at ${i / 50}`);
      last = L;
    }
    for (const vision of Object.keys(SIMULATIONS)) {
      assert.ok(ciede2000(seenAs(rampColour(0), vision), seenAs(rampColour(1), vision)) > 40, vision);
    }
  });

  it('shades a region by how far its majority is above chance', () => {
    assert.equal(certainty(1 / 3, 3), 0);
    assert.equal(certainty(1, 3), 1);
    assert.equal(certainty(0.75, 2), 0.5);
    assert.equal(certainty(Number.NaN, 2), 0);
    const bg: Rgb = [30, 30, 30];
    const cls = classColour(0);
    const dist = (s: number) => {
      const c = regionColour(cls, bg, s, 3);
      return Math.hypot(c[0] - bg[0], c[1] - bg[1], c[2] - bg[2]);
    };
    assert.ok(dist(0.34) < dist(0.6) && dist(0.6) < dist(0.9) && dist(0.9) < dist(1));
    // Even a chance-level cell keeps a tint, so its class can still be told from "no vote".
    assert.ok(dist(1 / 3) > 10);
  });
});
