// The hover for one CSV row, as Markdown. Pure: the editor seam wraps it in a trusted MarkdownString.

import { formatNumber, formatShare, type GroupAnswer, type RowAnswer, type VoteTally } from '../engine';
import { UNAVAILABLE_FOR_IMPORT } from '../session/importText';

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
  /** Set for a forest imported without its training sample: the model file's name. */
  readonly importedFrom?: string;
  /** Says where the row stands instead of the role the answer gives (a row the fitted sample left out). */
  readonly standing?: string;
  /** The row's 1-based line, named when its data row number is not known (dataRow 0). */
  readonly line?: number;
  /** Set when the forest's training rows are not known here (a saved forest against a file read differently). */
  readonly membershipUnknown?: boolean;
  /** A boosted ensemble: its trees add raw scores, so there are no votes to count and no agreement. */
  readonly boosted?: boolean;
}

/** Show at most this many classes in the vote table; the rest are summed so wide targets stay readable. */
const MAX_CLASS_COLUMNS = 6;

export function hoverMarkdown(a: RowAnswer, ctx: HoverContext): string {
  const out: string[] = [];
  const oobTrees = a.oob?.tally.trees ?? 0;
  const role =
    ctx.standing !== undefined
      ? ctx.standing
      : a.role === 'training'
        ? a.oob
          ? `training row; ${oobTrees} of ${a.all.tally.trees} trees never saw it`
          : 'training row; every tree saw it, so there is no out-of-bag vote'
        : a.role === 'holdout'
          ? 'held out of training'
          : ctx.importedFrom !== undefined && ctx.forestLabel === undefined
            ? `scored with the forest imported from ${escapeMd(ctx.importedFrom)}`
            : ctx.forestLabel !== undefined
              ? `scored with the forest from ${ctx.forestLabel}`
              : 'scored by every tree';
  const where = ctx.dataRow > 0 || ctx.line === undefined ? `row ${ctx.dataRow}` : `line ${ctx.line}`;
  out.push(`**Copse** · ${where} (${role})`);
  out.push('');
  if (a.task === 'classification') classification(a, ctx, out);
  else regression(a, ctx, out);
  if (ctx.importedFrom !== undefined) {
    out.push('');
    out.push(`Out-of-bag votes and margins: ${escapeMd(UNAVAILABLE_FOR_IMPORT)}.`);
  } else if (ctx.membershipUnknown) {
    out.push('');
    out.push('Out-of-bag votes: not known here, since this reading of the file does not tell the training rows apart; every tree, including those fitted on the row, is counted.');
  }
  if (ctx.suspectReason) {
    out.push('');
    out.push(`$(warning) **Doubtful row:** ${escapeMd(ctx.suspectReason)}`);
  }
  if (ctx.showVotesLink) {
    out.push('');
    out.push(`[Show this row's tree votes](${ctx.showVotesLink})`);
  }
  return out.join('\n');
}

/** "the 35 trees that never saw this row" or "all 100 trees": who the headline speaks for. */
function whose(a: RowAnswer): string {
  return a.lead === 'out-of-bag' ? `the ${a.headline.tally.trees} trees that never saw this row` : `all ${a.all.tally.trees} trees`;
}

function classification(a: RowAnswer, ctx: HoverContext, out: string[]): void {
  const label = (k: number): string => escapeMd(ctx.classes[k] ?? `class ${k}`);
  const h = a.headline;
  out.push(`**${a.lead === 'out-of-bag' ? 'Out-of-bag prediction of' : 'Predicted'} ${escapeMd(ctx.target)}: ${label(h.predicted)}** (${whose(a)})`);
  const ranked = topShares(h);
  if (ranked.length) out.push('', 'Probability: ' + ranked.map((e) => `${label(e.k)} ${formatShare(e.p)}`).join(' · '));
  if (a.truth !== undefined) out.push('', `Label: ${label(a.truth)} ${a.truth === h.predicted ? '(agrees)' : '(differs)'}`);
  if (a.lead === 'out-of-bag') {
    const all = a.all;
    out.push('', `All ${all.tally.trees} trees, including the ${all.tally.trees - h.tally.trees} fitted on this row: ${label(all.predicted)} ${formatShare(all.proba?.[all.predicted] ?? NaN)}`);
  }
  if (ctx.boosted) return void out.push('', BOOSTED_NOTE);

  // Vote table: columns are the classes with the most all-tree votes, so the table stays narrow.
  const counts = a.all.tally.kind === 'classification' ? a.all.tally.counts : [];
  const order = counts
    .map((c, k) => ({ c, k }))
    .sort((x, y) => y.c - x.c || x.k - y.k)
    .map((e) => e.k);
  const shown = order.slice(0, counts.length > MAX_CLASS_COLUMNS ? MAX_CLASS_COLUMNS - 1 : MAX_CLASS_COLUMNS);
  if (a.truth !== undefined && !shown.includes(a.truth) && a.truth < counts.length) shown[shown.length - 1] = a.truth;
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
  if (a.oob) out.push(`| ${a.oob.tally.trees} out-of-bag trees | ${cells(a.oob.tally).join(' | ')} |`);
  out.push(`| all ${a.all.tally.trees} trees | ${cells(a.all.tally).join(' | ')} |`);
  out.push('');
  const facts = [`Agreement: ${formatShare(h.agreement)} of ${a.lead === 'out-of-bag' ? 'out-of-bag trees' : 'trees'} vote ${label(h.predicted)}`];
  if (a.margin !== undefined) facts.push(`out-of-bag margin ${formatSigned(a.margin)}`);
  out.push(facts.join(' · '));
}

