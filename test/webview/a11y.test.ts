// The panel under an automated accessibility audit (axe-core, the npm package, run inside the page):
// a fully drawn classification panel and a regression one, in the dark, light and high-contrast themes,
// may have no serious or critical violation. Lesser findings are printed so they stay visible.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import {
  classificationMessages,
  contributionsMessage,
  dependenceNumeric,
  globalMessage,
  regressionMap,
  regressionSummary,
  rowVotes,
  sweepDone,
} from './fixtures';
import { PanelPage, type ThemeName } from './harness';
import { describeRegions } from '../../src/core/explain/region-text';
import { classificationMap, classificationSummary } from './fixtures';

interface AxeNode {
  target: string[];
  failureSummary?: string;
}
interface AxeViolation {
  id: string;
  impact: 'minor' | 'moderate' | 'serious' | 'critical' | null;
  help: string;
  nodes: AxeNode[];
}

const AXE = fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

/** Runs axe in the page (page.evaluate is outside the page's CSP, as a browser extension would be). */
export async function audit(p: PanelPage): Promise<AxeViolation[]> {
  await p.page.evaluate(AXE);
  const result = await p.page.evaluate<{ violations: AxeViolation[] }>(
    `axe.run(document, { resultTypes: ['violations'] }).then((r) => ({ violations: r.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.map((n) => ({ target: n.target, failureSummary: n.failureSummary })) })) }))`,
  );
  return result.violations;
}

function describeViolations(vs: AxeViolation[]): string {
  return vs
    .map((v) => `${v.impact} ${v.id}: ${v.help} (${v.nodes.length}×: ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join('; ')})`)
    .join('\n');
}

export function countByImpact(vs: AxeViolation[]): Record<string, number> {
  const out: Record<string, number> = { critical: 0, serious: 0, moderate: 0, minor: 0 };
  for (const v of vs) out[v.impact ?? 'minor'] += v.nodes.length;
  return out;
}

const FULL_CLASSIFICATION = () => [
  ...classificationMessages(),
  { type: 'disagreement' as const, rows: [rowVotes(12, 0, 0.3), rowVotes(40, 1, 0.5)], selected: 2 },
  contributionsMessage(),
  globalMessage(40, true),
  dependenceNumeric(),
  sweepDone(2),
];

describe('panel accessibility audit (axe-core)', function () {
  this.timeout(180_000);

  for (const theme of ['dark', 'light', 'high-contrast'] as ThemeName[]) {
    it(`finds no serious or critical violation in a drawn classification panel (${theme})`, async () => {
      const p = await PanelPage.open(theme);
      try {
        await p.send(...FULL_CLASSIFICATION());
        const vs = await audit(p);
        const counts = countByImpact(vs);
        // eslint-disable-next-line no-console -- the audit's counts by impact go to the run's log, so lesser findings stay visible.
        console.log(`      axe (${theme}, classification): ${JSON.stringify(counts)}${vs.length ? '\n' + describeViolations(vs) : ''}`);
        const bad = vs.filter((v) => v.impact === 'serious' || v.impact === 'critical');
        assert.equal(bad.length, 0, describeViolations(bad));
      } finally {
        await p.close();
      }
    });
  }

  it('finds no serious or critical violation in a drawn regression panel', async () => {
    const p = await PanelPage.open('light');
    try {
      await p.send({ type: 'summary', summary: regressionSummary() }, { type: 'regionMap', map: regressionMap() });
      const vs = await audit(p);
      // eslint-disable-next-line no-console -- as above.
      console.log(`      axe (light, regression): ${JSON.stringify(countByImpact(vs))}${vs.length ? '\n' + describeViolations(vs) : ''}`);
      const bad = vs.filter((v) => v.impact === 'serious' || v.impact === 'critical');
      assert.equal(bad.length, 0, describeViolations(bad));
    } finally {
      await p.close();
    }
  });

  it('gives the region map a name, a sentence and a table a screen reader can reach', async () => {
    const p = await PanelPage.open('dark');
    try {
      const map = classificationMap();
      const text = describeRegions(map, classificationSummary().classes);
      await p.send(...classificationMessages(), { type: 'regionMap', map: { ...map, text } });
      const canvas = p.page.locator('[data-testid=region-map]');
      assert.equal(await canvas.getAttribute('role'), 'img');
      assert.match((await canvas.getAttribute('aria-label')) ?? '', /petal_len across, petal_wid up/);
      const described = (await canvas.getAttribute('aria-describedby')) ?? '';
      assert.equal((await p.page.locator(`#${described}`).innerText()).trim(), text.sentence);
      assert.match(text.sentence, /of the map is a close vote/);
      // The table is folded; opening it with the keyboard shows one row per band of the feature up.
      await p.page.locator('[data-testid=region-text] summary').focus();
      await p.page.keyboard.press('Enter');
      const rows = p.page.locator('[data-testid=region-text] tbody tr');
      assert.equal(await rows.count(), text.table.rows.length);
      assert.equal((await rows.first().locator('th').innerText()).trim(), text.table.rows[0].head);
    } finally {
      await p.close();
    }
  });

  it('puts the curve and the importance charts into words, with their tables', async () => {
    const p = await PanelPage.open('light');
    try {
      await p.send(...FULL_CLASSIFICATION());
      const summary = classificationSummary();
      const curve = await p.page.locator('[data-testid=oob-curve-text] .picture-summary').innerText();
      const last = summary.curve.length;
      assert.match(curve, new RegExp(`^Out-of-bag error from .+ with \\d+ trees to .+ with ${last}\\.$`));
      const importance = await p.page.locator('[data-testid=importance-text] .picture-summary').innerText();
      const byPerm = [...summary.importance].sort((a, b) => (b.permutation ?? -Infinity) - (a.permutation ?? -Infinity));
      assert.ok(importance.includes(`leans most on ${byPerm[0].feature}`), importance);
      assert.equal(await p.page.locator('[data-testid=importance-text] tbody tr').count(), summary.importance.length, 'one row per feature');
      const canvas = p.page.locator('[data-testid=importance] canvas').first();
      assert.equal(await canvas.getAttribute('role'), 'img');
    } finally {
      await p.close();
    }
  });

  it('reaches the map pickers with Tab in reading order, each with a visible focus ring', async () => {
    // The high-contrast focus colour (#f38518) is what the ring must be drawn in.
    const p = await PanelPage.open('high-contrast');
    try {
      await p.send(...classificationMessages());
      const seen: string[] = [];
      for (let i = 0; i < 40 && seen.length < 3; i++) {
        await p.page.keyboard.press('Tab');
        const id = await p.page.evaluate<string>(`document.activeElement?.dataset?.testid ?? ''`);
        if (id.startsWith('region-') && !seen.includes(id)) {
          seen.push(id);
          // vscode-elements draw their ring on the focused part inside their shadow root (an outline or a border colour).
          const ring = await p.page.evaluate<string[]>(`(() => {
            const out = [];
            for (let el = document.activeElement; el; el = el.shadowRoot?.activeElement ?? null) {
              const cs = getComputedStyle(el);
              out.push(cs.outlineStyle + ' ' + cs.outlineColor + ' / ' + cs.borderTopColor);
            }
            return out;
          })()`);
          assert.ok(ring.some((r) => (r.startsWith('none') ? r.split(' / ')[1] : r).includes('rgb(243, 133, 24)')), `${id} shows where the focus is in the theme's focus colour: ${ring.join(' | ')}`);
        }
      }
      assert.deepEqual(seen, ['region-x', 'region-y', 'region-reference']);
    } finally {
      await p.close();
    }
  });
});
