// Brings the last fit back after a window reload: model and bootstrap counts from storage, rows from the
// CSV (read with the same seeded sample). If the CSV changed since, the forest comes back without its
// per-row out-of-bag part, and the summary says why. No `vscode`.

import { readFileSync } from 'node:fs';
import type { FitOrigin } from '../context';
import { loadCsv } from '../engine';
import { csvLabel, type LoadedCsv } from './csvSource';
import { loadLastFit } from './lastFit';
import { ForestSession, type ScorerLike, type SessionInit } from './session';
import type { Forest } from '../engine';

export interface Restored {
  readonly session: ForestSession;
  /** What a refit needs; absent when the CSV changed (a refit would be a new fit on new data). */
  readonly origin?: FitOrigin;
  readonly note?: string;
}

export async function restoreLastFit(
  dir: string,
  scorerFor: (forest: Forest) => ScorerLike,
  explain: Pick<SessionInit, 'explainer' | 'intervalLevel'> = {},
): Promise<Restored | undefined> {
  const saved = await loadLastFit(dir);
  if (!saved) return undefined;
  const { meta, forest } = saved;
  const reading = meta.csv;
  const started = performance.now();
  const load = await loadCsv(reading.path, { sampleRows: reading.sampleRows, sampleSeed: reading.sampleSeed, target: reading.loadTarget });
  const csv: LoadedCsv = { ...reading, load, seconds: (performance.now() - started) / 1000 };
  const same = load.fingerprint === meta.fingerprint;
  const note = same ? undefined : `${csvLabel(csv)} has changed since this forest was fitted, so per-row out-of-bag votes are not shown; fit again to refresh them.`;
  const summary = same ? meta.summary : { ...meta.summary, warnings: [note!, ...meta.summary.warnings] };
  const scorer = scorerFor(forest);
  try {
    const session = await ForestSession.create({
      forest,
      csv,
      text: () => readFileSync(reading.path, 'utf8'),
      oob: same ? { trainRows: saved.trainRows, holdoutRows: saved.holdoutRows, inBag: saved.inBag } : undefined,
      // The saved summary was the panel's for the earlier session: it is stamped with this session's id.
      summary: (fit) => ({ ...summary, fit }),
      scorer,
      explainer: explain.explainer,
      // The saved forest keeps its seed, so the same rows give back its bootstrap draws for intervals.
      quantiles: same ? { from: 'table' } : undefined,
      intervalLevel: explain.intervalLevel,
    });
    // What a refit needs; a changed CSV would make a refit a new fit on new data.
    const origin: FitOrigin | undefined = same && meta.choices ? { ...csv, choices: meta.choices } : undefined;
    return { session, origin, note };
  } catch (e) {
    await scorer.dispose();
    throw e;
  }
}
