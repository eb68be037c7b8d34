// Loads the built panel bundle in headless Chromium inside a page that behaves like a VS Code
// webview from the panel's point of view: a nonce CSP, theme variables on <html>, a theme class on
// <body>, and an acquireVsCodeApi stub that records posted messages and keeps state across reloads.
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import type { HostMessage, HostToPanel, PanelToHost } from '../../src/protocol/messages';

export const ROOT = path.resolve(__dirname, '..', '..', '..');
export const ARTIFACTS = path.join(ROOT, '.artifacts', 'webview');
const CHROMIUM = '/usr/bin/chromium';
const ORIGIN = 'http://copse.test';
const NONCE = 'c0pse7e5tn0nce';

export type ThemeName = 'dark' | 'light' | 'high-contrast';

// Approximations of VS Code's default theme colours, written from memory: what matters here is a
// dark, a light and a black background with matching text, not the exact shades.
export const THEMES: Record<ThemeName, { bodyClass: string; vars: Record<string, string> }> = {
  dark: {
    bodyClass: 'vscode-dark',
    vars: {
      '--vscode-editor-background': '#1e1e1e',
      '--vscode-sideBar-background': '#1b1b1b',
      '--vscode-foreground': '#cccccc',
      '--vscode-editor-foreground': '#d4d4d4',
      '--vscode-descriptionForeground': '#9d9d9d',
      '--vscode-panel-border': '#3a3a3a',
      '--vscode-focusBorder': '#0078d4',
      '--vscode-textLink-foreground': '#4daafc',
      '--vscode-errorForeground': '#f85149',
      '--vscode-editorWarning-foreground': '#cca700',
      '--vscode-font-family': 'system-ui, "DejaVu Sans", sans-serif',
      '--vscode-font-size': '13px',
      '--vscode-editor-font-family': '"DejaVu Sans Mono", monospace',
      '--vscode-settings-dropdownBackground': '#313131',
      '--vscode-settings-dropdownForeground': '#cccccc',
      '--vscode-settings-dropdownBorder': '#3c3c3c',
      '--vscode-settings-textInputBackground': '#313131',
      '--vscode-settings-textInputForeground': '#cccccc',
      '--vscode-settings-checkboxBackground': '#313131',
      '--vscode-button-background': '#0078d4',
      '--vscode-button-foreground': '#ffffff',
    },
  },
  light: {
    bodyClass: 'vscode-light',
    vars: {
      '--vscode-editor-background': '#ffffff',
      '--vscode-sideBar-background': '#f8f8f8',
      '--vscode-foreground': '#3b3b3b',
      '--vscode-editor-foreground': '#3b3b3b',
      '--vscode-descriptionForeground': '#6f6f6f',
      '--vscode-panel-border': '#d8d8d8',
      '--vscode-focusBorder': '#005fb8',
      '--vscode-textLink-foreground': '#005fb8',
      '--vscode-errorForeground': '#c72e0f',
      '--vscode-editorWarning-foreground': '#bf8803',
      '--vscode-font-family': 'system-ui, "DejaVu Sans", sans-serif',
      '--vscode-font-size': '13px',
      '--vscode-editor-font-family': '"DejaVu Sans Mono", monospace',
      '--vscode-settings-dropdownBackground': '#ffffff',
      '--vscode-settings-dropdownForeground': '#3b3b3b',
      '--vscode-settings-dropdownBorder': '#cecece',
      '--vscode-settings-dropdownListBorder': '#c8c8c8',
      '--vscode-settings-textInputBackground': '#ffffff',
      '--vscode-settings-textInputForeground': '#3b3b3b',
      '--vscode-settings-textInputBorder': '#cecece',
      '--vscode-settings-checkboxBackground': '#f8f8f8',
      '--vscode-settings-checkboxBorder': '#cecece',
      '--vscode-settings-checkboxForeground': '#3b3b3b',
      '--vscode-list-activeSelectionBackground': '#e8e8e8',
      '--vscode-list-activeSelectionForeground': '#000000',
      '--vscode-list-hoverBackground': '#f2f2f2',
      '--vscode-button-background': '#005fb8',
      '--vscode-button-foreground': '#ffffff',
    },
  },
  'high-contrast': {
    bodyClass: 'vscode-high-contrast',
    vars: {
      '--vscode-editor-background': '#000000',
      '--vscode-sideBar-background': '#000000',
      '--vscode-foreground': '#ffffff',
      '--vscode-editor-foreground': '#ffffff',
      '--vscode-descriptionForeground': '#ffffff',
      '--vscode-contrastBorder': '#6fc3df',
      '--vscode-panel-border': '#6fc3df',
      '--vscode-focusBorder': '#f38518',
      '--vscode-textLink-foreground': '#21a6ff',
      '--vscode-errorForeground': '#f48771',
      '--vscode-editorWarning-foreground': '#ffd370',
      '--vscode-font-family': 'system-ui, "DejaVu Sans", sans-serif',
      '--vscode-font-size': '13px',
      '--vscode-editor-font-family': '"DejaVu Sans Mono", monospace',
      '--vscode-settings-dropdownBackground': '#000000',
      '--vscode-settings-dropdownForeground': '#ffffff',
      '--vscode-settings-dropdownBorder': '#6fc3df',
      '--vscode-settings-textInputBackground': '#000000',
      '--vscode-settings-textInputForeground': '#ffffff',
      '--vscode-settings-textInputBorder': '#6fc3df',
      '--vscode-settings-checkboxBackground': '#000000',
      '--vscode-settings-checkboxBorder': '#6fc3df',
      '--vscode-button-background': '#000000',
      '--vscode-button-foreground': '#ffffff',
      '--vscode-button-border': '#6fc3df',
    },
  },
};

