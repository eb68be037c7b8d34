// The contributions section in headless Chromium: one row's prediction taken apart as a table (feature,
// value, signed contribution, and a bar from a zero line), with base and prediction in one sentence and
// the smallest contributions folded into one row that opens in place.
import * as assert from 'node:assert/strict';
import { parseHex, SIGN_HEX, type Rgb } from '../../webview/palette';
import { classificationMessages, contributionsMessage, contributionsWide, HOSTILE_FEATURE, HOSTILE_LEVEL, regressionSummary } from './fixtures';
import { PanelPage } from './harness';

const cssRgb = (c: Rgb) => `rgb(${c[0]}, ${c[1]}, ${c[2]})`;

// The test build has no DOM types, so the elements the page functions below run on are described by what they read.
type PageElement = { getAttribute(name: string): string | null; textContent: string | null; children: Iterable<PageElement> };

/** Each feature row of the contributions table: data-feature, then the text of every cell. */
async function contributionRows(p: PanelPage): Promise<string[][]> {
  return p.page.locator('[data-testid=contributions-table] tbody:not(.hidden) tr[data-feature]').evaluateAll((trs: PageElement[]) =>
    trs.map((tr) => [tr.getAttribute('data-feature') ?? '', ...[...tr.children].map((c) => (c.textContent ?? '').trim())]),
  );
}

/** Where a row's bar and zero line sit inside the bar column, in pixels from its left edge. */
type BarGeometry = { feature: string; left: number; right: number; zero: number; width: number; colour: string; sign: string };

/** Each row's bar geometry. */
async function barGeometry(p: PanelPage): Promise<BarGeometry[]> {
  return await p.page.evaluate<BarGeometry[]>(`[...document.querySelectorAll('[data-testid=contributions-table] tbody:not(.hidden) tr[data-feature]')].map((tr) => {
    const track = tr.querySelector('.contrib-track').getBoundingClientRect();
    const barEl = tr.querySelector('.contrib-bar');
    const bar = barEl.getBoundingClientRect();
    const zero = tr.querySelector('.contrib-zero').getBoundingClientRect();
    return { feature: tr.dataset.feature, left: bar.left - track.left, right: bar.right - track.left, zero: zero.left + zero.width / 2 - track.left, width: track.width, colour: getComputedStyle(barEl).backgroundColor, sign: barEl.dataset.sign };
  })`);
}

