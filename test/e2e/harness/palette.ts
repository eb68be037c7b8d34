import { Locator, Page } from 'playwright-core';
import { BrowserElement } from './dom';
import { sleep } from './processes';

const WIDGET = '.quick-input-widget';

/**
 * Runs a command the way a person does: F1, type its title, Enter.
 * `title` is the full title as the palette shows it ("View: Toggle Word Wrap").
 * Fuzzy matching often ranks another command first (typing "Markdown: Open
 * Preview" focuses "...Open Locked Preview to the Side"), so this waits for the
 * row whose label is exactly `title` and moves the focus to it before Enter.
 */
export async function runCommand(page: Page, title: string, timeoutMs = 15_000): Promise<void> {
  const widget = page.locator(WIDGET);
  const row = exactRow(widget, title);
  const deadline = Date.now() + timeoutMs;
  // An extension's commands join the palette only once the extension host has
  // registered that extension, which can be a little after the window is
  // ready; an open palette does not pick them up, so it is opened afresh.
  for (;;) {
    await page.keyboard.press('F1');
    await widget.waitFor({ state: 'visible', timeout: Math.max(1, deadline - Date.now()) });
    await widget.locator('.quick-input-box input').fill(`>${title}`);
    const found = await row
      .waitFor({ state: 'visible', timeout: Math.max(1, Math.min(3_000, deadline - Date.now())) })
      .then(() => true, () => false);
    if (found) break;
    const shown = await widget.locator('.quick-input-list .monaco-list-row .label-name').allInnerTexts();
    await page.keyboard.press('Escape');
    await widget.waitFor({ state: 'hidden' });
    if (Date.now() >= deadline) {
      throw new Error(`no command titled "${title}" in the palette; it showed: ${JSON.stringify(shown)}`);
    }
  }
  while (!(await row.evaluate((el: BrowserElement) => el.classList.contains('focused')))) {
    if (Date.now() > deadline) throw new Error(`could not focus the palette row "${title}"`);
    await page.keyboard.press('ArrowDown');
  }
  await page.keyboard.press('Enter');
}

/** Picks an entry in an open quick pick (one a command opened), by its exact label. */
export async function pickQuickItem(page: Page, label: string, timeoutMs = 15_000): Promise<void> {
  const widget = page.locator(WIDGET);
  await widget.waitFor({ state: 'visible', timeout: timeoutMs });
  const row = exactRow(widget, label);
  await row.waitFor({ state: 'visible', timeout: timeoutMs });
  await row.click();
}

/** Types into the open quick input (an input box a command opened) and confirms with Enter. */
export async function answerInputBox(page: Page, text: string, timeoutMs = 15_000): Promise<void> {
  const input = page.locator(`${WIDGET} .quick-input-box input`);
  await input.waitFor({ state: 'visible', timeout: timeoutMs });
  await input.fill(text);
  await page.keyboard.press('Enter');
}

/**
 * Answers the workbench's own file dialog (the web workbench has no native
 * one: showSaveDialog / showOpenDialog become a quick input holding a path).
 * That dialog opens on the folder and fills in the suggested name a moment
 * later, overwriting anything typed before; it also re-reads the folder as the
 * path changes and ignores an Enter that comes before it has caught up. So:
 * wait for its own value to settle, type, check the path stuck, and repeat
 * Enter until the dialog closes.
 */
export async function answerFileDialog(page: Page, filePath: string, timeoutMs = 15_000): Promise<void> {
  const widget = page.locator(WIDGET);
  const input = widget.locator('.quick-input-box input');
  await input.waitFor({ state: 'visible', timeout: timeoutMs });
  const deadline = Date.now() + timeoutMs;
  let last = await input.inputValue();
  let stableSince = Date.now();
  while (Date.now() - stableSince < 500) {
    await sleep(50);
    const now = await input.inputValue();
    if (now !== last) [last, stableSince] = [now, Date.now()];
    if (Date.now() > deadline) throw new Error('the file dialog kept changing its path');
  }
  for (;;) {
    if ((await input.inputValue()) !== filePath) await input.fill(filePath);
    await sleep(300);
    if ((await input.inputValue()) === filePath) {
      await page.keyboard.press('Enter');
      const closed = await widget.waitFor({ state: 'hidden', timeout: 2_000 }).then(() => true, () => false);
      if (closed) return;
    }
    if (Date.now() > deadline) throw new Error(`the file dialog did not accept ${filePath} (it shows ${await input.inputValue().catch(() => '?')})`);
  }
}

function exactRow(widget: Locator, label: string): Locator {
  return widget
    .locator('.quick-input-list .monaco-list-row')
    .filter({ has: widget.page().locator('.label-name', { hasText: new RegExp(`^${escapeRegExp(label)}$`) }) })
    .first();
}

export function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
