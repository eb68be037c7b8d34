// The e2e harness: a real VS Code workbench (code-server) in headless
// Chromium, driven the way a person drives it. Install it first with
// `bash scripts/e2e/setup.sh`. The pieces live in ./harness, one concern each;
// this file puts them together behind one object.

import * as fs from 'fs';
import * as path from 'path';
import { FrameLocator, Frame, Page } from 'playwright-core';
import { BrowserSession, launchChromium } from './harness/chromium';
import { answerDialog, Dialog, waitForDialog } from './harness/dialogs';
import { BrowserElement } from './harness/dom';
import { CodeServer, startCodeServer } from './harness/codeServer';
import { hoverLine, HoverOptions, selectedText, selectLines, statusBarSelection, visibleLines } from './harness/editor';
import { explorerContextMenu, explorerContextMenuLabels, openFromExplorer, pickContextMenu, revealInExplorer } from './harness/explorer';
import { allNotifications, clickNotificationButton, Notification, notifications, waitForNotification } from './harness/notifications';
import { answerFileDialog, answerInputBox, escapeRegExp, pickQuickItem, runCommand } from './harness/palette';
import { artifactsDir, safeName } from './harness/paths';
import { descendants, groupMembers, sleep } from './harness/processes';
import { webview, webviewFrame, WebviewQuery } from './harness/webview';

export { QUIET_SETTINGS } from './harness/codeServer';
export type { Dialog } from './harness/dialogs';
export type { Notification } from './harness/notifications';
export type { WebviewQuery } from './harness/webview';

export interface WorkbenchOptions {
  /** Names the artifacts folder (.artifacts/e2e/<name>/) for logs and screenshots. */
  name: string;
  /** The folder to open. */
  folder: string;
  /** User settings, laid over QUIET_SETTINGS. */
  settings?: Record<string, unknown>;
  /** .vsix files to install before the server starts (e.g. the one `npm run package` builds). */
  vsix?: string[];
  viewport?: { width: number; height: number };
  /** Keep code-server's temporary user-data and extensions folders (COPSE_E2E_KEEP=1 does too). */
  keepTemp?: boolean;
  /** Open the folder untrusted, in Restricted Mode (workspace trust on, no prompt). */
  restricted?: boolean;
}

export interface Timings {
  /** From launchWorkbench() until code-server answered /healthz (includes .vsix installs). */
  serverMs: number;
  /** From launchWorkbench() until waitForReady() first returned. */
  readyMs?: number;
}

export class Workbench {
  private shots = 0;
  private closed = false;
  private expectedExtensionHosts: number;

  private constructor(
    readonly page: Page,
    readonly server: CodeServer,
    private readonly browser: BrowserSession,
    readonly artifacts: string,
    readonly timings: Timings,
    private readonly startedAt: number,
  ) {
    this.expectedExtensionHosts = server.extensionHostLogs().length + 1;
  }

  /** Starts code-server on a free loopback port, opens its workbench in Chromium. Call waitForReady() next. */
  static async launch(options: WorkbenchOptions): Promise<Workbench> {
    const startedAt = Date.now();
    const artifacts = artifactsDir(options.name);
    const server = await startCodeServer({
      folder: options.folder,
      settings: options.restricted
        ? { ...options.settings, 'security.workspace.trust.enabled': true, 'security.workspace.trust.startupPrompt': 'never', 'security.workspace.trust.untrustedFiles': 'open' }
        : options.settings,
      restricted: options.restricted,
      vsix: options.vsix,
      logFile: path.join(artifacts, 'code-server.log'),
      keepTemp: options.keepTemp ?? process.env.COPSE_E2E_KEEP === '1',
    });
    const timings: Timings = { serverMs: Date.now() - startedAt };
    let browser: BrowserSession | undefined;
    try {
      browser = await launchChromium(options.viewport ?? { width: 1400, height: 900 });
      const page = browser.context.pages()[0] ?? (await browser.context.newPage());
      recordConsole(page, path.join(artifacts, 'browser-console.log'));
      const workbench = new Workbench(page, server, browser, artifacts, timings, startedAt);
      await page.goto(server.folderUrl);
      return workbench;
    } catch (error) {
      await browser?.close().catch(() => undefined);
      await server.stop();
      throw error;
    }
  }

