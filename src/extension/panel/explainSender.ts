// The panel's explanation sections: one row's contributions, the global view and partial dependence. Each
// can take a while on the explanation thread, so a newer request wins over a slower older one, and every
// answer is sent as about the session it was computed for (the panel drops answers about another fit).

import type { Dependence, GlobalContributions, HostMessage, ReferenceChoice, RegionMap, RowContributions } from '../../protocol/messages';
import type { CopseContext } from '../context';
import { isAbort, isUserError, userMessage } from '../errors';
import type { ForestSession } from '../session/session';

/** How long an explanation may take before the panel says it is being worked out (no flicker when cached). */
const WORKING_NOTE_MS = 150;

/**
 * What the panel shows for the active forest. The webview's page is discarded whenever the panel is hidden
 * (we do not retain it), and comes back empty-handed but for its own saved state; this lets the host re-send
 * the same picture at once instead of scoring it again.
 */
export interface Shown {
  session: ForestSession;
  choice?: { x: string; y: string; reference: ReferenceChoice };
  map?: RegionMap;
  matrix?: RegionMap[];
  rows?: number[];
  /** How many rows were selected in all (rows holds at most LIMITS.selectedRows). */
  selected?: number;
  /** The row whose contributions are charted: the first selected, or the one last asked for. */
  explained?: number;
  contributions?: RowContributions;
  dependence?: Dependence;
  global?: GlobalContributions;
  /** The background run of the global view; stopped when the session changes. */
  globalRun?: AbortController;
}

/** What the sender needs of the panel host. */
export interface PanelOutlet {
  readonly ctx: CopseContext;
  send(session: ForestSession, message: HostMessage): void;
  status(state: 'idle' | 'working' | 'error', text: string): void;
  guard(work: Promise<unknown>): Promise<void>;
  shownFor(session: ForestSession): Shown;
}

export class ExplainSender {
  /** Bumped per request, so a slow answer never overwrites a newer one. */
  private explainTicket = 0;
  /** Withdraws the chart's previous row when a newer one is asked for before it reached the thread. */
  private explainWithdraw: AbortController | undefined;
  private dependenceTicket = 0;

  constructor(private readonly out: PanelOutlet) {}

  /** The contribution chart of one data row; a newer request wins over a slower older one. */
  async contributions(row: number): Promise<void> {
    const session = this.out.ctx.session;
    if (!session) return;
    const shown = this.out.shownFor(session);
    shown.explained = row;
    const ticket = ++this.explainTicket;
    if (!session.explanations) {
      this.out.send(session, { type: 'contributions', row, state: 'unavailable', contributions: null, text: 'Explanations are not available for this forest.' });
      return;
    }
    const note = setTimeout(() => {
      if (ticket === this.explainTicket) this.out.send(session, { type: 'contributions', row, state: 'working', contributions: null, text: `Working out row ${row}’s contributions…` });
    }, WORKING_NOTE_MS);
    this.explainWithdraw?.abort();
    const withdraw = (this.explainWithdraw = new AbortController());
    try {
      const started = performance.now();
      const c = await session.contributions(row, 'now', withdraw.signal);
      if (ticket !== this.explainTicket || session !== this.out.ctx.session) return;
      this.out.ctx.log.debug(`Contributions of row ${row} in ${Math.round(performance.now() - started)} ms.`);
      shown.contributions = c;
      this.out.send(session, { type: 'contributions', row, state: 'ready', contributions: c, text: '' });
    } catch (e) {
      if (ticket === this.explainTicket && !isAbort(e)) {
        this.out.send(session, { type: 'contributions', row, state: 'unavailable', contributions: null, text: userMessage(e) });
      }
      if (!isUserError(e)) throw e;
    } finally {
      clearTimeout(note);
    }
  }

  /** Starts the global view's background sample once per session, and re-sends what it has so far. */
  global(session: ForestSession): void {
    const shown = this.out.shownFor(session);
    if (shown.global) this.out.send(session, { type: 'globalContributions', global: shown.global, text: '' });
    if (shown.globalRun) return;
    if (!shown.global) this.out.send(session, { type: 'globalContributions', global: null, text: 'Working out contributions over a sample of rows…' });
    const run = (shown.globalRun = new AbortController());
    const started = performance.now();
    void this.out.guard(
      session
        .globalContributions((g) => {
          if (session !== this.out.ctx.session) return;
          shown.global = g;
          this.out.send(session, { type: 'globalContributions', global: g, text: '' });
        }, run.signal)
        .then((g) => this.out.ctx.log.info(`Global view: contributions of ${g.rows} rows in ${Math.round(performance.now() - started)} ms.`)),
    );
  }

  async dependence(feature: string, output: number | null): Promise<void> {
    const session = this.out.ctx.session;
    if (!session?.explanations) return;
    const shown = this.out.shownFor(session);
    const ticket = ++this.dependenceTicket;
    this.out.status('working', `Working out the dependence on ${feature}…`);
    const started = performance.now();
    const d = await session.dependence(feature, output);
    if (ticket !== this.dependenceTicket || session !== this.out.ctx.session) return;
    this.out.ctx.log.info(`Dependence on ${feature}: ${d.grid.length} points, ${d.ice.length} curves in ${Math.round(performance.now() - started)} ms.`);
    shown.dependence = d;
    this.out.send(session, { type: 'dependence', dependence: d });
    this.out.status('idle', '');
  }
}
