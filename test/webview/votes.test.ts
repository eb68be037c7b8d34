// A regression row's per-tree values in headless Chromium: one dot per tree on a numeric axis, the trees
// that did not see the row in their own lane, the label and the out-of-bag mean marked as lines with their
// values written out, and one scale for every row shown. Position carries each value, not colour.
import * as assert from 'node:assert/strict';
import { LIMITS, type RowVotes } from '../../src/protocol/messages';
import { regressionSummary } from './fixtures';
import { PanelPage, type ThemeName } from './harness';

const VOTES = Array.from({ length: 40 }, (_, t) => 150 + ((t * 37) % 40) * 2.5);

function regressionRow(row: number, votes: number[], label: number | null, oobVote: number | null, outOfBag: number[]): RowVotes {
  return { row, counts: [], lead: outOfBag.length > 0 ? 'out-of-bag' : 'all-trees', allPredicted: 199, agreement: 0.7, entropy: null, oobVote, label, votes, outOfBag, interval: { level: 0.9, lower: 160, upper: 240 } };
}

interface Strip {
  ticks: Array<{ value: number; text: string }>;
  axis: { left: number; width: number };
  lanes: Array<{ lane: string; name: string; trees: Array<{ tree: number; title: string; centre: number; colour: string }> }>;
  marks: Array<{ kind: string; centre: number }>;
  texts: Array<{ kind: string; text: string }>;
}

/** Everything the strip of one row shows, in page pixels. */
async function readStrip(p: PanelPage, row: number): Promise<Strip> {
  return await p.page.evaluate<Strip>(`(() => {
    const strip = document.querySelector('[data-testid=disagreement] [data-row="${row}"] [data-testid=vote-strip]');
    const axisEl = strip.querySelector('.value-axis');
    const a = axisEl.getBoundingClientRect();
    const centre = (el) => { const r = el.getBoundingClientRect(); return r.left + r.width / 2; };
    return {
      ticks: [...axisEl.querySelectorAll('.tick')].map((t) => ({ value: Number(t.dataset.value), text: t.textContent })),
      axis: { left: a.left, width: a.width },
      lanes: [...strip.querySelectorAll('.lane-track')].map((track) => ({
        lane: track.dataset.lane,
        name: track.previousElementSibling.textContent,
        trees: [...track.querySelectorAll('.tree')].map((d) => ({ tree: Number(d.dataset.tree), title: d.title, centre: centre(d), colour: getComputedStyle(d).backgroundColor })),
      })),
      marks: [...strip.querySelector('.lane-track').querySelectorAll('.mark-line')].map((m) => ({ kind: m.classList[1], centre: centre(m) })),
      texts: [...strip.querySelectorAll('.mark-text')].map((m) => ({ kind: m.classList[1], text: m.textContent })),
    };
  })()`);
}

/** Where a value sits along the axis, in page pixels, read from the axis the strip itself draws. */
function xOf(s: Strip, v: number): number {
  const lo = s.ticks[0].value;
  const hi = s.ticks[s.ticks.length - 1].value;
  return s.axis.left + ((v - lo) / (hi - lo)) * s.axis.width;
}