function pageHtml(theme: ThemeName): string {
  const t = THEMES[theme];
  // The stub runs before the bundle, as VS Code's own preload does; theme variables are set from
  // script because the CSP (like the real panel's) forbids inline style attributes.
  const stub = `
    window.__posted = [];
    window.__applyTheme = function (t) {
      const root = document.documentElement;
      for (const k of Object.keys(t.vars)) root.style.setProperty(k, t.vars[k]);
      document.body.className = t.bodyClass;
    };
    window.acquireVsCodeApi = (function () {
      let used = false;
      return function () {
        if (used) throw new Error('acquireVsCodeApi called twice');
        used = true;
        return {
          postMessage: function (m) { window.__posted.push(JSON.parse(JSON.stringify(m))); },
          getState: function () { const s = sessionStorage.getItem('copse-state'); return s === null ? undefined : JSON.parse(s); },
          setState: function (s) { sessionStorage.setItem('copse-state', JSON.stringify(s)); },
        };
      };
    })();
    window.__applyTheme(${JSON.stringify(t)});
  `;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src ${ORIGIN} data:; style-src ${ORIGIN}; font-src ${ORIGIN}; script-src 'nonce-${NONCE}';">
<meta name="viewport" content="width=device-width, initial-scale=1">
<link rel="stylesheet" href="${ORIGIN}/media/panel.css">
<title>Copse panel test</title>
</head>
<body>
<script nonce="${NONCE}">${stub}</script>
<script nonce="${NONCE}" src="${ORIGIN}/media/panel.js"></script>
</body>
</html>`;
}

async function waitForChromium(): Promise<void> {
  // Chromium may still be installing when the suite starts on a fresh machine.
  for (let i = 0; i < 600 && !fs.existsSync(CHROMIUM); i++) await new Promise((r) => setTimeout(r, 1000));
  if (!fs.existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} did not appear; install Debian's chromium package`);
}

let built = false;

/** Builds media/panel.js once per run so the tests never exercise a stale bundle. */
export async function buildBundle(): Promise<void> {
  if (built) return;
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const { buildPanel } = require(path.join(ROOT, 'webview', 'build.js')) as { buildPanel: (o?: object) => Promise<unknown> };
  await buildPanel({ sourcemap: false });
  built = true;
}

export class PanelPage {
  readonly errors: string[] = [];
  /** The fit the last summary sent belongs to; `send` stamps other messages with it. */
  private fit: string | null = null;

