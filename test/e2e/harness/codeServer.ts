import { ChildProcess, spawn, spawnSync } from 'child_process';
import * as fs from 'fs';
import * as http from 'http';
import * as net from 'net';
import * as os from 'os';
import * as path from 'path';
import { codeServerEntry } from './paths';
import { descendants, groupMembers, isAlive, signal, signalGroup, sleep } from './processes';

/**
 * User settings every test starts from. Each one removes a first-run prompt,
 * a page or a background request that would cover the UI under test or make
 * runs differ (the network is closed, so update and gallery checks only fail).
 */
export const QUIET_SETTINGS: Readonly<Record<string, unknown>> = {
  'security.workspace.trust.enabled': false,
  // The web workbench saves after a delay by default, desktop VS Code does
  // not; tests should see what a desktop user sees (unsaved edits stay dirty).
  'files.autoSave': 'off',
  'workbench.startupEditor': 'none',
  'workbench.welcomePage.walkthroughs.openOnInstall': false,
  'workbench.tips.enabled': false,
  'workbench.enableExperiments': false,
  'workbench.settings.enableNaturalLanguageSearch': false,
  'telemetry.telemetryLevel': 'off',
  'update.mode': 'none',
  'extensions.autoCheckUpdates': false,
  'extensions.autoUpdate': false,
  'extensions.ignoreRecommendations': true,
  // Explorer rows are found by name and depth; compact folders would merge 'a/b' into one row.
  'explorer.compactFolders': false,
  'git.enabled': false,
  'npm.autoDetect': 'off',
  'chat.commandCenter.enabled': false,
  'editor.hover.delay': 150,
};

export interface CodeServerOptions {
  /** The folder the workbench opens. */
  folder: string;
  /** User settings, laid over QUIET_SETTINGS. */
  settings?: Record<string, unknown>;
  /** .vsix files installed into the fresh extensions folder before the server starts. */
  vsix?: string[];
  /** Where code-server's own output goes. */
  logFile: string;
  /** Keep the temporary user-data and extensions folders after stop() (for debugging). */
  keepTemp?: boolean;
  /**
   * Leave workspace trust on (code-server otherwise starts with --disable-workspace-trust), with no start-up
   * prompt: the folder opens untrusted, in Restricted Mode.
   */
  restricted?: boolean;
}

export interface CodeServer {
  readonly port: number;
  /** Base URL, ending in '/'. */
  readonly url: string;
  /** URL that opens `folder` in the workbench. */
  readonly folderUrl: string;
  readonly folder: string;
  readonly userDataDir: string;
  readonly extensionsDir: string;
  readonly logFile: string;
  readonly pid: number;
  /**
   * The logs of the extension hosts started so far, oldest first: one per
   * window load, so after a load the last one is the current window's.
   */
  extensionHostLogs(): string[];
  /** Stops the server and every process it started; resolves once none is left. */
  stop(): Promise<void>;
}

const running = new Set<ChildProcess>();

// A test run that dies or is interrupted must not leave servers behind: they
// run in their own process group, so a terminal's Ctrl-C does not reach them.
// 'exit' covers a normal end and an uncaught error; a signal ends Node without
// 'exit', so those are caught, the servers killed, and the signal raised again.
function killAllServers(): void {
  for (const child of running) {
    if (child.pid === undefined) continue;
    signal(descendants(child.pid), 'SIGKILL');
    signalGroup(child.pid, 'SIGKILL');
  }
}
process.on('exit', killAllServers);
for (const name of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
  process.once(name, () => {
    killAllServers();
    process.kill(process.pid, name);
  });
}

export async function startCodeServer(options: CodeServerOptions): Promise<CodeServer> {
  const entry = codeServerEntry();
  const temp = fs.mkdtempSync(path.join(os.tmpdir(), 'copse-e2e-'));
  const userDataDir = path.join(temp, 'user-data');
  const extensionsDir = path.join(temp, 'extensions');
  const env = serverEnv(path.join(temp, 'xdg'));
  fs.mkdirSync(path.join(userDataDir, 'User'), { recursive: true });
  fs.mkdirSync(extensionsDir, { recursive: true });
  fs.writeFileSync(
    path.join(userDataDir, 'User', 'settings.json'),
    JSON.stringify({ ...QUIET_SETTINGS, ...options.settings }, null, 2),
  );
  fs.mkdirSync(path.dirname(options.logFile), { recursive: true });
  fs.writeFileSync(options.logFile, '');

  for (const vsix of options.vsix ?? []) {
    installVsix(entry, vsix, { userDataDir, extensionsDir, env, logFile: options.logFile });
  }

  // The port is picked before code-server binds it, so another process can
  // take it in between; a few retries make that race harmless.
  for (let attempt = 1; ; attempt++) {
    const port = await freeLoopbackPort();
    const child = spawnServer(entry, port, options, { userDataDir, extensionsDir, env });
    try {
      await waitUntilServing(child, port, options.logFile);
    } catch (error) {
      await stopProcessTree(child);
      const addressTaken = fs.readFileSync(options.logFile, 'utf8').includes('EADDRINUSE');
      if (addressTaken && attempt < 3) continue;
      if (!options.keepTemp) fs.rmSync(temp, { recursive: true, force: true });
      throw error;
    }
    const url = `http://127.0.0.1:${port}/`;
    return {
      port,
      url,
      folderUrl: `${url}?folder=${encodeURIComponent(options.folder)}`,
      folder: options.folder,
      userDataDir,
      extensionsDir,
      logFile: options.logFile,
      pid: child.pid!,
      extensionHostLogs: () => extensionHostLogs(userDataDir),
      stop: async () => {
        await stopProcessTree(child);
        if (!options.keepTemp) fs.rmSync(temp, { recursive: true, force: true });
      },
    };
  }
}

