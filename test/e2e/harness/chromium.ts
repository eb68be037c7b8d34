import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { BrowserContext, chromium } from 'playwright-core';
import { CHROMIUM_PATH } from './paths';
import { processesMentioning, signal, sleep } from './processes';

// Debian's Chromium; Playwright must never download a browser of its own.
// Without the background-networking flags Chromium keeps trying Google's
// services, and this machine's closed network refuses each attempt.
const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--no-default-browser-check',
];

export interface BrowserSession {
  readonly context: BrowserContext;
  /** Chromium's processes (browser, renderers, GPU, zygotes), found by their profile folder. */
  processes(): number[];
  close(): Promise<void>;
}

/** A headless Chromium with a new, empty profile, deleted again on close. */
export async function launchChromium(viewport: { width: number; height: number }): Promise<BrowserSession> {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(`no Chromium at ${CHROMIUM_PATH}; run: bash scripts/e2e/setup.sh`);
  }
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-chromium-'));
  // A persistent context is the only way Playwright lets a profile folder be
  // chosen; it also gives the workbench real IndexedDB storage across reloads.
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport,
    // The workbench reads the clipboard for paste; grant it so no permission prompt appears.
    permissions: ['clipboard-read', 'clipboard-write'],
  });
  const processes = () => processesMentioning(profile);
  return {
    context,
    processes,
    close: async () => {
      await context.close();
      // Playwright resolves once the browser process is gone; its helpers
      // (zygotes, crashpad) can outlive it for a moment, or hang.
      const deadline = Date.now() + 5_000;
      while (processes().length > 0 && Date.now() < deadline) await sleep(100);
      signal(processes(), 'SIGKILL');
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}