describe('panel contributions (headless Chromium)', function () {
  this.timeout(180_000);
  let p: PanelPage;
  const increase = parseHex(SIGN_HEX.raises);
  const decrease = parseHex(SIGN_HEX.lowers);

  before(async () => {
    p = await PanelPage.open('dark');
    await p.send(...classificationMessages());
  });
  after(async () => p?.close());

  it('lists a row’s contributions as a table: the class explained, base and prediction in one sentence, largest first, signed', async () => {
    await p.send(contributionsMessage());
    const head = (await p.page.textContent('[data-testid=contributions-head]')) ?? '';
    // Row 71 is a training row, so the host explains it over the trees that never saw it, and says so.
    assert.equal(head.replace(/\s+/g, ' ').trim(), 'Row 71 (explained by the 20 trees that never saw it): their average probability of versicolor is 0.3333; this row’s values take it to 0.8033.');
    // A real table: column headers, and each feature's name as its row's header.
    const heads = await p.page.locator('[data-testid=contributions-table] thead th').evaluateAll((ths: PageElement[]) => ths.map((th) => [th.getAttribute('scope'), (th.textContent ?? '').trim()]));
    assert.deepEqual(heads.slice(0, 3), [
      ['col', 'Feature'],
      ['col', 'Value in this row'],
      ['col', 'Contribution'],
    ]);
    assert.equal(heads[3][0], 'col');
    // The bar column's header is its axis: the largest fall, zero and the largest rise, then which way is which.
    const axis = await p.page.locator('[data-testid=contributions-table] thead th.bar-head .contrib-axis').allTextContents();
    assert.deepEqual(axis, ['0+0.31', '◂ lowersraises ▸'], 'the fall of 0.07 sits too close to zero for its own number');
    assert.deepEqual(await contributionRows(p), [
      ['petal_len', 'petal_len', '4.7', '+0.31', ''],
      ['petal_wid', 'petal_wid', '1.4', '+0.22', ''],
      [HOSTILE_FEATURE, HOSTILE_FEATURE, '<b>3.1</b>', '−0.07', ''],
      ['colour', 'colour', HOSTILE_LEVEL, '+0.01', ''],
    ]);
    assert.equal(await p.page.locator('[data-testid=contributions-others]').count(), 0, 'four features: nothing to fold');
    assert.equal(await p.page.locator('[data-testid=contributions] canvas').count(), 0, 'the table is the view, not a chart');
  });

  it('draws each contribution as a bar from one zero line, to scale, in the two sign colours', async () => {
    const bars = await barGeometry(p);
    const want: Record<string, number> = { petal_len: 0.31, petal_wid: 0.22, [HOSTILE_FEATURE]: -0.07, colour: 0.01 };
    const zero = bars[0].zero;
    // The column spans the largest fall (0.07) to the largest rise (0.31): zero sits 0.07 / 0.38 of the way along.
    assert.ok(Math.abs(zero / bars[0].width - 0.07 / 0.38) < 0.01, `zero at ${zero} of ${bars[0].width}`);
    const perUnit = bars[0].width / 0.38;
    for (const b of bars) {
      const v = want[b.feature];
      assert.ok(Math.abs(b.zero - zero) < 0.5, `${b.feature}: one zero line for every row`);
      if (v > 0) assert.ok(Math.abs(b.left - zero) <= 1, `${b.feature} starts at zero`);
      else assert.ok(Math.abs(b.right - zero) <= 1, `${b.feature} ends at zero`);
      assert.ok(Math.abs(b.right - b.left - Math.abs(v) * perUnit) <= 1.5, `${b.feature}: ${b.right - b.left} px for ${v}`);
      assert.equal(b.colour, cssRgb(v > 0 ? increase : decrease), b.feature);
      assert.equal(b.sign, v > 0 ? 'raises' : 'lowers');
    }
  });

  it('folds all but the largest contributions into one “other features” row that opens in place', async () => {
    await p.send(contributionsWide());
    assert.match((await p.page.textContent('[data-testid=contributions-head]')) ?? '', /^Row 33: the forest’s average probability of setosa is 0\.4; this row’s values take it to 0\.652\.$/);
    const rows = await contributionRows(p);
    // Largest by absolute size first, whatever order the host listed them in.
    assert.deepEqual(
      rows.map((r) => [r[0], r[3]]),
      [
        ['f01', '+0.21'],
        ['f02', '−0.15'],
        ['f03', '+0.12'],
        ['f04', '−0.1'],
        ['f05', '+0.08'],
        ['f06', '+0.07'],
        ['f07', '−0.06'],
        ['f08', '+0.05'],
      ],
    );
    const others = '[data-testid=contributions-others]';
    const cells = await p.page.locator(`${others} > *`).allTextContents();
    // The six folded contributions: 0.03 − 0.02 + 0.015 + 0.01 − 0.005 + 0.002 = +0.032.
    assert.deepEqual(cells.map((t) => t.trim()), ['▸ 6 other features', 'combined', '+0.032', '']);
    assert.equal(await p.page.isVisible('[data-testid=contributions-folded]'), false);
    const toggle = p.page.locator('[data-testid=contributions-expand]');
    assert.equal(await toggle.getAttribute('aria-expanded'), 'false');
    await toggle.click();
    assert.equal(await p.page.locator('[data-testid=contributions-expand]').getAttribute('aria-expanded'), 'true');
    assert.equal(await p.page.isVisible('[data-testid=contributions-folded]'), true);
    const all = await contributionRows(p);
    assert.deepEqual(all.slice(8).map((r) => [r[0], r[3]]), [
      ['f09', '+0.03'],
      ['f10', '−0.02'],
      ['f11', '+0.015'],
      ['f12', '+0.01'],
      ['f13', '−0.005'],
      ['f14', '+0.002'],
    ]);
    await p.page.locator('[data-testid=contributions-expand]').click();
    assert.equal(await p.page.isVisible('[data-testid=contributions-folded]'), false);
  });

  it('raised no page errors, console errors or CSP violations', async () => {
    await p.send(contributionsWide());
    await p.screenshotOf('[data-testid=contributions-section]', 'contributions-dark.png');
    assert.deepEqual(p.errors, []);
  });
});

describe('panel contributions, regression in the light theme', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('light', { width: 1280, height: 900 });
    await p.send({ type: 'summary', summary: regressionSummary() });
  });
  after(async () => p?.close());

  it('explains the predicted value, with the target’s name', async () => {
    await p.send({
      type: 'contributions',
      row: 25,
      state: 'ready',
      contributions: {
        row: 25,
        output: null,
        base: 230,
        prediction: 262,
        trees: 40,
        outOfBag: false,
        features: [
          { feature: 'area_m2', value: '142', contribution: 40 },
          { feature: 'distance_km', value: '12.5', contribution: -10 },
          { feature: 'has_garden', value: 'yes', contribution: 2 },
        ],
      },
      text: '',
    });
    const head = ((await p.page.textContent('[data-testid=contributions-head]')) ?? '').replace(/\s+/g, ' ').trim();
    assert.equal(head, 'Row 25: the forest’s average predicted price_k is 230; this row’s values take it to 262.');
    assert.deepEqual(
      (await contributionRows(p)).map((r) => r.slice(1, 4)),
      [
        ['area_m2', '142', '+40'],
        ['distance_km', '12.5', '−10'],
        ['has_garden', 'yes', '+2'],
      ],
    );
    // The light theme draws the same sign colours as the dark one.
    const bars = await barGeometry(p);
    assert.deepEqual(
      bars.map((b) => b.colour),
      [cssRgb(parseHex(SIGN_HEX.raises)), cssRgb(parseHex(SIGN_HEX.lowers)), cssRgb(parseHex(SIGN_HEX.raises))],
    );
    await p.screenshotOf('[data-testid=contributions-section]', 'contributions-light.png');
    assert.deepEqual(p.errors, []);
  });
});
