// The hover for one CSV row, as Markdown. Pure: the editor seam wraps it in a trusted MarkdownString.

import type { RowAnswer, VoteTally } from '../session/rowStore';
import { formatNumber, formatShare } from '../format';

export interface HoverContext {
  readonly target: string;
  readonly classes: readonly string[];
  /** The CSV's 1-based data row number. */
  readonly dataRow: number;
  /** Set for suspect rows: why the row was flagged. */
  readonly suspectReason?: string;
  /** A `command:` URI opening the row in the panel's disagreement view; omitted when there is no panel to open. */
  readonly showVotesLink?: string;
  /** For rows of another file: that the forest came from elsewhere. */
  readonly forestLabel?: string;
  /** Regression: how near the forest's value a tree must be to count as agreeing. */
  readonly tolerance?: number;
}

/** Show at most this many classes in the vote table; the rest are summed so wide targets stay readable. */
const MAX_CLASS_COLUMNS = 6;

export function hoverMarkdown(a: RowAnswer, ctx: HoverContext): string {
  const out: string[] = [];
  const role =
    a.role === 'training'
      ? a.oob
        ? `training row; ${a.oob.trees} of ${a.all.trees} trees never saw it`
        : 'training row; every tree saw it, so there is no out-of-bag vote'
      : a.role === 'holdout'
        ? 'held out of training'
        : `scored with the forest from ${ctx.forestLabel ?? 'another file'}`;
  out.push(`**Copse** · row ${ctx.dataRow} (${role})`);
  out.push('');
  if (a.task === 'classification') classification(a, ctx, out);
  else regression(a, ctx, out);
  if (ctx.suspectReason) {
    out.push('');
    out.push(`$(warning) **Suspect row:** ${escapeMd(ctx.suspectReason)}`);
  }
  if (ctx.showVotesLink) {
    out.push('');
    out.push(`[Show this row's tree votes](${ctx.showVotesLink})`);
  }
  return out.join('\n');
}

function classification(a: RowAnswer, ctx: HoverContext, out: string[]): void {
  const label = (k: number): string => escapeMd(ctx.classes[k] ?? `class ${k}`);
  const proba = a.proba ?? [];
  const ranked = proba
    .map((p, k) => ({ p, k }))
    .sort((x, y) => y.p - x.p || x.k - y.k)
    .filter((e, i) => i < 3 || e.p >= 0.05);
  out.push(`**Predicted ${escapeMd(ctx.target)}: ${label(a.predicted)}**`);
  if (ranked.length) out.push('', 'Probability: ' + ranked.map((e) => `${label(e.k)} ${formatShare(e.p)}`).join(' · '));
  if (a.truth !== undefined) {
    const hit = a.truth === a.predicted;
    out.push('', `True value: ${label(a.truth)} ${hit ? '(matches)' : '(differs)'}`);
  }

  // Vote table: columns are the classes with the most all-tree votes, so the table stays narrow.
  const all = a.all.kind === 'classification' ? a.all.counts : [];
  const order = all
    .map((c, k) => ({ c, k }))
    .sort((x, y) => y.c - x.c || x.k - y.k)
    .map((e) => e.k);
  const shown = order.slice(0, all.length > MAX_CLASS_COLUMNS ? MAX_CLASS_COLUMNS - 1 : MAX_CLASS_COLUMNS);
  if (a.truth !== undefined && !shown.includes(a.truth) && a.truth < all.length) shown[shown.length - 1] = a.truth;
  const hidden = order.filter((k) => !shown.includes(k));
  const cells = (t: VoteTally): string[] => {
    if (t.kind !== 'classification') return [];
    const row = shown.map((k) => String(t.counts[k]));
    if (hidden.length) row.push(String(hidden.reduce((s, k) => s + t.counts[k], 0)));
    return row;
  };
  const header = shown.map(label);
  if (hidden.length) header.push(`${hidden.length} others`);
  out.push('');
  out.push(`| Votes | ${header.join(' | ')} |`);
  out.push(`|---|${header.map(() => '---:').join('|')}|`);
  out.push(`| all ${a.all.trees} trees | ${cells(a.all).join(' | ')} |`);
  if (a.oob) out.push(`| ${a.oob.trees} out-of-bag trees | ${cells(a.oob).join(' | ')} |`);
  out.push('');
  const facts = [`Agreement: ${formatShare(a.agreement)} of trees vote ${label(a.predicted)}`];
  if (a.margin !== undefined) facts.push(`out-of-bag margin ${formatSigned(a.margin)}`);
  out.push(facts.join(' · '));
}

function regression(a: RowAnswer, ctx: HoverContext, out: string[]): void {
  const all = a.all;
  out.push(`**Predicted ${escapeMd(ctx.target)}: ${formatNumber(a.predicted)}**`);
  if (all.kind === 'regression') {
    out.push('', `All ${all.trees} trees: mean ${formatNumber(all.mean)}, sd ${formatNumber(all.sd)}, range ${formatNumber(all.min)} to ${formatNumber(all.max)}`);
  }
  if (a.oob && a.oob.kind === 'regression') {
    out.push('', `${a.oob.trees} out-of-bag trees: mean ${formatNumber(a.oob.mean)}, sd ${formatNumber(a.oob.sd)}`);
  }
  if (a.truth !== undefined) {
    const ref = a.oob && a.oob.kind === 'regression' ? a.oob.mean : a.predicted;
    const which = a.oob ? 'out-of-bag mean' : 'prediction';
    out.push('', `True value: ${formatNumber(a.truth)} (${formatSigned(a.truth - ref)} from the ${which})`);
  }
  const within = ctx.tolerance !== undefined ? ` within ±${formatNumber(ctx.tolerance)} of the prediction` : '';
  out.push('', `Agreement: ${formatShare(a.agreement)} of trees${within}`);
}

function formatSigned(v: number): string {
  const s = formatNumber(Math.abs(v));
  return v < 0 ? `\u2212${s}` : `+${s}`;
}

/** Escapes Markdown so a class label or column name cannot inject links or formatting. */
export function escapeMd(text: string): string {
  return text.replace(/[\\`*_{}[\]()#+\-.!|<>~$]/g, (c) => `\\${c}`);
}
