// The status bar item's words for a fit summary. Pure, so the wording is tested without an editor.

import type { FitSummary } from '../protocol/messages';
import { formatShare } from './engine';

/** Text and tooltip for a summary. */
export function statusText(s: FitSummary): { text: string; tooltip: string } {
  const score =
    s.oob?.kind === 'classification'
      ? `OOB ${formatShare(s.oob.accuracy)}`
      : s.oob?.kind === 'regression'
        ? `OOB R² ${s.oob.r2.toFixed(3)}`
        : 'no OOB score';
  const tooltip = [
    `Copse: ${s.trees} trees predicting ${s.target} (${s.task}) from ${s.dataset.label}`,
    `${score}${s.oob ? ` on ${s.oob.rows} rows` : ''}`,
    s.sampled ? `Fitted on a random sample of ${s.rowsUsed} of ${s.rowsRead} rows` : '',
    'Click to show the panel',
  ]
    .filter(Boolean)
    .join('\n');
  return { text: `$(list-tree) ${s.trees} trees · ${score}`, tooltip };
}
