import { Page } from 'playwright-core';

// Modal dialogs (an extension's showInformationMessage with { modal: true },
// or VS Code's own questions) block every click on the workbench until they
// are answered, so a test that causes one must read it and press a button.

export interface Dialog {
  message: string;
  detail: string;
  buttons: string[];
}

const BOX = '.monaco-dialog-box';

export async function waitForDialog(page: Page, timeoutMs = 15_000): Promise<Dialog> {
  const box = page.locator(BOX);
  await box.waitFor({ state: 'visible', timeout: timeoutMs });
  const text = async (selector: string) => ((await box.locator(selector).count()) > 0 ? (await box.locator(selector).innerText()).trim() : '');
  const message = await text('.dialog-message-text');
  const detail = await text('.dialog-message-detail');
  return {
    // The web workbench shows a message without a detail in the detail slot.
    message: message || detail,
    detail: message ? detail : '',
    buttons: (await box.locator('.dialog-buttons .monaco-button').allInnerTexts()).map((b) => b.trim()),
  };
}

/** Presses a button of the open dialog by its label and waits for the dialog to close. */
export async function answerDialog(page: Page, button: string, timeoutMs = 15_000): Promise<void> {
  const box = page.locator(BOX);
  await box.waitFor({ state: 'visible', timeout: timeoutMs });
  await box.locator('.dialog-buttons .monaco-button', { hasText: button }).first().click();
  await box.waitFor({ state: 'detached', timeout: timeoutMs });
}
