import { Frame, FrameLocator, Locator, Page } from 'playwright-core';

// How VS Code 1.100 (as served by code-server) nests a webview's content:
//
//   <div id="{webview uuid}">                       overlay placed over the editor or view
//     <iframe class="webview ready" name="{uuid}"    the host frame; "ready" once its
//       src=".../webview/browser/pre/index.html        script has connected to the workbench
//            ?id={uuid}&extensionId={publisher.name}&purpose=...">
//       <iframe id="active-frame">                   the extension's own HTML (loaded as
//                                                    pending-frame, renamed once shown)
//
// Webviews that are hidden but retained keep their iframes with
// visibility:hidden, so the visible host frame is the one on screen. The
// workbench also has an unrelated iframe.web-worker-ext-host-iframe, which the
// "webview" class filter excludes.

export interface WebviewQuery {
  /** The owning extension, "publisher.name" (e.g. "vscode.markdown-language-features"). */
  extensionId?: string;
  /** Which of several matching, visible webviews (0 = first in the DOM). */
  index?: number;
}

function hostFrames(page: Page, query: WebviewQuery): Locator {
  const bySource = query.extensionId ? `[src*="extensionId=${encodeURIComponent(query.extensionId)}&"]` : '';
  return page.locator(`iframe.webview.ready${bySource}`).filter({ visible: true });
}

/**
 * The content of a webview as a FrameLocator: it re-resolves on every use, so
 * it survives the webview being re-rendered or the window being reloaded.
 */
export function webview(page: Page, query: WebviewQuery = {}): FrameLocator {
  return hostFrames(page, query)
    .nth(query.index ?? 0)
    .contentFrame()
    .locator('iframe#active-frame')
    .contentFrame();
}

/**
 * The content of a webview as a Frame, for evaluate() and the like. It is tied
 * to one document: when the webview reloads its HTML, ask again.
 */
export async function webviewFrame(page: Page, query: WebviewQuery = {}, timeoutMs = 30_000): Promise<Frame> {
  const host = hostFrames(page, query).nth(query.index ?? 0);
  await host.waitFor({ state: 'visible', timeout: timeoutMs });
  const hostFrame = await (await host.elementHandle()).contentFrame();
  if (!hostFrame) throw new Error('webview host iframe has no frame');
  const inner = await hostFrame.waitForSelector('iframe#active-frame', { state: 'attached', timeout: timeoutMs });
  const content = await inner.contentFrame();
  if (!content) throw new Error('webview content iframe has no frame');
  await content.waitForLoadState('domcontentloaded', { timeout: timeoutMs });
  return content;
}