/** Runs `code-server --install-extension`, the same path a user's CLI install takes. */
export function installVsix(
  entry: string,
  vsix: string,
  dirs: { userDataDir: string; extensionsDir: string; env: NodeJS.ProcessEnv; logFile: string },
): void {
  if (!fs.existsSync(vsix)) throw new Error(`no .vsix at ${vsix}`);
  const result = spawnSync(
    process.execPath,
    [entry, '--user-data-dir', dirs.userDataDir, '--extensions-dir', dirs.extensionsDir, '--force', '--install-extension', vsix],
    { env: dirs.env, encoding: 'utf8', timeout: 120_000 },
  );
  const output = `${result.stdout ?? ''}${result.stderr ?? ''}`;
  fs.appendFileSync(dirs.logFile, `--- install ${vsix}\n${output}\n`);
  // code-server exits 0 even when an install fails, so its message is the only reliable signal.
  if (result.status !== 0 || !/was successfully installed/.test(output)) {
    throw new Error(`installing ${vsix} failed (exit ${result.status}):\n${output}`);
  }
}

function serverEnv(xdgHome: string): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {};
  for (const [key, value] of Object.entries(process.env)) {
    // Variables from a surrounding VS Code (when tests run in its terminal) would redirect the server.
    if (key.startsWith('VSCODE_') || key === 'ELECTRON_RUN_AS_NODE') continue;
    env[key] = value;
  }
  // code-server writes a default config (with a password) and its logs under
  // the XDG folders even when given --user-data-dir; keep them out of $HOME.
  env.XDG_CONFIG_HOME = path.join(xdgHome, 'config');
  env.XDG_DATA_HOME = path.join(xdgHome, 'data');
  return env;
}

function spawnServer(
  entry: string,
  port: number,
  options: CodeServerOptions,
  dirs: { userDataDir: string; extensionsDir: string; env: NodeJS.ProcessEnv },
): ChildProcess {
  const log = fs.openSync(options.logFile, 'a');
  const args = [
    entry,
    '--auth', 'none',
    '--bind-addr', `127.0.0.1:${port}`,
    '--disable-telemetry',
    '--disable-update-check',
    ...(options.restricted ? [] : ['--disable-workspace-trust']),
    '--disable-getting-started-override',
    '--user-data-dir', dirs.userDataDir,
    '--extensions-dir', dirs.extensionsDir,
    options.folder,
  ];
  // detached: its own process group, so stop() can signal the whole tree at once.
  const child = spawn(process.execPath, args, { env: dirs.env, detached: true, stdio: ['ignore', log, log] });
  fs.closeSync(log);
  running.add(child);
  child.once('exit', () => running.delete(child));
  return child;
}

async function waitUntilServing(child: ChildProcess, port: number, logFile: string): Promise<void> {
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null || child.signalCode !== null) {
      throw new Error(`code-server exited (${child.exitCode ?? child.signalCode}) before serving:\n${tail(logFile)}`);
    }
    if (await healthy(port)) return;
    await sleep(200);
  }
  throw new Error(`code-server did not serve on port ${port} within 60 s:\n${tail(logFile)}`);
}

function healthy(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const request = http.get({ host: '127.0.0.1', port, path: '/healthz', timeout: 2000 }, (response) => {
      response.resume();
      resolve(response.statusCode === 200);
    });
    request.on('error', () => resolve(false));
    request.on('timeout', () => request.destroy());
  });
}

function freeLoopbackPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

async function stopProcessTree(child: ChildProcess): Promise<void> {
  const pid = child.pid;
  if (pid === undefined) return;
  // Collected before signalling: once the parent dies, its orphans are re-parented and lose the link.
  const tree = new Set([pid, ...descendants(pid), ...groupMembers(pid)]);
  signal(tree, 'SIGTERM');
  signalGroup(pid, 'SIGTERM');
  const deadline = Date.now() + 10_000;
  while (Date.now() < deadline && [...tree].some(isAlive)) await sleep(100);
  const stubborn = [...tree].filter(isAlive);
  if (stubborn.length > 0) {
    signal(stubborn, 'SIGKILL');
    signalGroup(pid, 'SIGKILL');
    while ([...tree].some(isAlive)) await sleep(50);
  }
  if (child.exitCode === null && child.signalCode === null) {
    await new Promise((resolve) => child.once('exit', resolve));
  }
}

// Each extension host writes logs/<session>/exthost<N>/remoteexthost.log on
// the server, in launch order of session, then N. Activation of every
// extension is logged there ("ExtensionService#_doActivateExtension <id>"),
// which the browser side does not show anywhere.
function extensionHostLogs(userDataDir: string): string[] {
  const logs = path.join(userDataDir, 'logs');
  if (!fs.existsSync(logs)) return [];
  const candidates: { session: string; index: number; file: string }[] = [];
  for (const session of fs.readdirSync(logs)) {
    const sessionDir = path.join(logs, session);
    if (!fs.statSync(sessionDir).isDirectory()) continue;
    for (const host of fs.readdirSync(sessionDir)) {
      const match = /^exthost(\d+)$/.exec(host);
      const file = path.join(sessionDir, host, 'remoteexthost.log');
      if (match && fs.existsSync(file)) candidates.push({ session, index: Number(match[1]), file });
    }
  }
  candidates.sort((a, b) => (a.session === b.session ? a.index - b.index : a.session < b.session ? -1 : 1));
  return candidates.map((c) => c.file);
}

function tail(file: string, lines = 30): string {
  try {
    return fs.readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
  } catch {
    return '(no log)';
  }
}
