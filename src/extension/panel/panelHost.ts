// The host end of the panel: creates (or restores) the webview, posts the active forest's summary and
// maps, and answers the panel's requests. The webview only draws; every number comes from here.

import * as vscode from 'vscode';
import {
  LIMITS,
  PROTOCOL_VERSION,
  isHostToPanel,
  isPanelToHost,
  type HostMessage,
  type HostToPanel,
  type PanelToHost,
  type ReferenceChoice,
  type SweepSummary,
} from '../../protocol/messages';
import type { CopseContext } from '../context';
import { isAbort, isUserError, userMessage } from '../errors';
import type { ForestSession } from '../session/session';
import { intervalsReady } from '../session/rowText';
import { ExplainSender, type Shown } from './explainSender';
import { panelHtml } from './html';
import { answerRows } from './rowsSender';
import { PANEL_VIEW_TYPE_ID } from './viewType';

export const PANEL_VIEW_TYPE = PANEL_VIEW_TYPE_ID;

export interface PanelActions {
  revealRow(dataRow: number): Promise<void>;
  refit(leaveOut: string[], trees: number | null): Promise<void>;
  /** Called when a restored panel finds no active forest: bring the last one back if we can. */
  restore(): Promise<void>;
  /** Refits the last fit's data with several features-per-split counts; progress goes to the panel. */
  sweep(): Promise<void>;
  cancelSweep(): void;
  /** The last sweep's result, when it still describes the forest shown. */
  sweepResult(): SweepSummary | undefined;
  refitFeatures(featuresPerSplit: number): Promise<void>;
}


export class PanelHost implements vscode.Disposable {
  private panel: vscode.WebviewPanel | undefined;
  private ready = false;
  private queue: HostToPanel[] = [];
  private readonly panelDisposables: vscode.Disposable[] = [];
  /** Bumped per map request so a slow map never overwrites a newer one. */
  private mapTicket = 0;
  /** While the last fit is being brought back after a reload, the panel says so rather than "no forest". */
  private restoring = false;
  /** The map the panel showed before a reload, until the first forest it fits is shown. */
  private restoredChoice: { x: string; y: string; reference: ReferenceChoice } | undefined;
  /**
   * What the panel shows for the active forest. The webview's page is discarded whenever the panel is
   * hidden (we do not retain it), and comes back empty-handed but for its own saved state; this lets the
   * host re-send the same picture at once instead of scoring it again.
   */
  private shown: Shown | undefined;
  private readonly explain: ExplainSender;

  constructor(
    private readonly ctx: CopseContext,
    private readonly actions: PanelActions,
  ) {
    this.explain = new ExplainSender({
      ctx,
      send: (session, m) => this.send(session, m),
      status: (state, text) => this.status(state, text),
      guard: (work) => this.guard(work),
      shownFor: (session) => this.shownFor(session),
    });
    ctx.track(ctx.onDidChangeSession((s) => void this.sessionChanged(s)));
    ctx.track(
      vscode.window.registerWebviewPanelSerializer(PANEL_VIEW_TYPE, {
        deserializeWebviewPanel: async (panel) => {
          this.adopt(panel);
          if (ctx.session) return;
          this.restoring = true;
          try {
            await actions.restore();
          } finally {
            this.restoring = false;
          }
          if (!ctx.session) await this.sessionChanged(undefined);
        },
      }),
    );
  }

  get visible(): boolean {
    return this.panel?.visible ?? false;
  }

  get viewColumn(): vscode.ViewColumn | undefined {
    return this.panel?.viewColumn;
  }

  get isOpen(): boolean {
    return this.panel !== undefined;
  }

  /** Opens the panel beside the editor, or brings it forward. */
  reveal(preserveFocus = true): void {
    if (this.panel) {
      this.panel.reveal(undefined, preserveFocus);
      return;
    }
    const panel = vscode.window.createWebviewPanel(
      PANEL_VIEW_TYPE,
      'Copse',
      { viewColumn: vscode.ViewColumn.Beside, preserveFocus },
      this.options(),
    );
    this.adopt(panel);
  }

