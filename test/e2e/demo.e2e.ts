// scripts/demo.sh (the README's `npm run demo`) on a machine without VS Code's
// `code` command: it must serve the demo folder in the bundled workbench with
// the packaged extension installed, at the address it prints, and stop again.
// The script's own build step is skipped (--no-build) after making sure the
// .vsix is current the way the other suites do; the packaging itself is
// exercised by them.

import * as assert from 'assert';
import { ChildProcess, spawn, spawnSync } from 'child_process';
import * as fs from 'fs';
import * as http from 'http';
import * as os from 'os';
import * as path from 'path';
import { BrowserSession, launchChromium } from './harness/chromium';
import { packagedVsix } from './harness/package';
import { repoRoot } from './harness/paths';
import { isAlive, sleep } from './harness/processes';
import { runCommand } from './harness/palette';
import { revealInExplorer } from './harness/explorer';

const ADDRESS = /^\s+(http:\/\/127\.0\.0\.1:(\d+)\/\S*)$/m;

describe('npm run demo (scripts/demo.sh) with the bundled workbench', function () {
  this.timeout(180_000);
  let profile: string;
  let env: NodeJS.ProcessEnv;
  let version: string;
  let foreground: ChildProcess | undefined;
  let browser: BrowserSession | undefined;

  before(function () {
    const vsix = packagedVsix();
    fs.rmSync(path.dirname(vsix.file), { recursive: true, force: true });
    version = vsix.version;
    profile = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-demo-'));
    // DEMO_EDITOR: even where `code` is installed, this is about the fallback.
    env = { ...process.env, DEMO_EDITOR: 'code-server', DEMO_PROFILE: profile, DEMO_PORT: '0' };
  });

  after(async function () {
    await browser?.close().catch(() => undefined);
    if (foreground && foreground.exitCode === null) foreground.kill('SIGTERM');
    demo(['--stop']);
    fs.rmSync(profile, { recursive: true, force: true });
  });

  function demo(args: string[]): { status: number | null; out: string } {
    const result = spawnSync('bash', [path.join(repoRoot(), 'scripts', 'demo.sh'), ...args], { env, encoding: 'utf8', timeout: 150_000 });
    return { status: result.status, out: `${result.stdout ?? ''}${result.stderr ?? ''}` };
  }

  it('--no-wait prints an address that serves the demo folder with Copse installed, then returns', async function () {
    const started = Date.now();
    const run = demo(['--no-build', '--no-wait']);
    const scriptMs = Date.now() - started;
    assert.strictEqual(run.status, 0, run.out);
    const address = ADDRESS.exec(run.out);
    assert.ok(address, `no address in:\n${run.out}`);
    assert.strictEqual(new URL(address[1]).searchParams.get('folder'), path.join(repoRoot(), 'demo'));
    assert.strictEqual(await statusOf(`http://127.0.0.1:${address[2]}/healthz`), 200);
    assert.ok(fs.readdirSync(path.join(profile, 'extensions')).includes(`copse.copse-${version}`));

    // And a browser at that address gets the workbench, the demo files and the extension.
    browser = await launchChromium({ width: 1280, height: 800 });
    const page = browser.context.pages()[0] ?? (await browser.context.newPage());
    await page.goto(address[1]);
    // The explorer of a fresh profile is open; its first row means the workbench has loaded the folder.
    await page.locator('.explorer-folders-view .monaco-list-row').first().waitFor({ state: 'visible', timeout: 90_000 });
    await revealInExplorer(page, 'kite-flights.csv');
    await runCommand(page, 'Extensions: Show Enabled Extensions', 30_000);
    const copse = page.locator('.extensions-viewlet .monaco-list-row[aria-label^="Copse, "]');
    await copse.waitFor({ timeout: 30_000 });
    assert.match((await copse.getAttribute('aria-label')) ?? '', new RegExp(`^Copse, ${version.replace(/\./g, '\\.')}, Publisher copse`));
    // eslint-disable-next-line no-console -- timings go to the run's log, never into an assertion.
    console.log(`      demo.sh --no-wait returned after ${scriptMs} ms; the workbench listed Copse ${Date.now() - started - scriptMs} ms later`);
    await browser.close();
    browser = undefined;
  });

  it('--stop ends the workbench --no-wait left running', async function () {
    const pidFile = path.join(profile, 'server.pid');
    assert.ok(fs.existsSync(pidFile), 'no server.pid: was it started?');
    const pid = Number(fs.readFileSync(pidFile, 'utf8'));
    const url = fs.readFileSync(path.join(profile, 'server.url'), 'utf8').trim();
    const run = demo(['--stop']);
    assert.strictEqual(run.status, 0, run.out);
    assert.ok(!isAlive(pid), `code-server ${pid} still runs`);
    assert.strictEqual(await statusOf(new URL('/healthz', url).toString()), 'refused');
  });

  it('runs in the foreground until Ctrl-C, then stops the workbench', async function () {
    foreground = spawn('bash', [path.join(repoRoot(), 'scripts', 'demo.sh'), '--no-build'], { env, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    foreground.stdout!.on('data', (d) => (out += d));
    foreground.stderr!.on('data', (d) => (out += d));
    const exited = new Promise<number | null>((resolve) => foreground!.once('exit', (code) => resolve(code)));
    const deadline = Date.now() + 120_000;
    while (!/Ctrl-C stops it/.test(out)) {
      if (foreground.exitCode !== null || Date.now() > deadline) throw new Error(`the demo did not come up:\n${out}`);
      await sleep(200);
    }
    const address = ADDRESS.exec(out)!;
    const pid = Number(fs.readFileSync(path.join(profile, 'server.pid'), 'utf8'));
    assert.strictEqual(await statusOf(`http://127.0.0.1:${address[2]}/healthz`), 200);
    // What a terminal's Ctrl-C sends to the foreground script.
    foreground.kill('SIGINT');
    assert.strictEqual(await exited, 0, out);
    assert.ok(!isAlive(pid), `code-server ${pid} still runs after Ctrl-C`);
    assert.strictEqual(await statusOf(`http://127.0.0.1:${address[2]}/healthz`), 'refused');
  });
});

function statusOf(url: string): Promise<number | 'refused'> {
  return new Promise((resolve, reject) => {
    const request = http.get(url, { timeout: 5_000 }, (response) => {
      response.resume();
      resolve(response.statusCode ?? 0);
    });
    request.on('error', (error: NodeJS.ErrnoException) => (error.code === 'ECONNREFUSED' ? resolve('refused') : reject(error)));
    request.on('timeout', () => request.destroy(new Error(`no answer from ${url} within 5 s`)));
  });
}