for (const theme of ['dark', 'light'] as ThemeName[]) {
  describe(`per-tree values of a regression row, ${theme} theme (headless Chromium)`, function () {
    this.timeout(180_000);
    let p: PanelPage;

    before(async () => {
      p = await PanelPage.open(theme, { width: 1280, height: 900 });
      await p.send(
        { type: 'summary', summary: regressionSummary() },
        {
          type: 'disagreement',
          rows: [regressionRow(25, VOTES, 196, 201, [1, 5, 9, 13, 20, 33]), regressionRow(26, VOTES.map((_, t) => 170 + (t % 7) * 3), 230, 180, [2, 4])],
          selected: 2,
        },
      );
    });
    after(async () => p?.close());

    it('draws one dot per tree on a numeric axis, at the value that tree predicts', async () => {
      const s = await readStrip(p, 25);
      // Round ticks, evenly spaced, spanning every value shown (150 to 247.5, and both rows' labels).
      assert.deepEqual(s.ticks.map((t) => t.text), ['140', '160', '180', '200', '220', '240', '260']);
      const trees = s.lanes.flatMap((l) => l.trees);
      assert.equal(trees.length, 40);
      assert.deepEqual(trees.map((d) => d.tree).sort((a, b) => a - b), VOTES.map((_, t) => t));
      for (const d of trees) {
        assert.ok(Math.abs(d.centre - xOf(s, VOTES[d.tree])) <= 1, `tree ${d.tree} (${VOTES[d.tree]}) at ${d.centre}, axis puts it at ${xOf(s, VOTES[d.tree])}`);
        // Titles use the panel's three significant digits, as every number it shows.
        assert.match(d.title, new RegExp(`^tree ${d.tree + 1}: ${Number(VOTES[d.tree].toPrecision(4))}( \\(out-of-bag\\))?$`));
      }
      // Value is position, not colour: every tree of a lane is drawn alike.
      for (const l of s.lanes) assert.equal(new Set(l.trees.map((d) => d.colour)).size, 1, l.lane);
      assert.equal(await p.page.isVisible('[data-testid=group-votes]'), false, 'nothing to group on a numeric axis');
    });

    it('gives the out-of-bag trees a lane of their own', async () => {
      const s = await readStrip(p, 25);
      assert.deepEqual(s.lanes.map((l) => [l.lane, l.name]), [
        ['oob', 'out-of-bag trees'],
        ['in-bag', 'trees that saw it'],
      ]);
      assert.deepEqual(s.lanes[0].trees.map((d) => d.tree).sort((a, b) => a - b), [1, 5, 9, 13, 20, 33]);
      assert.ok(s.lanes[0].trees.every((d) => d.title.endsWith('(out-of-bag)')));
      assert.ok(s.lanes[1].trees.every((d) => !d.title.endsWith('(out-of-bag)')));
    });

    it('marks the row’s label and the out-of-bag mean as lines at their values, with the values written out', async () => {
      const s = await readStrip(p, 25);
      assert.deepEqual(s.texts, [
        { kind: 'label', text: 'label 196' },
        { kind: 'oob-mean', text: 'out-of-bag mean 201' },
      ]);
      const at = Object.fromEntries(s.marks.map((m) => [m.kind, m.centre]));
      assert.ok(Math.abs(at.label - xOf(s, 196)) <= 1.5, `label line at ${at.label}`);
      assert.ok(Math.abs(at['oob-mean'] - xOf(s, 201)) <= 1.5, `out-of-bag mean line at ${at['oob-mean']}`);
      assert.match((await p.page.textContent('[data-testid=disagreement] [data-row="25"] .vote-head')) ?? '', /out-of-bag mean\s*201/);
    });

    it('puts every row on the same scale', async () => {
      const [a, b] = [await readStrip(p, 25), await readStrip(p, 26)];
      assert.deepEqual(a.ticks, b.ticks);
      assert.ok(Math.abs(a.axis.width - b.axis.width) < 0.5 && Math.abs(a.axis.left - b.axis.left) < 0.5);
      const label = b.marks.find((m) => m.kind === 'label');
      assert.ok(label && Math.abs(label.centre - xOf(b, 230)) <= 1.5);
      await p.screenshotOf('[data-testid=votes-section]', `votes-regression-${theme}.png`);
      assert.deepEqual(p.errors, []);
    });
  });
}

describe('per-tree values without out-of-bag trees, and a full selection', function () {
  this.timeout(180_000);
  let p: PanelPage;

  before(async () => {
    p = await PanelPage.open('dark', { width: 1280, height: 900 });
    await p.send({ type: 'summary', summary: { ...regressionSummary(), oob: null, oobUnavailable: 'Out-of-bag figures are unavailable here.' } });
  });
  after(async () => p?.close());

  it('draws one lane and no out-of-bag mark for a forest opened without its training sample', async () => {
    await p.send({ type: 'disagreement', rows: [regressionRow(7, VOTES, 200, null, [])], selected: 1 });
    const s = await readStrip(p, 7);
    assert.deepEqual(s.lanes.map((l) => [l.lane, l.name, l.trees.length]), [['all', 'trees', 40]]);
    // No tree was kept from this row, so the forest's answer is the mean of all trees: marked with its value.
    assert.deepEqual(s.texts, [
      { kind: 'label', text: 'label 200' },
      { kind: 'all-trees', text: 'mean of all trees 199' },
    ]);
    const mean = s.marks.find((m) => m.kind === 'all-trees');
    assert.ok(mean && Math.abs(mean.centre - xOf(s, 199)) <= 1.5);
    assert.match((await p.page.textContent('[data-testid=disagreement] [data-row="7"] .vote-head')) ?? '', /out-of-bag mean\s*unavailable/);
  });

  it('says how many rows were selected when the list of them is cut short', async () => {
    const rows = Array.from({ length: LIMITS.selectedRows }, (_, i) => regressionRow(100 + i, VOTES, 190, 195, [0, 1]));
    await p.send({ type: 'disagreement', rows, selected: 135 });
    assert.equal(await p.page.locator('[data-testid=disagreement] .vote-row').count(), 20);
    assert.match((await p.page.textContent('[data-testid=disagreement]')) ?? '', /20 of 135 selected rows\./);
    await p.send({ type: 'disagreement', rows, selected: rows.length });
    assert.doesNotMatch((await p.page.textContent('[data-testid=disagreement]')) ?? '', /selected rows\./, 'a list that holds every selected row says nothing about a cut');
    assert.deepEqual(p.errors, []);
  });
});