  /** Sends a message about the active forest (or none). */
  post(message: HostMessage): void {
    this.postStamped({ ...message, fit: message.type === 'status' ? null : (this.ctx.session?.id ?? null) });
  }

  /** Sends a message about one session's forest: the panel drops it if it has moved on to another fit. */
  private send(session: ForestSession, message: HostMessage): void {
    this.postStamped({ ...message, fit: session.id });
  }

  private postStamped(message: HostToPanel): void {
    // The guard runs here too: a malformed message is our bug, better caught in the log than drawn wrong.
    if (!isHostToPanel(message)) {
      this.ctx.log.error(`Not sending a malformed ${(message as { type?: string }).type ?? '?'} message to the panel.`);
      return;
    }
    if (!this.panel) return;
    if (!this.ready) {
      // Only the latest of each kind matters once the panel is up.
      this.queue = this.queue.filter((m) => m.type !== message.type || message.type === 'status');
      this.queue.push(message);
      return;
    }
    void this.panel.webview.postMessage(message);
  }

  status(state: 'idle' | 'working' | 'error', text: string, progress: number | null = null): void {
    this.post({ type: 'status', state, text, progress });
  }

  /** Shows rows' tree votes in the panel, marks them on the map, and charts the first one's contributions. */
  showRows(dataRows: number[], selected = dataRows.length): void {
    const s = this.ctx.session;
    if (!s) return;
    const rows = dataRows.slice(0, LIMITS.selectedRows);
    // Kept even when the panel was closed a moment ago: a freshly opened page drops what was queued
    // before it said 'ready' and is sent everything from here instead, these rows included.
    const shown = this.shownFor(s);
    shown.rows = rows;
    shown.selected = selected;
    this.postRows(s, rows, selected);
    this.send(s, { type: 'highlight', rows });
    if (rows.length > 0) void this.guard(this.explain.contributions(rows[0]));
  }

  /** Votes at once; again with intervals once the rows' are computed, if the selection has not moved on. */
  private postRows(s: ForestSession, rows: number[], selected: number): void {
    const level = this.ctx.settings().explain.intervalLevel;
    this.send(s, { type: 'disagreement', rows: s.rowVotes(rows, level), selected });
    void this.guard(
      intervalsReady(s, rows, level).then((changed) => {
        if (changed && this.ctx.session === s && (this.shown?.session !== s || this.shown.rows === rows)) {
          this.send(s, { type: 'disagreement', rows: s.rowVotes(rows, level), selected });
        }
      }),
    );
  }

  dispose(): void {
    this.panel?.dispose();
  }

  private options(): vscode.WebviewPanelOptions & vscode.WebviewOptions {
    return {
      enableScripts: true,
      retainContextWhenHidden: false,
      localResourceRoots: [vscode.Uri.joinPath(this.ctx.extension.extensionUri, 'media')],
    };
  }

  private adopt(panel: vscode.WebviewPanel): void {
    this.panel = panel;
    this.ready = false;
    panel.webview.options = this.options();
    const media = (f: string) => panel.webview.asWebviewUri(vscode.Uri.joinPath(this.ctx.extension.extensionUri, 'media', f)).toString();
    panel.webview.html = panelHtml({ scriptUri: media('panel.js'), styleUri: media('panel.css'), cspSource: panel.webview.cspSource });
    panel.iconPath = vscode.Uri.joinPath(this.ctx.extension.extensionUri, 'dist', 'icon.png');
    this.panelDisposables.push(
      panel.webview.onDidReceiveMessage((m: unknown) => void this.receive(m)),
      // Hidden without retained context, the page is torn down; it says 'ready' again when shown.
      panel.onDidChangeViewState((e) => {
        if (!e.webviewPanel.visible) this.ready = false;
      }),
      panel.onDidDispose(() => {
        this.panel = undefined;
        this.ready = false;
        this.queue = [];
        this.shown = undefined;
        for (const d of this.panelDisposables.splice(0)) d.dispose();
      }),
    );
  }

