// What every e2e suite does after a failed test: keep a screenshot of the workbench as it was, and close
// whatever dialog or quick pick the failure left open, so the next test starts from a usable window.
import type { Workbench } from '../workbench';

export async function recordFailure(wb: Workbench | undefined, test: Mocha.Test | undefined): Promise<void> {
  if (test?.state !== 'failed' || !wb) return;
  await wb.screenshot(`failed-${test.title}`).catch(() => undefined);
  await wb.page.keyboard.press('Escape').catch(() => undefined);
}
