import { Locator, Page } from 'playwright-core';
import { BrowserElement } from './dom';
import { runCommand } from './palette';
import { sleep } from './processes';

const TREE = '.explorer-folders-view';

/**
 * The explorer row for `relativePath` ('data/train.csv'), expanding its
 * folders on the way. The tree is virtualised: only rows scrolled into view
 * exist in the DOM, so this suits the small folders tests create, not large ones.
 * Rows are matched by aria-label and aria-level, which only line up with path
 * segments when compact folders are off (QUIET_SETTINGS turns them off).
 */
export async function revealInExplorer(page: Page, relativePath: string, timeoutMs = 15_000): Promise<Locator> {
  if (!(await page.locator(TREE).isVisible())) await runCommand(page, 'View: Show Explorer');
  const segments = relativePath.split('/').filter((s) => s.length > 0);
  let row: Locator | undefined;
  for (const [depth, name] of segments.entries()) {
    row = page.locator(`${TREE} .monaco-list-row[aria-level="${depth + 1}"]`).filter({ has: page.locator(`.label-name`, { hasText: exactly(name) }) }).first();
    await row.waitFor({ state: 'visible', timeout: timeoutMs });
    const isLast = depth === segments.length - 1;
    if (!isLast && (await row.getAttribute('aria-expanded')) === 'false') {
      await row.click();
      await page.waitForFunction(
        (el: BrowserElement | null) => el?.getAttribute('aria-expanded') === 'true',
        await row.elementHandle(),
        { timeout: timeoutMs },
      );
    }
  }
  if (!row) throw new Error('empty path');
  return row;
}

/**
 * Opens a file by clicking it in the explorer and waits until its tab is the
 * active one. A single click opens a preview tab (replaced by the next file
 * opened this way); `pin` double-clicks instead.
 */
export async function openFromExplorer(page: Page, relativePath: string, options: { pin?: boolean; timeoutMs?: number } = {}): Promise<void> {
  const timeoutMs = options.timeoutMs ?? 15_000;
  const row = await revealInExplorer(page, relativePath, timeoutMs);
  if (options.pin) await row.dblclick();
  else await row.click();
  const name = relativePath.split('/').pop()!;
  await activeTab(page, name).waitFor({ state: 'visible', timeout: timeoutMs });
}

/** The active tab of the active editor group, if it shows the resource called `name`. */
export function activeTab(page: Page, name: string): Locator {
  return page.locator(`.editor-group-container.active .tab.active[data-resource-name="${cssString(name)}"]`);
}

/**
 * Right-clicks an explorer row and picks a context-menu entry. Several labels
 * walk into submenus: ('data.csv', 'Copse', 'Fit Forest') opens the "Copse"
 * submenu and picks "Fit Forest" in it. Labels are matched exactly, without
 * the keybinding the menu shows beside them.
 */
export async function explorerContextMenu(page: Page, relativePath: string, ...labels: string[]): Promise<void> {
  if (labels.length === 0) throw new Error('explorerContextMenu needs at least one menu label');
  const row = await revealInExplorer(page, relativePath);
  await row.click({ button: 'right' });
  await pickContextMenu(page, labels);
}

/** The labels of an explorer row's context menu (closed again without picking one). */
export async function explorerContextMenuLabels(page: Page, relativePath: string, timeoutMs = 10_000): Promise<string[]> {
  const row = await revealInExplorer(page, relativePath);
  await row.click({ button: 'right' });
  const menu = page.locator('.context-view.monaco-menu-container .monaco-menu').first();
  await menu.locator('.action-menu-item').first().waitFor({ state: 'visible', timeout: timeoutMs });
  const labels = (await menu.locator('.action-menu-item .action-label').allInnerTexts()).map((l) => l.trim());
  await page.keyboard.press('Escape');
  await page.locator('.context-view.monaco-menu-container').filter({ visible: true }).first().waitFor({ state: 'hidden', timeout: timeoutMs });
  return labels;
}

export async function pickContextMenu(page: Page, labels: string[], timeoutMs = 10_000): Promise<void> {
  // Each submenu opens as one more .monaco-menu; the newest is the last one.
  for (const [level, label] of labels.entries()) {
    const menu = page.locator('.context-view.monaco-menu-container .monaco-menu').nth(level);
    const item = menu.locator('.action-menu-item').filter({ has: page.locator('.action-label', { hasText: exactly(label) }) }).first();
    await item.waitFor({ state: 'visible', timeout: timeoutMs }).catch(async () => {
      const shown = await menu.locator('.action-menu-item .action-label').allInnerTexts().catch(() => []);
      await page.keyboard.press('Escape');
      throw new Error(`no context-menu entry "${label}"; the menu showed: ${JSON.stringify(shown)}`);
    });
    // VS Code's menus act on a mouseup over an item that the pointer has
    // focused; Playwright's click() on the editor's menu (drawn in a shadow
    // root) left it open, so this moves, waits for the focus, then presses.
    await item.hover();
    const focusDeadline = Date.now() + timeoutMs;
    while (!(await item.evaluate((el: BrowserElement) => el.parentElement?.classList.contains('focused') ?? false))) {
      if (Date.now() > focusDeadline) throw new Error(`context-menu entry "${label}" did not take the focus`);
      await sleep(50);
    }
    if (level < labels.length - 1) continue;
    const box = await item.boundingBox();
    if (!box) throw new Error(`context-menu entry "${label}" has no box`);
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.up();
  }
  // Menu containers (one more per open submenu) stay in the DOM, emptied and hidden.
  const open = page.locator('.context-view.monaco-menu-container').filter({ visible: true }).first();
  // A loaded clean-clone run once left the menu open after the press, its entry still focused: the menu acts
  // on an item only when it closes, so while it is open nothing ran, and Enter on the focused entry is safe.
  if (!(await open.waitFor({ state: 'hidden', timeout: Math.min(3_000, timeoutMs) }).then(() => true, () => false))) {
    await page.keyboard.press('Enter');
    await open.waitFor({ state: 'hidden', timeout: timeoutMs });
  }
}

function exactly(text: string): RegExp {
  return new RegExp(`^${text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}$`);
}

function cssString(text: string): string {
  return text.replace(/["\\]/g, '\\$&');
}