  private async receive(raw: unknown): Promise<void> {
    if (!isPanelToHost(raw)) {
      this.ctx.log.warn('Ignored a panel message that does not match the protocol.');
      return;
    }
    const msg: PanelToHost = raw;
    try {
      switch (msg.type) {
        case 'ready':
          if (msg.version !== PROTOCOL_VERSION) this.ctx.log.warn(`Panel speaks protocol ${msg.version}, host ${PROTOCOL_VERSION}.`);
          this.ready = true;
          this.restoredChoice = msg.choice ?? undefined;
          // Everything but progress is about to be sent afresh; a reloaded panel may hold an older
          // summary in its own state, and ours must win so both ends agree.
          for (const m of this.queue.splice(0)) if (m.type === 'status') void this.panel?.webview.postMessage(m);
          await this.sendAll(this.ctx.session);
          break;
        case 'chooseMap':
          await this.sendMap(msg.x, msg.y, msg.reference);
          break;
        case 'openMap':
          await this.sendMap(msg.x, msg.y, this.shown?.choice?.reference ?? { mode: 'typical' });
          break;
        case 'revealRow':
          await this.actions.revealRow(msg.row);
          break;
        case 'refit':
          await this.actions.refit(msg.leaveOut, msg.trees);
          break;
        case 'explainRow':
          await this.explain.contributions(msg.row);
          break;
        case 'chooseDependence':
          await this.explain.dependence(msg.feature, msg.output);
          break;
        case 'runSweep':
          await this.actions.sweep();
          break;
        case 'cancelSweep':
          this.actions.cancelSweep();
          break;
        case 'sweepRefit':
          await this.actions.refitFeatures(msg.featuresPerSplit);
          break;
        case 'saveReport':
          await vscode.commands.executeCommand('copse.saveReport');
          break;
        case 'rowsPage':
        case 'peekRow':
          if (this.ctx.session) this.send(this.ctx.session, answerRows(this.ctx.session, msg, this.ctx.settings().explain.intervalLevel));
          break;
        case 'selectRows':
          this.showRows(msg.rows, msg.selected);
          break;
      }
    } catch (e) {
      if (!isUserError(e)) this.ctx.log.error(e instanceof Error ? (e.stack ?? e.message) : String(e));
      this.status('error', userMessage(e));
    }
  }

  /** What the panel shows for this session, started afresh when the session changed. */
  private shownFor(session: ForestSession): Shown {
    if (this.shown?.session !== session) this.shown = { session };
    return this.shown;
  }

  /** Runs a panel task whose failure should become a status line, not an unhandled rejection. */
  private async guard(work: Promise<unknown>): Promise<void> {
    try {
      await work;
    } catch (e) {
      if (isAbort(e)) return;
      if (!isUserError(e)) this.ctx.log.error(e instanceof Error ? (e.stack ?? e.message) : String(e));
      this.status('error', userMessage(e));
    }
  }

  private async sessionChanged(session: ForestSession | undefined): Promise<void> {
    if (this.shown && this.shown.session !== session) this.shown.globalRun?.abort();
    if (!this.panel || !this.ready) return;
    try {
      await this.sendAll(session);
    } catch (e) {
      if (!isUserError(e)) this.ctx.log.error(e instanceof Error ? (e.stack ?? e.message) : String(e));
      this.status('error', userMessage(e));
    }
  }

  /** The pair the large map shows for this session, for the report to draw the same one. */
  shownMap(session: ForestSession): [string, string] | undefined {
    const c = this.shown?.session === session ? this.shown.choice : undefined;
    return c ? [c.x, c.y] : undefined;
  }

  /** The pre-reload map choice, once, if this forest has both its features. */
  private takeRestoredChoice(session: ForestSession): { x: string; y: string; reference: ReferenceChoice } | undefined {
    const choice = this.restoredChoice;
    this.restoredChoice = undefined;
    const names = new Set(session.forest.schema.features.map((f) => f.name));
    return choice && names.has(choice.x) && names.has(choice.y) ? choice : undefined;
  }

