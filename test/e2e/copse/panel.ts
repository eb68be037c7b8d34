// Reading Copse's own surfaces in the workbench: where its panel sits among
// the editor groups, the panel's summary figures, and the hover's vote table.

import { FrameLocator, Page } from 'playwright-core';
import { BrowserElement } from '../harness/dom';
import { sleep } from '../harness/processes';

export const EXTENSION_ID = 'copse.copse';

export interface EditorGroup {
  left: number;
  active: boolean;
  tabs: string[];
}

/** The editor groups from left to right, with their tab titles. */
export async function editorGroups(page: Page): Promise<EditorGroup[]> {
  const groups = await page.locator('.part.editor .editor-group-container').evaluateAll((els: BrowserElement[]) =>
    els.map((g) => ({
      left: g.getBoundingClientRect().x,
      active: g.classList.contains('active'),
      tabs: [...g.querySelectorAll('.tab .label-name')].map((t) => (t.textContent ?? '').trim()),
    })),
  );
  return groups.sort((a, b) => a.left - b.left);
}

/** Index (left to right) of the group holding a tab titled `title`, or -1. */
export function groupOf(groups: EditorGroup[], title: string): number {
  return groups.findIndex((g) => g.tabs.includes(title));
}

/**
 * Waits until the panel shows a summary titled for `dataset` → `target` with a
 * headline score, and returns that score's text. The title is what tells one
 * fit's summary from the previous one's.
 */
export async function waitForSummary(panel: FrameLocator, dataset: string, target: string, timeoutMs = 180_000): Promise<string> {
  const title = panel.locator('h1');
  const score = panel.locator('[data-testid=summary] [data-testid=oob-score]');
  const deadline = Date.now() + timeoutMs;
  let last = '';
  for (;;) {
    last = (await title.innerText({ timeout: 2_000 }).catch(() => '')).replace(/\s+/g, ' ').trim();
    if (last === `Copse ${dataset} → ${target}` && (await score.count()) > 0) return (await score.innerText()).trim();
    if (Date.now() > deadline) {
      const status = await panel.locator('[data-testid=status]').innerText().catch(() => '(no status)');
      throw new Error(`the panel did not show a summary for ${dataset} → ${target} within ${timeoutMs} ms (title "${last}", status "${status}")`);
    }
    await sleep(200);
  }
}

/** The confusion table's counts, confusion[truth][predicted], with its class labels. */
export async function readConfusion(panel: FrameLocator): Promise<{ labels: string[]; counts: number[][] }> {
  const table = panel.locator('[data-testid=confusion] table');
  return table.evaluate((el: BrowserElement) => {
    const heads = [...el.querySelectorAll('thead th')].map((th) => th.innerText.trim());
    const labels = heads.slice(1, -1);
    const counts = [...el.querySelectorAll('tbody tr')]
      .filter((tr) => labels.includes(tr.querySelector('th')?.innerText.trim() ?? ''))
      .map((tr) => [...tr.querySelectorAll('td')].slice(0, labels.length).map((td) => Number(td.innerText.replace(/,/g, ''))));
    return { labels, counts };
  });
}

export interface HoverVotes {
  row: number;
  trees: number;
  counts: Record<string, number>;
}

/**
 * Parses the hover of a fitted row: "Copse · row N (...)" and the vote table,
 * whose header names the classes and whose "all T trees" row counts them.
 */
export function parseHoverVotes(text: string): HoverVotes {
  const row = /Copse · row (\d+)/.exec(text);
  const lines = text.split('\n').map((l) => l.trim());
  const header = lines.find((l) => /^Votes\t/.test(l));
  const all = lines.find((l) => /^all \d+ trees\t/.test(l));
  if (!row || !header || !all) throw new Error(`not a Copse vote hover:\n${text}`);
  const classes = header.split('\t').slice(1).map((c) => c.trim());
  const cells = all.split('\t');
  const counts: Record<string, number> = {};
  classes.forEach((c, n) => (counts[c] = Number(cells[n + 1])));
  return { row: Number(row[1]), trees: Number(/^all (\d+) trees/.exec(all)![1]), counts };
}

/** The rows of the disagreement view, each with its per-tree votes as the cells' titles name them. */
export async function readDisagreement(panel: FrameLocator): Promise<Array<{ row: number; votes: string[] }>> {
  return panel.locator('[data-testid=disagreement]').evaluate((el: BrowserElement) =>
    [...el.querySelectorAll('[data-row]')].map((block) => ({
      row: Number(block.getAttribute('data-row')),
      votes: [...block.querySelectorAll('[data-testid=vote-strip] .tree')]
        .sort((a, b) => Number(a.getAttribute('data-tree')) - Number(b.getAttribute('data-tree')))
        // "tree 3: soared (out-of-bag)"
        .map((cell) => /^tree \d+: (.*?)( \(out-of-bag\))?$/.exec(cell.getAttribute('title') ?? '')?.[1] ?? '?'),
    })),
  );
}
