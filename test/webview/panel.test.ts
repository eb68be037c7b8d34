// The panel webview in headless Chromium: it draws what the host sends, posts the right messages
// back, and never turns data into markup. Browser-side code lives in evaluate strings because this
// file is compiled without the DOM library.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import { PROTOCOL_VERSION, type PanelToHost, type RegionMap } from '../../src/protocol/messages';
import { classColour, mix, parseHex, rampColour, regionColour, type Rgb } from '../../webview/palette';
import {
  CLASSES,
  classificationMap,
  classificationMessages,
  classificationSummary,
  HOSTILE_CLASS,
  HOSTILE_DROPPED,
  HOSTILE_FEATURE,
  HOSTILE_LEVEL,
  priceAt,
  regionTruth,
  regressionMap,
  regressionSummary,
  rowVotes,
  SUSPECTS,
  TREES,
} from './fixtures';
import { PanelPage, THEMES } from './harness';

const CAUTION =
  'A quick forest is an exploratory model: validate it before any decision that affects people, and follow local rules and qualified review where health, money or safety are at stake.';

interface GridInfo {
  nx: number;
  ny: number;
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
}

/** Reads region-map pixels at feature-space points, mapping them through the canvas's data-grid as the UI contract describes. */
async function pixelsAt(p: PanelPage, points: Array<[number, number]>): Promise<{ grid: GridInfo; rgb: Rgb[] }> {
  return await p.page.evaluate<{ grid: GridInfo; rgb: Rgb[] }>(`(() => {
    const c = document.querySelector('[data-testid=region-map]');
    const grid = JSON.parse(c.dataset.grid);
    const ctx = c.getContext('2d');
    const rgb = ${JSON.stringify(points)}.map(([x, y]) => {
      const px = Math.floor(((x - grid.xMin) / (grid.xMax - grid.xMin)) * c.width);
      const py = Math.floor(((grid.yMax - y) / (grid.yMax - grid.yMin)) * c.height);
      const d = ctx.getImageData(px, py, 1, 1).data;
      return [d[0], d[1], d[2]];
    });
    return { grid, rgb };
  })()`);
}

function distance(a: Rgb, b: Rgb): number {
  return Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
}

/** Which class colour, blended with the background by any amount, best explains a pixel. */
function decodeClass(pixel: Rgb, background: Rgb, classes: number): { k: number; t: number } {
  let best = { k: -1, t: 0, err: Infinity };
  for (let k = 0; k < classes; k++) {
    for (let s = 0; s <= 100; s++) {
      const err = distance(pixel, mix(background, classColour(k), s / 100));
      if (err < best.err) best = { k, t: s / 100, err };
    }
  }
  return { k: best.k, t: best.t };
}

function cellCentres(map: RegionMap, step: number): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  if (map.x.kind !== 'numeric' || map.y.kind !== 'numeric') throw new Error('numeric axes expected');
  for (let j = 0; j < map.ny; j += step) {
    for (let i = 0; i < map.nx; i += step) {
      out.push([map.x.min + ((i + 0.5) * (map.x.max - map.x.min)) / map.nx, map.y.min + ((j + 0.5) * (map.y.max - map.y.min)) / map.ny]);
    }
  }
  return out;
}

async function count(p: PanelPage, selector: string): Promise<number> {
  return p.page.locator(selector).count();
}

