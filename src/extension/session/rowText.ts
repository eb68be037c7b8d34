// What hovers and the panel say about one row, in words: contributions, intervals, why a row is doubted, and
// its tree votes as the panel draws them. Every number comes from core; this only chooses words. No `vscode`.

import type { RowVotes as PanelRowVotes, SuspectRow } from '../../protocol/messages';
import { formatNumber, formatShare, voteEntropy, type RowVotes } from '../engine';
import { contributionsMarkdown, formatLevel, intervalMarkdown } from '../editor/hoverText';
import { largestContributions, type IntervalAnswer, type RowContribution } from './explanations';
import { COVERS_FROM_FILE } from './importText';
import { HOVER_CONTRIBUTIONS, type ForestSession } from './session';

export function contributionsText(s: ForestSession, store: RowVotes, tableRow: number, c: RowContribution): string {
  const predicted = store.answer(tableRow).headline.predicted;
  const e = s.explanations!.explanationOf(c, s.task === 'classification' ? predicted : null);
  const names = s.forest.schema.features.map((f) => f.name);
  const { top, rest, others } = largestContributions(names, e.values, HOVER_CONTRIBUTIONS);
  const text = contributionsMarkdown({
    className: e.output === null ? undefined : (s.classes[e.output] ?? `class ${e.output}`),
    target: s.forest.schema.target.name,
    base: e.base,
    prediction: e.prediction,
    top,
    rest,
    others,
    over: e.outOfBag ? `the ${e.trees} trees that never saw this row` : undefined,
  });
  // An import's covers are this file's counts, so the reader must know what the weights are.
  return s.importedFrom === undefined ? text : `${text} The ${COVERS_FROM_FILE}.`;
}

export function intervalText(s: ForestSession, a: IntervalAnswer, level: number): string {
  if ('unavailable' in a) return `No ${formatLevel(level)} prediction interval: ${a.unavailable}`;
  return intervalMarkdown(a.level, a.lower, a.upper, s.forest.schema.target.name);
}

export function suspectReason(session: ForestSession, s: SuspectRow): string {
  if (session.task === 'regression') {
    return (
      `the trees that never saw this row predict ${formatNumber(s.oobPredicted)} on average, but it is labelled ${formatNumber(s.label)}, ` +
      `${formatNumber(Math.abs(s.score))} robust standard deviations of the forest's out-of-bag error away. The value may be wrong, or the row unusual.`
    );
  }
  const label = session.classes[s.label] ?? String(s.label);
  const voted = session.classes[s.oobPredicted] ?? String(s.oobPredicted);
  const t = session.numbering.tableRow(s.row);
  const oob = t === undefined ? undefined : session.store.answer(t).oob;
  const share = oob && oob.proba ? oob.proba[s.oobPredicted] : NaN;
  return (
    `the trees that never saw this row say "${voted}"${Number.isFinite(share) ? ` (${formatShare(share)})` : ''}, ` +
    `but it is labelled "${label}" (margin ${formatNumber(s.score)}). The label may be wrong, or the row unusual.`
  );
}

export function rowVotesOf(store: RowVotes, r: number, dataRow: number): PanelRowVotes {
  const a = store.answer(r);
  const votes = new Array<number>(store.trees);
  for (let t = 0; t < store.trees; t++) votes[t] = store.vote(t, r);
  const counts = a.all.tally.kind === 'classification' ? [...a.all.tally.counts] : [];
  return {
    row: dataRow,
    counts,
    lead: a.lead,
    allPredicted: a.all.predicted,
    agreement: a.headline.agreement,
    entropy: a.all.tally.kind === 'classification' ? voteEntropy(counts) : null,
    oobVote: a.oob && Number.isFinite(a.oob.predicted) ? a.oob.predicted : null,
    label: a.truth ?? null,
    votes,
    outOfBag: store.outOfBagTrees(r) ?? [],
  };
}

/** Whether rowVotes can already give every one of these rows its interval; computes the missing ones. */
export async function intervalsReady(s: ForestSession, dataRows: readonly number[], level: number): Promise<boolean> {
  const e = s.explanations;
  if (!e || !e.regression) return false;
  let changed = false;
  for (const dataRow of dataRows) {
    const r = s.numbering.tableRow(dataRow);
    if (r === undefined || e.cachedInterval(r, level)) continue;
    const a = await e.interval(r, level, 'now');
    if ('unavailable' in a) return false;
    changed = true;
  }
  return changed;
}