  /**
   * Waits until the workbench is usable: its layout is drawn, the explorer
   * lists the folder (so the folder must hold at least one file), the server
   * has started this window's extension host, and restored editors have loaded.
   * Extensions activate after that, on their own events: a test of one waits
   * for something that extension shows.
   */
  async waitForReady(timeoutMs = 120_000): Promise<void> {
    const deadline = Date.now() + timeoutMs;
    const remaining = () => Math.max(1, deadline - Date.now());
    await this.page.locator('.monaco-workbench .part.statusbar').waitFor({ state: 'visible', timeout: remaining() });
    await this.page.locator('.explorer-folders-view .monaco-list-row').first().waitFor({ state: 'visible', timeout: remaining() });
    // Each window load starts its own extension host, which logs on the
    // server when its start-up (eager) extensions are done.
    while (!this.extensionHostStarted()) {
      if (Date.now() > deadline) throw new Error(`the extension host did not start within ${timeoutMs} ms; see ${this.server.logFile}`);
      await sleep(100);
    }
    // Editors restored after a reload load behind a progress bar at the top
    // of the editor area; until it stops their content is not there yet.
    await this.page
      .locator('.part.editor .monaco-progress-container.active')
      .first()
      .waitFor({ state: 'hidden', timeout: remaining() })
      .catch(() => {
        throw new Error(`the editor area still shows progress after ${timeoutMs} ms`);
      });
    this.timings.readyMs ??= Date.now() - this.startedAt;
  }

