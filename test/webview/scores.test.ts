// The scores read first and honestly: the summary sits above the maps, the confusion table's shade grows
// with the count and its numbers stay readable in both themes, and capped lists say how much they hold.
import * as assert from 'node:assert/strict';
import { LIMITS, type SuspectRow } from '../../src/protocol/messages';
import { listed, permutationDrop } from '../../webview/format';
import { contrastRatio, parseColour, parseHex, type Rgb } from '../../webview/palette';
import { classificationMessages, classificationSummary } from './fixtures';
import { PanelPage, THEMES, type ThemeName } from './harness';

interface Cell {
  n: number;
  background: string;
  colour: string;
}

async function confusionCells(p: PanelPage): Promise<Cell[]> {
  return await p.page.evaluate<Cell[]>(`[...document.querySelectorAll('[data-testid=confusion] tbody tr')]
    .filter((tr) => !/precision/.test(tr.querySelector('th').textContent))
    .flatMap((tr) => [...tr.querySelectorAll('td')].slice(0, -1).map((td) => ({
      n: Number(td.textContent.replace(/,/g, '')),
      background: getComputedStyle(td).backgroundColor,
      colour: getComputedStyle(td).color,
    })))`);
}

function rgb(text: string): Rgb {
  const c = parseColour(text);
  if (!c) throw new Error(`not a colour: ${text}`);
  return c;
}

const distance = (a: Rgb, b: Rgb) => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);

describe('numbers in the units their captions state', () => {
  it('shows a classifier’s permutation drop in percentage points, a regression’s in its own units', () => {
    // The host sends a classifier's drop in accuracy as a share of rows: 0.27 is 27 points.
    assert.equal(permutationDrop('classification', 0.27), '27');
    assert.equal(permutationDrop('classification', -0.004), '\u22120.4');
    assert.equal(permutationDrop('regression', 410), '410');
    assert.equal(permutationDrop('regression', null), 'n/a');
  });
});

describe('capped lists say what they hold', () => {
  it('gives “50 of 261” when the total is known, and only what is known otherwise', () => {
    const what = 'rows whose out-of-bag vote went against their own label';
    assert.equal(listed(50, 261, 50, what), '50 of 261 rows whose out-of-bag vote went against their own label.');
    assert.equal(listed(1234, 5000, 2000, 'rows'), '1,234 of 5,000 rows.');
    assert.equal(listed(12, 12, 50, what), `All 12 ${what}.`);
    assert.equal(listed(12, null, 50, what), `All 12 ${what}.`, 'a list shorter than its cap is all there is');
    assert.equal(listed(50, null, 50, what), `The first 50 ${what}; the list stops at 50, so there may be more.`);
  });
});

describe('scores at a glance (headless Chromium)', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('dark');
    await p.send(...classificationMessages());
  });
  after(async () => p?.close());

  it('puts the scores first, above the maps', async () => {
    const order = await p.page.evaluate<string[]>(`[...document.querySelectorAll('main section.card')].map((s) => s.dataset.testid)`);
    assert.equal(order[0], 'summary');
    assert.ok(order.indexOf('summary') < order.indexOf('map-section'));
    const summary = await p.page.locator('[data-testid=summary]').boundingBox();
    const map = await p.page.locator('[data-testid=map-section]').boundingBox();
    assert.ok(summary && map && summary.y + summary.height <= map.y, 'the summary ends above the large map');
    assert.ok(summary.y < 200, `the summary starts ${summary.y}px down the page`);
  });

  for (const theme of ['dark', 'light'] as ThemeName[]) {
    it(`${theme} theme: shades each confusion cell more strongly the more rows it holds, and keeps its number readable`, async () => {
      await p.setTheme(theme);
      const background = parseHex(THEMES[theme].vars['--vscode-editor-background']);
      const cells = await confusionCells(p);
      assert.deepEqual(
        cells.map((c) => c.n),
        [50, 0, 0, 0, 44, 6, 0, 4, 46],
      );
      for (const c of cells.filter((c) => c.n === 0)) assert.equal(c.background, 'rgba(0, 0, 0, 0)', 'an empty cell has no shade');
      const shaded = cells.filter((c) => c.n > 0).sort((a, b) => a.n - b.n);
      // 4 < 6 < 44 < 46 < 50 rows: each step up in count is a step away from the background.
      for (let i = 1; i < shaded.length; i++) {
        const lo = distance(rgb(shaded[i - 1].background), background);
        const hi = distance(rgb(shaded[i].background), background);
        assert.ok(hi > lo, `${shaded[i].n} rows (${shaded[i].background}) should be shaded more than ${shaded[i - 1].n} (${shaded[i - 1].background})`);
      }
      assert.ok(distance(rgb(shaded[0].background), background) > 8, 'even the smallest count is visibly shaded');
      // WCAG 2.1 SC 1.4.3: 4.5:1 for normal text.
      for (const c of shaded) {
        const ratio = contrastRatio(rgb(c.colour), rgb(c.background));
        assert.ok(ratio >= 4.5, `${c.n}: ${c.colour} on ${c.background} is ${ratio.toFixed(2)}:1`);
      }
      await p.screenshotOf('[data-testid=summary]', `summary-${theme}.png`);
    });
  }

  it('says how many doubtful rows the list holds', async () => {
    assert.equal((await p.page.textContent('[data-testid=suspects-count]'))?.trim(), 'All 3 rows whose out-of-bag vote went against their own label. Lowest out-of-bag margin first; click a row to go to it.');
    // A capped list, with the total the summary carries.
    const full: SuspectRow[] = Array.from({ length: LIMITS.suspects }, (_, i) => ({ row: 200 + i, score: -0.9 + i * 0.01, label: 1, oobPredicted: 2 }));
    await p.send({ type: 'summary', summary: { ...classificationSummary(), suspectCount: 261 } }, { type: 'suspects', rows: full });
    assert.equal(await p.page.locator('[data-testid=suspects] tr[data-row]').count(), 50);
    assert.match((await p.page.textContent('[data-testid=suspects-count]')) ?? '', /^50 of 261 rows whose out-of-bag vote went against their own label\./);
    // Without a total, a full list says only what is known: there may be more.
    await p.send({ type: 'summary', summary: { ...classificationSummary(), suspectCount: null } }, { type: 'suspects', rows: full });
    assert.match((await p.page.textContent('[data-testid=suspects-count]')) ?? '', /^The first 50 rows whose out-of-bag vote went against their own label; the list stops at 50, so there may be more\./);
  });

  it('says how many features the importance charts show when they cannot show them all', async () => {
    const s = classificationSummary();
    const features = Array.from({ length: 20 }, (_, i) => ({ name: `g${i + 1}`, kind: 'numeric' as const }));
    const importance = features.map((f, i) => ({ feature: f.name, impurity: (20 - i) / 210, permutation: (20 - i) / 100, permutationSpread: 0.01 }));
    await p.send({ type: 'summary', summary: { ...s, features, importance } });
    assert.match((await p.page.textContent('[data-testid=importance]')) ?? '', /15 of 20 features shown, the most important first\./);
    assert.deepEqual(p.errors, []);
  });
});