describe('panel webview (headless Chromium)', function () {
  this.timeout(180_000);
  let p: PanelPage;
  const dark = parseHex(THEMES.dark.vars['--vscode-editor-background']);

  before(async () => {
    p = await PanelPage.open('dark');
    await p.send(...classificationMessages());
  });

  after(async () => {
    await p?.close();
  });

  it('announces itself with a ready message carrying the protocol version', async () => {
    const ready = (await p.posted()).find((m) => m.type === 'ready');
    assert.deepEqual(ready, { type: 'ready', version: PROTOCOL_VERSION, choice: null }, 'a fresh page has no map of its own to ask for');
  });

  it('draws the region map so each grid point carries its class colour', async () => {
    const map = classificationMap();
    const grid = (await p.page.getAttribute('[data-testid=region-map]', 'data-grid')) ?? '';
    assert.deepEqual(JSON.parse(grid), { nx: 48, ny: 40, xMin: 1, xMax: 7, yMin: 0, yMax: 2.5 });
    const points = cellCentres(map, 3);
    const { rgb } = await pixelsAt(p, points);
    let exact = 0;
    points.forEach(([x, y], n) => {
      const truth = regionTruth(x, y);
      const got = decodeClass(rgb[n], dark, 3);
      assert.equal(got.k, truth.k, `class at (${x.toFixed(2)}, ${y.toFixed(2)}) read back as ${got.k}, pixel ${rgb[n].join(',')}`);
      if (truth.s === 1) {
        // Unanimous cells must be exactly the palette's full-strength region colour.
        const want = regionColour(classColour(truth.k), dark, 1, 3);
        assert.ok(distance(rgb[n], want) <= 2, `pixel ${rgb[n].join(',')} vs ${want.join(',')}`);
        exact++;
      }
    });
    assert.ok(exact > 20, 'the fixture should have many unanimous cells to compare exactly');
  });

  it('shades split-vote cells toward the background, so uncertain zones read at a glance', async () => {
    // Same class (versicolor), one cell deep inside its region, one next to the boundary at x = 2.5.
    const { rgb } = await pixelsAt(p, [
      [5.5, 0.3],
      [2.6, 0.3],
    ]);
    assert.equal(regionTruth(5.5, 0.3).s, 1);
    assert.ok(regionTruth(2.6, 0.3).s < 0.6);
    const strong = decodeClass(rgb[0], dark, 3);
    const weak = decodeClass(rgb[1], dark, 3);
    assert.equal(strong.k, 1);
    assert.equal(weak.k, 1);
    assert.ok(strong.t > weak.t + 0.3, `tint deep inside ${strong.t} should exceed tint near the edge ${weak.t}`);
  });

  it('fills the contract hooks: OOB accuracy with one decimal, caution line, summary', async () => {
    assert.equal((await p.page.textContent('[data-testid=oob-score]'))?.trim(), '93.3%');
    assert.equal((await p.page.textContent('[data-testid=caution]'))?.trim(), CAUTION);
    const summary = (await p.page.textContent('[data-testid=summary]')) ?? '';
    assert.match(summary, /150 used of 152 read/);
    assert.match(summary, /every value distinct: looks like an identifier/);
    // The confusion matrix shows the counts it was given, by true class.
    const cells = await p.page.locator('[data-testid=confusion] tbody tr').first().locator('td').allTextContents();
    assert.deepEqual(cells.slice(0, 3), ['50', '0', '0']);
  });

  it('shows markup in names, labels and warnings as text and injects no element', async () => {
    const found = await p.page.evaluate(`(() => {
      const bad = [];
      const walk = (root) => {
        for (const el of root.querySelectorAll('*')) {
          const tag = el.tagName.toLowerCase();
          if (['img', 'b', 'i', 'u', 'iframe'].includes(tag) || (tag === 'script' && !el.nonce)) bad.push(tag);
          if (el.shadowRoot) walk(el.shadowRoot);
        }
      };
      walk(document);
      return { bad, injected: window.__injected === undefined ? null : window.__injected };
    })()`);
    assert.deepEqual(found, { bad: [], injected: null });
    const summary = (await p.page.textContent('[data-testid=summary]')) ?? '';
    assert.ok(summary.includes(HOSTILE_FEATURE), 'hostile feature name shown literally');
    assert.ok(summary.includes(HOSTILE_DROPPED), 'hostile dropped column shown literally');
    assert.ok(((await p.page.textContent('[data-testid=region-legend]')) ?? '').includes(HOSTILE_CLASS));
    assert.ok(((await p.page.textContent('.map-note')) ?? '').includes(HOSTILE_LEVEL));
    assert.ok(((await p.page.textContent('[data-testid=warnings]')) ?? '').includes('<iframe src="x">'));
    assert.ok(((await p.page.textContent('h1')) ?? '').includes('<u>2024</u>'));
  });

  it('draws one strip cell per tree, each in the colour of that tree’s vote', async () => {
    const votes = rowVotes(71, 1, 0.45);
    const strip = '[data-testid=disagreement] [data-row="71"] [data-testid=vote-strip]';
    assert.equal(await count(p, `${strip} .tree`), TREES);
    assert.equal(await count(p, `${strip} .tree.oob`), votes.outOfBag.length);
    const read = await p.page.evaluate<Array<[number, string]>>(
      `[...document.querySelectorAll('${strip} .tree')].map((e) => [Number(e.dataset.tree), getComputedStyle(e).backgroundColor])`,
    );
    for (const [t, bg] of read) {
      const [r, g, b] = classColour(votes.votes[t]);
      assert.equal(bg, `rgb(${r}, ${g}, ${b})`, `tree ${t}`);
    }
    // The split is visible: this row's trees vote for more than one class.
    assert.ok(new Set(read.map(([, bg]) => bg)).size >= 2);
    const head = (await p.page.textContent('[data-testid=disagreement] [data-row="71"] .vote-head')) ?? '';
    assert.match(head, new RegExp(`agreement of out-of-bag trees ${(votes.agreement * 100).toFixed(1)}%`));
    // The all-trees answer comes second, named for what it includes.
    assert.ok(head.indexOf("out-of-bag vote") < head.indexOf("all trees, including those fitted on it"), head);
  });

  it('posts “reveal row” when a row in the vote list or the suspects list is clicked', async () => {
    await p.clearPosted();
    await p.page.click('[data-testid=disagreement] [data-row="12"] .row-link');
    await p.page.click(`[data-testid=suspects] tr[data-row="${SUSPECTS[1].row}"]`);
    const reveals = (await p.posted()).filter((m) => m.type === 'revealRow');
    assert.deepEqual(reveals, [
      { type: 'revealRow', row: 12 },
      { type: 'revealRow', row: SUSPECTS[1].row },
    ]);
  });

  it('posts “reveal row” for the training point clicked on the map', async () => {
    const map = classificationMap();
    const pts = map.points!;
    const overlay = p.page.locator('[data-testid=region-points]');
    const box = await overlay.boundingBox();
    assert.ok(box);
    // Pick the point farthest from all others so the click is unambiguous.
    let pick = 0;
    let bestGap = -1;
    for (let a = 0; a < pts.x.length; a++) {
      let gap = Infinity;
      for (let b = 0; b < pts.x.length; b++) {
        if (a === b) continue;
        gap = Math.min(gap, Math.hypot((pts.x[a] - pts.x[b]) / 6, (pts.y[a] - pts.y[b]) / 2.5));
      }
      if (gap > bestGap) {
        bestGap = gap;
        pick = a;
      }
    }
    const cx = ((pts.x[pick] - 1) / 6) * box.width;
    const cy = (1 - pts.y[pick] / 2.5) * box.height;
    await p.clearPosted();
    // Positions are relative to the overlay; Playwright scrolls it into view first.
    await overlay.click({ position: { x: cx + 1, y: cy - 1 } });
    assert.deepEqual((await p.posted()).filter((m) => m.type === 'revealRow'), [{ type: 'revealRow', row: pts.row[pick] }]);
    // An empty spot of the map is not a row.
    await p.clearPosted();
    await overlay.click({ position: { x: box.width - 3, y: 3 } });
    assert.deepEqual((await p.posted()).filter((m) => m.type === 'revealRow'), []);
  });

  it('names both axes of every small map', async () => {
    const tiles = '[data-testid=map-matrix] .map-tile';
    assert.equal(await count(p, tiles), 3);
    assert.deepEqual(await p.page.locator(`${tiles} .tile-axis.x`).allTextContents(), ['petal_len →', 'petal_len →', `${HOSTILE_FEATURE} →`]);
    assert.deepEqual(await p.page.locator(`${tiles} .tile-axis.y`).allTextContents(), ['petal_wid →', 'colour →', 'petal_wid →']);
    // The feature up runs along the left edge, reading upwards; the feature across sits under the map.
    const tile = p.page.locator(tiles).nth(1);
    const [y, canvas, x] = await Promise.all(['.tile-axis.y', 'canvas', '.tile-axis.x'].map((s) => tile.locator(s).boundingBox()));
    assert.ok(y && canvas && x);
    assert.ok(y.x + y.width <= canvas.x + 1 && y.height > y.width, 'y title is upright, left of the map');
    assert.ok(x.y >= canvas.y + canvas.height - 1, 'x title is under the map');
  });

  it('asks the host to open a small map large when it is clicked, and scrolls to the large map', async () => {
    // Start with the large map scrolled out of view above.
    await p.page.evaluate(`window.scrollTo(0, document.querySelector('[data-testid=matrix-section]').getBoundingClientRect().top + window.scrollY - 40)`);
    const top = () => p.page.evaluate<number>(`document.querySelector('[data-testid=map-section]').getBoundingClientRect().top`);
    assert.ok((await top()) < -100, `map section at ${await top()}`);
    await p.clearPosted();
    await p.page.locator('[data-testid=map-matrix] .map-tile').nth(1).click();
    assert.deepEqual(await p.waitForPosted((m) => m.type === 'openMap'), { type: 'openMap', x: 'petal_len', y: 'colour' });
    assert.ok(Math.abs(await top()) < 2, `map section at ${await top()} after the click`);
  });

  it('posts the chosen features and reference when the pickers change', async () => {
    const pick = async (testid: string, label: string) => {
      await p.page.click(`[data-testid=${testid}]`);
      await p.page.locator(`[data-testid=${testid}] li.option`, { hasText: label }).first().click();
    };
    await p.clearPosted();
    await pick('region-x', 'colour');
    let msg = await p.waitForPosted((m) => m.type === 'chooseMap');
    assert.deepEqual(msg, { type: 'chooseMap', x: 'colour', y: 'petal_wid', reference: { mode: 'typical' } });

    // Choosing the other axis's feature swaps rather than asking for a one-feature "map".
    await p.clearPosted();
    await pick('region-y', 'colour');
    msg = await p.waitForPosted((m) => m.type === 'chooseMap');
    assert.deepEqual(msg, { type: 'chooseMap', x: 'petal_wid', y: 'colour', reference: { mode: 'typical' } });

    await p.clearPosted();
    await pick('region-reference', 'Averaged');
    msg = await p.waitForPosted((m) => m.type === 'chooseMap');
    assert.deepEqual(msg, { type: 'chooseMap', x: 'petal_wid', y: 'colour', reference: { mode: 'averaged' } });

    await p.clearPosted();
    await pick('region-reference', 'one row');
    msg = await p.waitForPosted((m) => m.type === 'chooseMap');
    assert.equal((msg as Extract<PanelToHost, { type: 'chooseMap' }>).reference.mode, 'row');

    // Back to the first map for the tests that follow.
    await p.send({ type: 'regionMap', map: classificationMap() });
    assert.equal(await p.page.evaluate(`document.querySelector('[data-testid=region-x]').value`), 'petal_len');
  });

  it('posts a refit with the features the user left out', async () => {
    await p.clearPosted();
    await p.page.locator('[data-testid=features-used] li', { hasText: 'colour' }).locator('vscode-checkbox').click();
    await p.page.click('[data-testid=refit]');
    assert.deepEqual(await p.waitForPosted((m) => m.type === 'refit'), { type: 'refit', leaveOut: ['colour'], trees: TREES });
  });

  it('ignores messages that do not match the protocol', async () => {
    const before = await p.page.textContent('[data-testid=oob-score]');
    await p.send({ type: 'summary', summary: { nope: true } } as never, { type: 'regionMap', map: { ...classificationMap(), nx: 3 } } as never);
    assert.equal(await p.page.textContent('[data-testid=oob-score]'), before);
    assert.equal((JSON.parse((await p.page.getAttribute('[data-testid=region-map]', 'data-grid')) ?? '{}') as GridInfo).nx, 48);
    // A well-formed answer about another fit (a slow one from an earlier forest) is not drawn either.
    await p.send({ type: 'regionMap', map: classificationMap(12, 10), fit: 'an-earlier-fit' });
    assert.equal((JSON.parse((await p.page.getAttribute('[data-testid=region-map]', 'data-grid')) ?? '{}') as GridInfo).nx, 48);
  });

  it('names the class and its share of the vote for the cell under the pointer', async () => {
    const overlay = p.page.locator('[data-testid=region-points]');
    const box = await overlay.boundingBox();
    assert.ok(box);
    // (5.5, 0.3) lies deep in versicolor's region, far from every invented point of the fixture.
    await overlay.hover({ position: { x: ((5.5 - 1) / 6) * box.width, y: (1 - 0.3 / 2.5) * box.height } });
    const tip = (await p.page.textContent('.map-tip')) ?? '';
    assert.match(tip, /versicolor: 100% of trees/);
    assert.match(tip, /petal_len = 5\.\d+/);
  });

  it('takes its colours from the theme and redraws when the theme changes', async () => {
    await p.screenshot('panel-dark.png');
    await p.page.mouse.move(0, 0);
    const swatches = () => p.page.evaluate(`[...document.querySelectorAll('[data-testid=region-legend] .legend-item .swatch')].map((e) => getComputedStyle(e).backgroundColor)`);
    const darkSwatches = await swatches();
    await p.setTheme('light');
    assert.deepEqual(await swatches(), darkSwatches, 'a class keeps its colour when the theme changes');
    const light = parseHex(THEMES.light.vars['--vscode-editor-background']);
    const { rgb } = await pixelsAt(p, [
      [1.5, 0.5],
      [5.5, 0.3],
      [6.5, 2.3],
    ]);
    [0, 1, 2].forEach((k, n) => {
      const want = regionColour(classColour(k), light, 1, CLASSES.length);
      assert.ok(distance(rgb[n], want) <= 2, `light theme class ${k}: ${rgb[n].join(',')} vs ${want.join(',')}`);
    });
    const bodyBg = await p.page.evaluate(`getComputedStyle(document.body).backgroundColor`);
    assert.equal(bodyBg, 'rgb(255, 255, 255)');
    await p.screenshot('panel-light.png');
    await p.setTheme('high-contrast');
    await p.screenshot('panel-high-contrast.png');
    await p.setTheme('dark');
  });

  it('comes back from saved state after a reload, without the host resending', async () => {
    await p.clearPosted();
    await p.page.reload();
    const ready = await p.waitForPosted((m) => m.type === 'ready');
    // It asks the host for the map it showed when its state was last saved, so the host draws that pair again
    // rather than its default (the picker test above posted choices the stand-in host never answered).
    assert.ok(ready.type === 'ready' && ready.choice, JSON.stringify(ready));
    const shown = classificationMap();
    assert.deepEqual([ready.choice.x, ready.choice.y, ready.choice.reference.mode], [shown.x.feature, shown.y.feature, 'typical']);
    assert.equal((await p.page.textContent('[data-testid=oob-score]'))?.trim(), '93.3%');
    const { rgb } = await pixelsAt(p, [[1.5, 0.5]]);
    assert.equal(decodeClass(rgb[0], dark, 3).k, 0);
    assert.equal(await count(p, '[data-testid=suspects] tr[data-row]'), SUSPECTS.length);
    assert.equal(await count(p, '[data-testid=map-matrix] .map-tile'), 3);
    // Saved state is the compact summary: no tree votes, and points capped as sent.
    const size = Number(await p.page.evaluate(`sessionStorage.getItem('copse-state').length`));
    assert.ok(size < 200_000, `state is ${size} characters`);
  });

  it('raised no page errors, console errors or CSP violations', () => {
    assert.deepEqual(p.errors, []);
  });
});