  /**
   * Waits until this window's extension host has activated `extensionId`
   * ("publisher.name"), as its log on the server records. Returns the
   * activation event that triggered it (e.g. "onLanguage:csv").
   */
  async waitForExtensionActivation(extensionId: string, timeoutMs = 60_000): Promise<string> {
    const pattern = new RegExp(`_doActivateExtension ${escapeRegExp(extensionId)}, .*activationEvent: '([^']*)'`);
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      const match = pattern.exec(this.currentExtensionHostLog());
      if (match) return match[1];
      if (Date.now() > deadline) throw new Error(`${extensionId} was not activated within ${timeoutMs} ms`);
      await sleep(100);
    }
  }

  /** This window's extension host log, as written so far ('' before it starts). */
  currentExtensionHostLog(): string {
    const logs = this.server.extensionHostLogs();
    return logs.length >= this.expectedExtensionHosts ? fs.readFileSync(logs[logs.length - 1], 'utf8') : '';
  }

  private extensionHostStarted(): boolean {
    return /Eager extensions activated/.test(this.currentExtensionHostLog());
  }

  /** Runs a command by its palette title: F1, type, Enter. */
  runCommand(title: string): Promise<void> {
    return runCommand(this.page, title);
  }

  /** Picks an item by its exact label in a quick pick that a command opened. */
  pickQuickItem(label: string): Promise<void> {
    return pickQuickItem(this.page, label);
  }

  /** Types an answer into an input box that a command opened, then Enter. */
  answerInputBox(text: string): Promise<void> {
    return answerInputBox(this.page, text);
  }

  /** Types a path into the workbench's file dialog (what showSaveDialog/showOpenDialog open in the web) and accepts it. */
  answerFileDialog(filePath: string): Promise<void> {
    return answerFileDialog(this.page, filePath);
  }

  /** Opens `relativePath` (from the opened folder) by clicking it in the explorer. */
  openFile(relativePath: string, options: { pin?: boolean } = {}): Promise<void> {
    return openFromExplorer(this.page, relativePath, options);
  }

  /** Shows the explorer row of `relativePath`, expanding folders as needed. */
  async revealInExplorer(relativePath: string): Promise<void> {
    await revealInExplorer(this.page, relativePath);
  }

  /** Right-clicks an explorer item and picks a menu entry; more labels walk into submenus. */
  explorerContextMenu(relativePath: string, ...labels: string[]): Promise<void> {
    return explorerContextMenu(this.page, relativePath, ...labels);
  }

  /** The entries of an explorer item's context menu, read and closed again. */
  explorerContextMenuLabels(relativePath: string): Promise<string[]> {
    return explorerContextMenuLabels(this.page, relativePath);
  }

  /**
   * Right-clicks the start of `line` in the active editor and picks a menu
   * entry. Outside a selection the right-click moves the cursor there; inside
   * one (selectLines first) the entries act on the selection.
   */
  async editorContextMenu(line: number, ...labels: string[]): Promise<void> {
    const lines = this.page.locator('.editor-group-container.active .monaco-editor .view-lines');
    const gutterNumber = this.page
      .locator('.editor-group-container.active .monaco-editor .margin-view-overlays .line-numbers', { hasText: new RegExp(`^${line}$`) })
      .first();
    const linesBox = await lines.boundingBox();
    const numberBox = await gutterNumber.boundingBox();
    if (!linesBox || !numberBox) throw new Error(`line ${line} is not on screen`);
    await lines.click({ button: 'right', position: { x: 5, y: numberBox.y - linesBox.y + numberBox.height / 2 } });
    await pickContextMenu(this.page, labels);
  }

  /** Clicks the editor tab titled `title` (a file name, or a webview panel's title). */
  async activateTab(title: string): Promise<void> {
    const tab = this.page
      .locator('.tabs-container .tab')
      .filter({ has: this.page.locator('.label-name', { hasText: new RegExp(`^${escapeRegExp(title)}$`) }) })
      .first();
    await tab.click();
    await this.page.waitForFunction((el: BrowserElement | null) => el?.classList.contains('active') ?? false, await tab.elementHandle());
  }

  /** Hovers a line of the active editor and returns the hover's text. */
  hoverLine(line: number, options?: HoverOptions): Promise<string> {
    return hoverLine(this.page, line, options);
  }

  /** Selects whole lines from..to (inclusive) with gutter clicks; returns the status bar selection text. */
  selectLines(from: number, to: number): Promise<string> {
    return selectLines(this.page, from, to);
  }

  selectedText(): Promise<string> {
    return selectedText(this.page);
  }

  statusBarSelection(): Promise<string> {
    return statusBarSelection(this.page);
  }

  /** The rendered lines of the active editor, in order (only those in view). */
  visibleLines(): Promise<string[]> {
    return visibleLines(this.page);
  }

  /** A webview's content, re-resolved on each use (see harness/webview.ts for the iframe layout). */
  webview(query?: WebviewQuery): FrameLocator {
    return webview(this.page, query);
  }

  /** A webview's content document as a Frame, for evaluate(). */
  webviewFrame(query?: WebviewQuery): Promise<Frame> {
    return webviewFrame(this.page, query);
  }

  notifications(): Promise<Notification[]> {
    return notifications(this.page);
  }

  allNotifications(): Promise<Notification[]> {
    return allNotifications(this.page);
  }

  waitForNotification(match: string | RegExp, timeoutMs?: number): Promise<Notification> {
    return waitForNotification(this.page, match, timeoutMs);
  }

  clickNotificationButton(match: string | RegExp, button: string): Promise<void> {
    return clickNotificationButton(this.page, match, button);
  }

  /** Waits for a modal dialog and returns its message and buttons. */
  waitForDialog(timeoutMs?: number): Promise<Dialog> {
    return waitForDialog(this.page, timeoutMs);
  }

  /** Presses a button of the open modal dialog. */
  answerDialog(button: string): Promise<void> {
    return answerDialog(this.page, button);
  }

  /**
   * Reloads the window the way a person does, with Developer: Reload Window,
   * and waits until it is ready again (a new extension host starts). That
   * command has the workbench write its state (open editors, webview panels
   * and their saved state) to storage before the page goes. `browser: true`
   * reloads the page instead, as F5 in the browser would: the web workbench
   * writes that state to IndexedDB asynchronously and unloading does not wait,
   * so editors opened in the last seconds may not come back.
   */
  async reload(options: { browser?: boolean; timeoutMs?: number } = {}): Promise<void> {
    this.expectedExtensionHosts = this.server.extensionHostLogs().length + 1;
    if (options.browser) {
      await this.page.reload();
    } else {
      const loaded = this.page.waitForEvent('load', { timeout: options.timeoutMs ?? 120_000 });
      await this.runCommand('Developer: Reload Window');
      await loaded;
    }
    await this.waitForReady(options.timeoutMs);
  }

  /** Saves a PNG of the window into the artifacts folder and returns its path. */
  async screenshot(name: string): Promise<string> {
    this.shots += 1;
    const file = path.join(this.artifacts, `${String(this.shots).padStart(2, '0')}-${safeName(name)}.png`);
    await this.page.screenshot({ path: file });
    return file;
  }

  /** Every process this workbench runs now: code-server's tree and Chromium's. */
  processes(): number[] {
    const pid = this.server.pid;
    return [...new Set([pid, ...descendants(pid), ...groupMembers(pid), ...this.browser.processes()])];
  }

  /** Closes Chromium and stops code-server and every process it started. Safe to call twice. */
  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    const errors: unknown[] = [];
    await this.browser.close().catch((error) => errors.push(error));
    // The server's logs (each extension host's, and every extension's output
    // channel) go with the temporary user-data folder; keep them for reading.
    try {
      fs.cpSync(path.join(this.server.userDataDir, 'logs'), path.join(this.artifacts, 'server-logs'), { recursive: true });
    } catch {
      // no logs written yet
    }
    await this.server.stop().catch((error) => errors.push(error));
    if (errors.length > 0) throw errors[0];
  }

}

export function launchWorkbench(options: WorkbenchOptions): Promise<Workbench> {
  return Workbench.launch(options);
}

function recordConsole(page: Page, file: string): void {
  fs.writeFileSync(file, '');
  page.on('console', (message) => fs.appendFileSync(file, `[${message.type()}] ${message.text()}\n`));
  page.on('pageerror', (error) => fs.appendFileSync(file, `[pageerror] ${error.stack ?? error.message}\n`));
  // A window with unsaved editors asks before it unloads; a reload in a test means to go ahead.
  page.on('dialog', (dialog) => void (dialog.type() === 'beforeunload' ? dialog.accept() : dialog.dismiss()));
}
