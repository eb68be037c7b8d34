import { Locator, Page } from 'playwright-core';
import { BrowserElement } from './dom';
import { sleep } from './processes';

// Monaco renders only the lines in view, and not in DOM order: each
// .view-line is placed by its style.top. The gutter's .line-numbers carry the
// real line number at the same top, so that is how a line is found.

/** The text editor in the active editor group. */
export function activeEditor(page: Page): Locator {
  return page.locator('.editor-group-container.active .editor-instance .monaco-editor').first();
}

interface LineGeometry {
  /** Box of the rendered text of the line (zero width for an empty line). */
  text: { x: number; y: number; width: number; height: number };
  /** Box of the line number in the gutter. */
  gutter: { x: number; y: number; width: number; height: number };
  content: string;
}

/** Moves the cursor to `line` with Go to Line, so Monaco renders it. */
export async function revealLine(page: Page, line: number): Promise<void> {
  // Focus the editor by clicking inside its visible box: the rendered lines' own box starts above the view
  // when the editor is scrolled down, and a click there lands outside the editor.
  await activeEditor(page).click({ position: { x: 80, y: 8 } });
  await page.keyboard.press('Control+G');
  const input = page.locator('.quick-input-widget .quick-input-box input');
  await input.waitFor({ state: 'visible' });
  await input.fill(`:${line}`);
  await page.keyboard.press('Enter');
  await page.locator('.quick-input-widget').waitFor({ state: 'hidden' });
}

async function lineGeometry(page: Page, line: number): Promise<LineGeometry | undefined> {
  return activeEditor(page).evaluate((editor: BrowserElement, wanted: number) => {
    const number = [...editor.querySelectorAll('.margin-view-overlays .line-numbers')].find(
      (el) => el.textContent?.trim() === String(wanted),
    );
    if (!number) return undefined;
    const top = number.parentElement!.style.top;
    const viewLine = [...editor.querySelectorAll('.view-lines .view-line')].find((el) => el.style.top === top);
    if (!viewLine) return undefined;
    const span = viewLine.firstElementChild;
    const box = (span ?? viewLine).getBoundingClientRect();
    const lineBox = viewLine.getBoundingClientRect();
    const gutter = number.getBoundingClientRect();
    return {
      text: { x: box.x, y: lineBox.y, width: span ? box.width : 0, height: lineBox.height },
      gutter: { x: gutter.x, y: gutter.y, width: gutter.width, height: gutter.height },
      content: viewLine.textContent ?? '',
    };
  }, line);
}

async function geometryOrReveal(page: Page, line: number): Promise<LineGeometry> {
  let geometry = await lineGeometry(page, line);
  if (!geometry) {
    await revealLine(page, line);
    geometry = await lineGeometry(page, line);
  }
  if (!geometry) throw new Error(`line ${line} is not rendered in the active editor (is a text editor active?)`);
  return geometry;
}

/** The lines Monaco currently renders, in line order (only those in view). */
export async function visibleLines(page: Page): Promise<string[]> {
  return activeEditor(page).evaluate((editor: BrowserElement) =>
    [...editor.querySelectorAll('.view-lines .view-line')]
      .sort((a, b) => parseFloat(a.style.top) - parseFloat(b.style.top))
      .map((el) => (el.textContent ?? '').replace(/\u00a0/g, ' ')),
  );
}

export interface HoverOptions {
  /** 1-based column to point at; defaults to the middle of the line's text. */
  column?: number;
  timeoutMs?: number;
}

/**
 * Rests the mouse on a line of the active editor and returns the text of the
 * hover that appears. Throws when none appears: a line without any hover
 * provider shows nothing. Assumes a monospace font without tabs for `column`.
 */
export async function hoverLine(page: Page, line: number, options: HoverOptions = {}): Promise<string> {
  const timeoutMs = options.timeoutMs ?? 10_000;
  const geometry = await geometryOrReveal(page, line);
  if (geometry.content.length === 0) throw new Error(`line ${line} is empty; there is nothing to hover`);
  const charWidth = geometry.text.width / geometry.content.length;
  const column = options.column ?? Math.ceil(geometry.content.length / 2);
  const x = geometry.text.x + charWidth * (Math.min(column, geometry.content.length) - 0.5);
  const y = geometry.text.y + geometry.text.height / 2;

  // A hover is computed once, when the mouse comes to rest; if the provider
  // was not ready then (an extension still activating, links not yet
  // detected), nothing shows until the mouse moves again. So: park the mouse
  // in the gutter (which also closes an earlier hover), come back, and repeat
  // until a hover shows or time is up.
  const hover = page.locator('.monaco-resizable-hover .monaco-hover:not(.hidden)');
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    await page.mouse.move(geometry.gutter.x + 2, y);
    await hover.waitFor({ state: 'hidden', timeout: Math.max(1, deadline - Date.now()) }).catch(() => undefined);
    await page.mouse.move(x, y);
    const shown = await hover
      .waitFor({ state: 'visible', timeout: Math.max(1, Math.min(2_000, deadline - Date.now())) })
      .then(() => true, () => false);
    if (shown) return settledText(hover.locator('.monaco-hover-content'), Math.max(1_000, deadline - Date.now()));
  }
  throw new Error(`no hover appeared on line ${line}, column ${column} within ${timeoutMs} ms`);
}

// Hover providers answer one by one and the widget first shows "Loading...";
// the text counts once it has stayed the same for a short while.
async function settledText(locator: Locator, timeoutMs: number): Promise<string> {
  const deadline = Date.now() + timeoutMs;
  let last = '';
  let stableSince = Date.now();
  while (Date.now() < deadline) {
    const text = (await locator.innerText().catch(() => '')).trim();
    if (text !== last) {
      last = text;
      stableSince = Date.now();
    } else if (text.length > 0 && !/^Loading\.\.\.$/.test(text) && Date.now() - stableSince >= 300) {
      return text;
    }
    await sleep(50);
  }
  throw new Error(`the hover text did not settle within ${timeoutMs} ms (last: ${JSON.stringify(last)})`);
}

/**
 * Selects whole lines `from`..`to` (inclusive) as a person does: click the
 * first line's number in the gutter, shift-click the last one's. Returns the
 * status bar's selection text, e.g. "Ln 5, Col 1 (42 selected)".
 */
export async function selectLines(page: Page, from: number, to: number): Promise<string> {
  const first = await geometryOrReveal(page, from);
  await page.mouse.click(first.gutter.x + first.gutter.width / 2, first.gutter.y + first.gutter.height / 2);
  const last = await geometryOrReveal(page, to);
  await page.keyboard.down('Shift');
  await page.mouse.click(last.gutter.x + last.gutter.width / 2, last.gutter.y + last.gutter.height / 2);
  await page.keyboard.up('Shift');
  return statusBarSelection(page);
}

/** The status bar entry showing cursor position and selection size. */
export async function statusBarSelection(page: Page): Promise<string> {
  const item = page.locator('[id="status.editor.selection"]');
  await item.waitFor({ state: 'visible' });
  return (await item.innerText()).trim();
}

/** The selected text of the active editor, read through the clipboard (Ctrl+C). */
export async function selectedText(page: Page): Promise<string> {
  await page.keyboard.press('Control+C');
  // A string, because this build has no DOM types for `navigator`.
  return page.evaluate<string>('navigator.clipboard.readText()');
}