  private constructor(
    readonly context: BrowserContext,
    readonly page: Page,
    private readonly profile: string,
  ) {}

  static async open(theme: ThemeName = 'dark', viewport = { width: 1280, height: 1000 }): Promise<PanelPage> {
    await waitForChromium();
    await buildBundle();
    const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-webview-'));
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      headless: true,
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--no-first-run',
      ],
      viewport,
      deviceScaleFactor: 1,
    });
    const page = context.pages()[0] ?? (await context.newPage());
    const p = new PanelPage(context, page, profile);
    page.on('pageerror', (e) => p.errors.push(`pageerror: ${e.message}`));
    page.on('console', (m) => {
      if (m.type() === 'error') p.errors.push(`console: ${m.text()}`);
    });
    // Nothing may leave the machine: anything not served here fails the request.
    await context.route('**/*', async (route) => {
      const url = new URL(route.request().url());
      if (url.origin !== ORIGIN) return route.abort();
      if (url.pathname === '/panel.html') return route.fulfill({ contentType: 'text/html', body: pageHtml(theme) });
      const file = path.join(ROOT, url.pathname);
      if (url.pathname.startsWith('/media/') && fs.existsSync(file)) {
        return route.fulfill({ contentType: file.endsWith('.css') ? 'text/css' : 'text/javascript', body: fs.readFileSync(file) });
      }
      return route.fulfill({ status: 404, body: 'not found' });
    });
    await page.goto(`${ORIGIN}/panel.html`);
    await p.waitForPosted((m) => m.type === 'ready');
    return p;
  }

  /**
   * Posts host messages into the page. A message without a `fit` is stamped with the fit of the last
   * summary sent (a summary with its own), as the host stamps every message; give `fit` to send a stray one.
   */
  async send(...unstamped: Array<HostMessage & { fit?: string | null }>): Promise<void> {
    const messages: HostToPanel[] = unstamped.map((m) => {
      if (m.type === 'summary' && m.fit === undefined) this.fit = (m.summary as { fit?: string }).fit ?? null;
      return m.fit === undefined ? { ...m, fit: this.fit } : (m as HostToPanel);
    });
    // postMessage from the page itself, as the host's messages arrive in a real webview.
    await this.page.evaluate((ms) => {
      const w = globalThis as unknown as { postMessage(m: unknown, target: string): void };
      for (const m of ms) w.postMessage(m, '*');
    }, messages);
    // Let the message events run before the caller inspects the DOM.
    await this.page.evaluate(() => new Promise((r) => setTimeout(r, 50)));
  }

  async posted(): Promise<PanelToHost[]> {
    return await this.page.evaluate<PanelToHost[]>('window.__posted');
  }

  async clearPosted(): Promise<void> {
    await this.page.evaluate('window.__posted.length = 0');
  }

  async waitForPosted(pred: (m: PanelToHost) => boolean, timeoutMs = 5000): Promise<PanelToHost> {
    const end = Date.now() + timeoutMs;
    for (;;) {
      const found = (await this.posted()).find(pred);
      if (found) return found;
      if (Date.now() > end) throw new Error(`panel did not post the expected message; posted: ${JSON.stringify(await this.posted())}`);
      await new Promise((r) => setTimeout(r, 50));
    }
  }

  async setTheme(theme: ThemeName): Promise<void> {
    await this.page.evaluate((t) => (globalThis as unknown as { __applyTheme(x: unknown): void }).__applyTheme(t), THEMES[theme]);
    await this.page.evaluate(() => new Promise((r) => setTimeout(r, 100)));
  }

  async screenshot(name: string): Promise<string> {
    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const file = path.join(ARTIFACTS, name);
    await this.page.screenshot({ path: file, fullPage: true });
    return file;
  }

  /** One element only, for reviewing a section at full size. */
  async screenshotOf(selector: string, name: string): Promise<string> {
    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const file = path.join(ARTIFACTS, name);
    await this.page.locator(selector).screenshot({ path: file });
    return file;
  }

  async close(): Promise<void> {
    await this.context.close();
    fs.rmSync(this.profile, { recursive: true, force: true });
  }
}