const BOOSTED_NOTE = 'Boosted trees: each adds a raw score to a running total rather than voting, so no votes or agreement are shown; the panel shows each tree\'s raw output.';

function topShares(g: GroupAnswer): Array<{ p: number; k: number }> {
  return (g.proba ?? [])
    .map((p, k) => ({ p, k }))
    .sort((x, y) => y.p - x.p || x.k - y.k)
    .filter((e, i) => i < 3 || e.p >= 0.05);
}

function regression(a: RowAnswer, ctx: HoverContext, out: string[]): void {
  const h = a.headline;
  out.push(`**${a.lead === 'out-of-bag' ? 'Out-of-bag prediction of' : 'Predicted'} ${escapeMd(ctx.target)}: ${formatNumber(h.predicted)}** (${whose(a)})`);
  if (a.truth !== undefined) out.push('', `Label: ${formatNumber(a.truth)} (${formatSigned(a.truth - h.predicted)} from the ${a.lead === 'out-of-bag' ? 'out-of-bag prediction' : 'prediction'})`);
  if (ctx.boosted) return void out.push('', BOOSTED_NOTE);
  for (const [name, g] of [
    [a.lead === 'out-of-bag' ? `${h.tally.trees} out-of-bag trees` : '', a.oob],
    [a.lead === 'out-of-bag' ? `All ${a.all.tally.trees} trees, including those fitted on this row` : `All ${a.all.tally.trees} trees`, a.all],
  ] as const) {
    if (!g || !name || g.tally.kind !== 'regression') continue;
    out.push('', `${name}: mean ${formatNumber(g.tally.mean)}, sd ${formatNumber(g.tally.sd)}, range ${formatNumber(g.tally.min)} to ${formatNumber(g.tally.max)}`);
  }
  const within = ctx.tolerance !== undefined ? ` within ±${formatNumber(ctx.tolerance)} of the prediction` : '';
  out.push('', `Agreement: ${formatShare(h.agreement)} of ${a.lead === 'out-of-bag' ? 'out-of-bag trees' : 'trees'}${within}`);
}

export interface HoverContributions {
  /** The class whose probability is explained, or undefined for a regression value. */
  readonly className?: string;
  readonly target: string;
  readonly base: number;
  readonly prediction: number;
  /** Largest in size first. */
  readonly top: ReadonlyArray<{ readonly feature: string; readonly contribution: number }>;
  /** Features not listed, and what their contributions add up to. */
  readonly others: number;
  readonly rest: number;
  /** Which trees are explained, when not all of them ("the 35 trees that never saw this row"). */
  readonly over?: string;
}

/** The hover's explanation part: the three (or so) features that moved this row's prediction most. */
export function contributionsMarkdown(c: HoverContributions): string {
  const what = c.className !== undefined ? `the probability of ${escapeMd(c.className)}` : `the predicted ${escapeMd(c.target)}`;
  const list = c.top.map((t) => `${escapeMd(t.feature)} ${formatContribution(t.contribution)}`).join(' · ');
  const tail = c.others > 0 ? ` · ${c.others} other${c.others === 1 ? '' : 's'} ${formatContribution(c.rest)}` : '';
  return (
    `**Largest contributions** to ${what}${c.over ? ` according to ${c.over}` : ''} (from ${formatNumber(c.base)} on average to ${formatNumber(c.prediction)} here): ${list}${tail}\n\n` +
    'Each is what knowing that feature moves this prediction by (exact Shapley values of the trees).'
  );
}

/** The hover's interval part for a regression row. */
export function intervalMarkdown(level: number, lower: number, upper: number, target: string): string {
  return (
    `**${formatLevel(level)} prediction interval** for ${escapeMd(target)}: ${formatNumber(lower)} to ${formatNumber(upper)}\n\n` +
    'The middle of the training values that share this row\'s leaves, pooled over the trees (a quantile regression forest).'
  );
}

/** A contribution, signed, to about two significant digits: enough to rank and compare in a hover. */
export function formatContribution(v: number): string {
  if (!Number.isFinite(v)) return formatNumber(v);
  const a = Math.abs(v);
  const s = a >= 10 ? String(Math.round(a)) : a === 0 ? '0' : String(Number(a.toPrecision(2)));
  return v < 0 && s !== '0' ? `\u2212${s}` : `+${s}`;
}

/** 0.9 → "90%", 0.95 → "95%", 0.975 → "97.5%". */
export function formatLevel(level: number): string {
  return `${Number((level * 100).toFixed(1))}%`;
}

function formatSigned(v: number): string {
  const s = formatNumber(Math.abs(v));
  return v < 0 ? `\u2212${s}` : `+${s}`;
}

/** Escapes Markdown so a class label or column name cannot inject links or formatting. */
export function escapeMd(text: string): string {
  return text.replace(/[\\`*_{}[\]()#+\-.!|<>~$]/g, (c) => `\\${c}`);
}
