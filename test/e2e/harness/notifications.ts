import { Locator, Page } from 'playwright-core';
import { BrowserElement } from './dom';
import { sleep } from './processes';

export interface Notification {
  message: string;
  /** The extension or component the notification names as its source, if shown. */
  source: string;
  severity: 'error' | 'warning' | 'info';
  buttons: string[];
}

// Toasts are the notifications on screen; VS Code hides info toasts after a
// while, so a test that looks late should use the notification center instead.
const TOAST = '.notifications-toasts .notification-toast';

/** The notification toasts on screen now, newest first as VS Code stacks them. */
export async function notifications(page: Page): Promise<Notification[]> {
  return readItems(page.locator(TOAST).filter({ visible: true }));
}

/** Every notification of this window, read from the notification center (opened and closed again). */
export async function allNotifications(page: Page): Promise<Notification[]> {
  const center = page.locator('.notifications-center');
  const wasVisible = await center.isVisible();
  if (!wasVisible) await page.locator('[id="status.notifications"]').click();
  await center.waitFor({ state: 'visible' });
  const items = await readItems(center.locator('.notification-list-item'));
  if (!wasVisible) await page.locator('[id="status.notifications"]').click();
  return items;
}

/** Waits for a toast whose message matches, and returns it. */
export async function waitForNotification(page: Page, match: string | RegExp, timeoutMs = 30_000): Promise<Notification> {
  const deadline = Date.now() + timeoutMs;
  let seen: Notification[] = [];
  while (Date.now() < deadline) {
    seen = await notifications(page);
    const found = seen.find((n) => (typeof match === 'string' ? n.message.includes(match) : match.test(n.message)));
    if (found) return found;
    await sleep(200);
  }
  throw new Error(`no notification matching ${match} within ${timeoutMs} ms; on screen: ${JSON.stringify(seen.map((n) => n.message))}`);
}

/** Clicks a button ("Open", "Retry") on the toast whose message matches. */
export async function clickNotificationButton(page: Page, match: string | RegExp, button: string): Promise<void> {
  const toast = page.locator(TOAST).filter({ visible: true }).filter({ has: page.locator('.notification-list-item-message', { hasText: match }) }).first();
  await toast.locator('.notification-list-item-buttons-container .monaco-button', { hasText: button }).first().click();
}

async function readItems(items: Locator): Promise<Notification[]> {
  return items.evaluateAll((elements: BrowserElement[]) =>
    elements.map((el) => {
      const icon = el.querySelector('.notification-list-item-icon')?.className ?? '';
      const severity: 'error' | 'warning' | 'info' = /codicon-error/.test(icon) ? 'error' : /codicon-warning/.test(icon) ? 'warning' : 'info';
      return {
        message: el.querySelector('.notification-list-item-message')?.innerText.trim() ?? '',
        source: el.querySelector('.notification-list-item-source')?.innerText.trim() ?? '',
        severity,
        buttons: [...el.querySelectorAll('.notification-list-item-buttons-container .monaco-button')].map((b) => b.innerText.trim()),
      };
    }),
  );
}
