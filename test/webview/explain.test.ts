// The panel's explanation sections in headless Chromium: each draws from a hand-made host message, shows
// names and values that contain markup as text, and posts the messages the host acts on.
import * as assert from 'node:assert/strict';
import { parseHex, type Rgb } from '../../webview/palette';
import {
  classificationMessages,
  classificationSummary,
  contributionsMessage,
  dependenceLevels,
  dependenceNumeric,
  globalMessage,
  HOSTILE_CLASS,
  HOSTILE_FEATURE,
  HOSTILE_LEVEL,
  regressionSummary,
  rowVotes,
  sweepDone,
} from './fixtures';
import { PanelPage } from './harness';

/** Elements that markup in the data would have made, anywhere in the page (shadow roots too). */
async function injected(p: PanelPage): Promise<unknown> {
  return p.page.evaluate(`(() => {
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
}

/** How many pixels of a canvas are exactly each of the given colours. */
async function colourCounts(p: PanelPage, selector: string, colours: Rgb[]): Promise<number[]> {
  return await p.page.evaluate<number[]>(`(() => {
    const c = document.querySelector(${JSON.stringify(selector)});
    const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    const want = ${JSON.stringify(colours)};
    const n = want.map(() => 0);
    for (let o = 0; o < d.length; o += 4) {
      if (d[o + 3] !== 255) continue;
      want.forEach((w, k) => { if (d[o] === w[0] && d[o + 1] === w[1] && d[o + 2] === w[2]) n[k]++; });
    }
    return n;
  })()`);
}

const texts = (p: PanelPage, selector: string) => p.page.locator(selector).allTextContents();

describe('panel explanations (headless Chromium)', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('dark');
    await p.send(...classificationMessages());
  });
  after(async () => p?.close());

  it('asks the user to pick a row until a row’s contributions arrive, and says when they are being worked out', async () => {
    assert.match((await p.page.textContent('[data-testid=contributions]')) ?? '', /Put the cursor on a data row/);
    await p.send({ type: 'contributions', row: 71, state: 'working', contributions: null, text: 'Working out row 71’s contributions…' });
    assert.match((await p.page.textContent('[data-testid=contributions-head]')) ?? '', /Working out row 71/);
    assert.equal(await p.page.getAttribute('[data-testid=contributions]', 'data-state'), 'working');
  });

  it('posts “explain row” from a row of the vote list', async () => {
    await p.clearPosted();
    await p.page.click('[data-testid=disagreement] [data-row="12"] [data-testid=explain-row]');
    assert.deepEqual((await p.posted()).filter((m) => m.type === 'explainRow'), [{ type: 'explainRow', row: 12 }]);
  });

  it('fills in the global view beside the two importances as the background sample grows', async () => {
    const fig = '[data-testid=importance-contrib]';
    assert.match((await p.page.textContent(fig)) ?? '', /Not worked out yet|Working out/);
    await p.send({ type: 'globalContributions', global: null, text: 'Working out contributions over a sample of rows…' });
    assert.match((await p.page.textContent(fig)) ?? '', /Working out contributions over a sample of rows/);
    await p.send(globalMessage(30, false));
    assert.match((await p.page.textContent(fig)) ?? '', /Over 30 of 100 sampled rows so far/);
    await p.send(globalMessage(100, true));
    assert.match((await p.page.textContent(fig)) ?? '', /Over 100 randomly drawn rows; summed over classes/);
    const [bars] = await colourCounts(p, `${fig} canvas`, [parseHex('#000000')]);
    assert.equal(bars, 0, 'bars are not black: they carry a theme colour with some transparency');
    const painted = await p.page.evaluate<number>(`(() => {
      const c = document.querySelector('${fig} canvas');
      const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
      let n = 0;
      for (let o = 3; o < d.length; o += 4) if (d[o] > 0) n++;
      return n;
    })()`);
    assert.ok(painted > 500, `${painted} painted pixels`);
    assert.match((await p.page.textContent('[data-testid=importance-bias]')) ?? '', /Strobl, Boulesteix, Zeileis & Hothorn 2007/);
    assert.match((await p.page.textContent('[data-testid=importance-bias]')) ?? '', /many distinct values/);
  });

  it('draws one feature’s curves with the data’s spread, and names where there are no training rows', async () => {
    await p.send(dependenceNumeric());
    const note = (await p.page.textContent('[data-testid=dependence-note]')) ?? '';
    assert.match(note, /average over 4 sampled rows/);
    assert.match(note, /No rows between 2\.25 and 2\.75:/);
    // 3 cells of 16 rows below the gap, 9 of 9 above it, and 2 missing: 131 in all.
    assert.match(note, /The bars along the bottom show how 131 rows spread along petal_len: its training rows for a forest fitted here, or the rows of the file it is shown with for an opened one\./);
    assert.doesNotMatch(note, /shown with lie/);
    assert.match(note, /2 rows \(1\.5%\) have no value for petal_len/);
    const table = await texts(p, '[data-testid=dependence-table] tbody tr th');
    assert.equal(table.length, 13);
    assert.equal(table[0], '1');
    assert.equal(await p.page.evaluate(`document.querySelector('[data-testid=dependence-feature]').value`), 'petal_len');
    assert.equal(await p.page.evaluate(`document.querySelector('[data-testid=dependence-class]').value`), '1');
    // The empty cell is tinted across the plot: some pixels of the canvas are neither background nor lines.
    const painted = await p.page.evaluate<number>(`(() => {
      const c = document.querySelector('[data-testid=dependence] canvas');
      const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
      let n = 0;
      for (let o = 3; o < d.length; o += 4) if (d[o] > 0) n++;
      return n;
    })()`);
    assert.ok(painted > 2000, `${painted} painted pixels`);
  });

  it('posts the feature and the class picked for the dependence view', async () => {
    const pick = async (testid: string, label: string) => {
      await p.page.click(`[data-testid=${testid}]`);
      await p.page.locator(`[data-testid=${testid}] li.option`, { hasText: label }).first().click();
    };
    await p.clearPosted();
    await pick('dependence-feature', 'petal_wid');
    assert.deepEqual(await p.waitForPosted((m) => m.type === 'chooseDependence'), { type: 'chooseDependence', feature: 'petal_wid', output: null });
    await p.send(dependenceNumeric());
    await p.clearPosted();
    await pick('dependence-class', 'setosa');
    assert.deepEqual(await p.waitForPosted((m) => m.type === 'chooseDependence'), { type: 'chooseDependence', feature: 'petal_len', output: 0 });
  });

  it('shows a level feature’s curve by level, with markup in level names as text', async () => {
    await p.send(dependenceLevels());
    const rows = await texts(p, '[data-testid=dependence-table] tbody tr th');
    assert.deepEqual(rows, ['red', HOSTILE_LEVEL, 'blue']);
    assert.match((await p.page.textContent('[data-testid=dependence-note]')) ?? '', new RegExp(`No rows at ${HOSTILE_LEVEL.replace(/[<>/]/g, (c) => `\\${c}`)}:`));
  });

  it('asks the host for a sweep, shows its progress with a cancel button, then the errors with the best marked', async () => {
    await p.clearPosted();
    assert.equal((await p.page.textContent('[data-testid=sweep]'))?.trim(), 'Tune features per split by out-of-bag error');
    await p.page.click('[data-testid=sweep]');
    assert.deepEqual((await p.posted()).filter((m) => m.type === 'runSweep'), [{ type: 'runSweep' }]);

    await p.send({ type: 'sweep', state: 'running', progress: 0.25, text: 'Refitting: 60 of 240 trees', result: null });
    assert.equal(await p.page.isVisible('[data-testid=sweep-cancel]'), true);
    assert.equal(await p.page.isVisible('[data-testid=sweep]'), false);
    assert.equal(await p.page.isVisible('[data-testid=sweep-refit]'), false);
    assert.equal(Number(await p.page.evaluate(`document.querySelector('.sweep progress').value`)), 0.25);
    await p.clearPosted();
    await p.page.click('[data-testid=sweep-cancel]');
    assert.deepEqual((await p.posted()).filter((m) => m.type === 'cancelSweep'), [{ type: 'cancelSweep' }]);

    await p.send(sweepDone(2));
    const verdict = (await p.page.textContent('[data-testid=sweep-verdict]')) ?? '';
    assert.match(verdict, /Lowest out-of-bag error: 5\.3% with 3 of 4 features per split\. The forest shown uses 2: 6\.6%\./);
    const marks = await texts(p, '[data-testid=sweep-table] tbody th');
    assert.deepEqual(marks, ['1', '2 (shown)', '3 (lowest)', '4']);
    assert.equal((await p.page.textContent('[data-testid=sweep-refit]'))?.trim(), 'Fit again with 3 features per split');
    await p.clearPosted();
    await p.page.click('[data-testid=sweep-refit]');
    assert.deepEqual((await p.posted()).filter((m) => m.type === 'sweepRefit'), [{ type: 'sweepRefit', featuresPerSplit: 3 }]);
    // After that refit the forest shown has the best count: nothing left to offer.
    await p.send(sweepDone(3));
    assert.equal(await p.page.isVisible('[data-testid=sweep-refit]'), false);
    assert.match((await p.page.textContent('[data-testid=sweep-verdict]')) ?? '', /already uses that count/);
  });

  it('says why a sweep failed', async () => {
    await p.send({ type: 'sweep', state: 'error', progress: null, text: 'A fit or sweep is already running; wait for it or cancel it first.', result: null });
    assert.match((await p.page.textContent('.sweep [role=status]')) ?? '', /already running/);
    assert.equal(await p.page.isVisible('[data-testid=sweep]'), true);
  });

  it('shows markup in every explanation as text and injects no element', async () => {
    await p.send(contributionsMessage(), dependenceLevels(), globalMessage(100, true));
    assert.deepEqual(await injected(p), { bad: [], injected: null });
    assert.ok(((await p.page.textContent('[data-testid=contributions]')) ?? '').includes(HOSTILE_FEATURE));
    await p.send({ ...contributionsMessage(5), contributions: { ...contributionsMessage(5).contributions!, output: 2 } });
    assert.ok(((await p.page.textContent('[data-testid=contributions-head]')) ?? '').includes(`average probability of ${HOSTILE_CLASS} is`));
    assert.deepEqual(await injected(p), { bad: [], injected: null });
  });

  it('clears every explanation when a new fit’s summary arrives', async () => {
    // A new fit names itself with a new id; the host stamps everything after it with that id.
    await p.send({ type: 'summary', summary: { ...classificationSummary(), fit: 'flowers-fit-2' } });
    assert.match((await p.page.textContent('[data-testid=contributions]')) ?? '', /Put the cursor on a data row/);
    assert.match((await p.page.textContent('[data-testid=dependence]')) ?? '', /appear once the host has worked them out/);
    assert.equal(await p.page.isVisible('[data-testid=sweep-verdict] strong'), false);
    assert.match((await p.page.textContent('[data-testid=importance-contrib]')) ?? '', /Not worked out yet/);
  });

  it('raised no page errors, console errors or CSP violations', async () => {
    await p.screenshot('panel-explanations.png');
    assert.deepEqual(p.errors, []);
  });
});

describe('panel explanations, regression', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('light', { width: 1280, height: 900 });
    await p.send({ type: 'summary', summary: regressionSummary() });
  });
  after(async () => p?.close());

  it('puts the prediction interval beside each row’s votes', async () => {
    const votes = { ...rowVotes(25, 0, 0), counts: [], entropy: null, votes: Array.from({ length: 40 }, (_, t) => 180 + t), interval: { level: 0.9, lower: 171.5, upper: 233.25 } };
    await p.send({ type: 'disagreement', rows: [votes], selected: 1 });
    const head = (await p.page.textContent('[data-testid=disagreement] [data-row="25"] .vote-head')) ?? '';
    // Three significant digits, as every number in the panel.
    assert.match(head, /90% interval 171.5 to 233.3/);
    assert.equal(await p.page.locator('[data-testid=disagreement] [data-row]').count(), 1, 'one block per row, for the e2e reader');
  });

});