describe('panel webview, regression', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('dark', { width: 1280, height: 900 });
    await p.send({ type: 'summary', summary: regressionSummary() }, { type: 'regionMap', map: regressionMap() });
  });

  after(async () => {
    await p?.close();
  });

  it('shows R² with three decimals and the residual summary', async () => {
    assert.equal((await p.page.textContent('[data-testid=oob-score]'))?.trim(), '0.812');
    const residuals = (await p.page.textContent('[data-testid=residuals]')) ?? '';
    assert.match(residuals, /\u221261\.2/);
    assert.match((await p.page.textContent('[data-testid=summary]')) ?? '', /sampled/);
  });

  it('colours the map on a continuous scale that rises with the predicted value', async () => {
    // Price rises with area and falls with distance; sample along that direction.
    const along: Array<[number, number]> = [0.05, 0.25, 0.5, 0.75, 0.95].map((f) => [30 + f * 170, 30 - f * 30]);
    const { rgb } = await pixelsAt(p, along);
    const values = along.map(([a, d]) => priceAt(a, d));
    for (let n = 1; n < values.length; n++) assert.ok(values[n] > values[n - 1]);
    // Lightness of the scale is monotone, so brighter pixels mean higher predictions.
    const light = rgb.map((c) => 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2]);
    for (let n = 1; n < light.length; n++) assert.ok(light[n] > light[n - 1], `lightness ${light.join(', ')}`);
    // And the extremes are the scale's ends (the range spans cells and points together).
    const lowest = rampColour(0);
    assert.ok(distance(rgb[0], lowest) < distance(rgb[0], rampColour(1)));
  });

  it('saves a screenshot for review', async () => {
    const file = await p.screenshot('panel-regression.png');
    assert.ok(fs.statSync(file).size > 10_000);
    assert.deepEqual(p.errors, []);
  });
});

describe('panel webview, a forest opened from a file without its training sample', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('light');
    const summary = { ...classificationSummary(), oob: null, curve: [], permutationOn: 'file' as const, oobUnavailable: 'Out-of-bag scores and votes are unavailable here.' };
    await p.send({ type: 'summary', summary }, { type: 'disagreement', rows: [rowVotes(71, 1, 0.45)], selected: 1 });
  });

  after(async () => {
    await p?.close();
  });

  it('says why there is no out-of-bag score, and that permutation importance was measured on the file', async () => {
    assert.equal((await p.page.textContent('[data-testid=oob-note]'))?.trim(), 'Out-of-bag scores and votes are unavailable here.');
    assert.match((await p.page.textContent('[data-testid=permutation-caption]')) ?? '', /on this file/);
  });

  it('shows the out-of-bag vote of a selected row as unavailable rather than a value', async () => {
    const head = (await p.page.textContent('[data-testid=disagreement] [data-row="71"] .vote-head')) ?? '';
    assert.match(head, /out-of-bag vote\s*unavailable/);
    assert.doesNotMatch(head, /out-of-bag trees/);
    assert.deepEqual(p.errors, []);
  });
});
