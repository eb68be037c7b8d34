// The one object that owns the extension's disposables and its single piece of state, the active forest.
// Everything that registers with VS Code hands its disposable here, so deactivation releases it all.

import * as vscode from 'vscode';
import type { ForestSession } from './session/session';
import type { LoadedCsv } from './session/csvSource';
import type { FitChoices } from './fit/choices';
import { readSettings, type CopseSettings } from './settings';

/** The CSV a fit was made from and what the user chose, so a refit or a sweep from the panel needs no dialog and no re-read. */
export interface FitOrigin extends LoadedCsv {
  readonly choices: FitChoices;
}

export class CopseContext implements vscode.Disposable {
  readonly log: vscode.LogOutputChannel;
  private readonly disposables: vscode.Disposable[] = [];
  private current: ForestSession | undefined;
  private currentOrigin: FitOrigin | undefined;
  private readonly changed = new vscode.EventEmitter<ForestSession | undefined>();
  /** Fires after the active forest changes (a fit, an opened model, a restore). */
  readonly onDidChangeSession = this.changed.event;
  private lastProblems = '';
  /** The fit in progress, if any: a second fit waits its turn rather than racing the first. */
  busy: Promise<unknown> | undefined;

  /** Waits for `work`, marked busy until it settles (however it settles). */
  async whileBusy<T>(work: Promise<T>): Promise<T> {
    this.busy = work;
    try {
      return await work;
    } finally {
      this.busy = undefined;
    }
  }

  constructor(readonly extension: vscode.ExtensionContext) {
    this.log = this.track(vscode.window.createOutputChannel('Copse', { log: true }));
    this.track(this.changed);
  }

  track<T extends vscode.Disposable>(d: T): T {
    this.disposables.push(d);
    return d;
  }

  get session(): ForestSession | undefined {
    return this.current;
  }

  get origin(): FitOrigin | undefined {
    return this.currentOrigin;
  }

  /** Replaces the active forest; the old one's scoring thread is released. */
  setSession(session: ForestSession | undefined, origin?: FitOrigin): void {
    const old = this.current;
    this.current = session;
    this.currentOrigin = session ? origin : undefined;
    if (old && old !== session) void old.dispose();
    void vscode.commands.executeCommand('setContext', 'copse.hasForest', session !== undefined);
    this.changed.fire(session);
  }

  /** Settings as they are now (read fresh: the user may change them between fits); problems are logged once. */
  settings(): CopseSettings {
    const { settings, problems } = readSettings(vscode.workspace.getConfiguration('copse'));
    const text = problems.join('\n');
    if (text && text !== this.lastProblems) for (const p of problems) this.log.warn(p);
    this.lastProblems = text;
    return settings;
  }

  /** Where the last fit is kept: per workspace when there is one, else per user. */
  get storageDir(): string {
    return vscode.Uri.joinPath(this.extension.storageUri ?? this.extension.globalStorageUri, 'last-fit').fsPath;
  }

  dispose(): void {
    const s = this.current;
    this.current = undefined;
    if (s) void s.dispose();
    for (const d of this.disposables.splice(0).reverse()) {
      try {
        d.dispose();
      } catch (e) {
        // eslint-disable-next-line no-console -- the log channel is one of these disposables; the host's console outlives it.
        console.error('copse: dispose failed', e);
      }
    }
  }
}