  /** Everything the panel shows for the session, from the cache where the session has not changed. */
  private async sendAll(session: ForestSession | undefined): Promise<void> {
    if (!session) {
      this.shown = undefined;
      if (this.restoring) this.status('working', 'Bringing back the last forest…', null);
      else this.status('idle', 'No forest yet. Run "Copse: Fit a Forest" on a CSV file.');
      return;
    }
    if (this.shown?.session !== session) this.shown = { session };
    const shown = this.shown;
    this.send(session, { type: 'summary', summary: session.summary });
    this.send(session, { type: 'suspects', rows: session.suspects(LIMITS.suspects) });
    if (shown.map) {
      this.send(session, { type: 'regionMap', map: shown.map });
    } else {
      const restored = this.takeRestoredChoice(session);
      const fallback = session.defaultAxes() ? { ...session.defaultAxes()!, reference: { mode: 'typical' } as ReferenceChoice } : undefined;
      const first = shown.choice ?? restored ?? fallback;
      if (!first) {
        this.status('idle', 'A map needs at least two features the forest can draw.');
      } else if (first === restored && fallback) {
        // The saved choice may no longer apply (a row reference past the end, averaging without explanations).
        try {
          await this.sendMap(first.x, first.y, first.reference);
        } catch {
          await this.sendMap(fallback.x, fallback.y, fallback.reference);
        }
      } else {
        await this.sendMap(first.x, first.y, first.reference);
      }
    }
    if (session !== this.ctx.session) return;
    if (!shown.matrix) {
      const started = performance.now();
      shown.matrix = await session.mapMatrix(this.ctx.settings().panel, LIMITS.smallMaps);
      this.ctx.log.info(`Small maps: ${shown.matrix.length} pairs in ${Math.round(performance.now() - started)} ms.`);
    }
    if (session !== this.ctx.session) return;
    this.send(session, { type: 'mapMatrix', maps: shown.matrix });
    if (shown.rows?.length) {
      this.postRows(session, shown.rows, shown.selected ?? shown.rows.length);
      this.send(session, { type: 'highlight', rows: shown.rows });
    }
    const sweep = this.actions.sweepResult();
    if (sweep) this.send(session, { type: 'sweep', state: 'done', progress: null, text: '', result: sweep });
    if (!session.explanations) {
      const why = 'Explanations are not available for this forest.';
      this.send(session, { type: 'contributions', row: null, state: 'unavailable', contributions: null, text: why });
      this.send(session, { type: 'globalContributions', global: null, text: why });
      return;
    }
    if (shown.contributions && shown.contributions.row === shown.explained) {
      this.send(session, { type: 'contributions', row: shown.explained, state: 'ready', contributions: shown.contributions, text: '' });
    } else if (shown.explained !== undefined) {
      void this.guard(this.explain.contributions(shown.explained));
    }
    this.explain.global(session);
    if (shown.dependence) this.send(session, { type: 'dependence', dependence: shown.dependence });
    else {
      const feature = session.defaultDependenceFeature();
      if (feature) await this.explain.dependence(feature, null);
    }
  }

  private async sendMap(x: string, y: string, reference: ReferenceChoice): Promise<void> {
    const session = this.ctx.session;
    if (!session) return;
    const ticket = ++this.mapTicket;
    if (this.shown?.session !== session) this.shown = { session };
    const shown = this.shown;
    shown.choice = { x, y, reference };
    this.status('working', `Scoring the ${x} × ${y} map…`, null);
    const started = performance.now();
    const map = await session.regionMap(x, y, reference, this.ctx.settings().panel);
    if (ticket !== this.mapTicket || session !== this.ctx.session) return;
    const ms = Math.round(performance.now() - started);
    this.ctx.log.info(`Map ${x} × ${y} (${reference.mode}): ${map.nx}×${map.ny} cells in ${ms} ms.`);
    shown.map = map;
    this.send(session, { type: 'regionMap', map });
    this.status('idle', '');
  }
}
