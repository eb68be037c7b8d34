// Fills a report's data (types.ts) from a forest and the table it is shown against, by calling core: the region
// grid (core/explain/region-grid.ts) scored with core's predictEncoded, partial dependence, contributions. The
// command line and the editor both come through here, so the same fit gives the same report from either.
import { ContributionExplainer, meanAbsoluteContributions, partialDependence } from '../core/explain/index';
import { GridAccumulator, gridBatches, planAxis, rankFeatures, topPairs, type GridPlan } from '../core/explain/region-grid';
import { sampleRows } from '../core/data/sample';
import type { Forest } from '../core/forest/forest';
import { predictEncoded } from '../core/forest/predict';
import { formatNumber } from '../core/format';
import type { FitSummary } from '../core/summary/types';
import type { ReportContributions, ReportData, ReportDependence, ReportMap } from './types';

/** Cells per axis: the chosen map is read closely, the pair maps at a glance. */
export const CHOSEN_RESOLUTION = 64;
export const PAIR_RESOLUTION = 28;
/** Features whose pairs get small maps (4 features: 6 maps). */
export const PAIR_FEATURES = 4;
/** Training rows drawn over the chosen map: a seeded sample, stated under the map. */
export const POINTS_DRAWN = 400;
/** Features given a partial dependence chart, and the rows each is averaged over. */
export const DEPENDENCE_FEATURES = 4;
export const DEPENDENCE_ROWS = 200;
/** Rows whose contributions are averaged, when the forest is small enough to explain them quickly. */
export const CONTRIBUTION_ROWS = 200;
/** Node visits the contribution sample may cost (rows × nodes × depth, roughly); beyond it the sample shrinks. */
const CONTRIBUTION_BUDGET = 4e8;
const MAX_LEVEL_CELLS = 200;

export interface ReportSource {
  readonly summary: FitSummary;
  /** The forest with its trees. */
  readonly forest: Forest;
  /** The table in the forest's feature space, row-major. */
  readonly encoded: Float64Array;
  readonly rows: number;
  /** Table rows the forest was fitted on, or null when not known here (an import, another file). */
  readonly trainRows: ArrayLike<number> | null;
  /** The table's target per row in the forest's codes (NaN: missing). */
  readonly truth: Float64Array;
  readonly file: { readonly name: string; readonly bytes: number | null };
  readonly model?: ReportData['model'];
  readonly version: string;
  /** The pair shown large (the panel's current map); the two leading features when absent. */
  readonly chosen?: readonly [string, string];
  readonly date?: Date;
}

export function gatherReport(src: ReportSource): ReportData {
  const { forest, summary } = src;
  const p = forest.schema.features.length;
  const ranked = ranking(forest, summary).filter((f) => mappable(forest, f));
  // Rows the pictures are drawn from: the training rows when they are known, else every labelled row shown.
  const basis = src.trainRows ? Array.from(src.trainRows) : Array.from({ length: src.rows }, (_, r) => r).filter((r) => !Number.isNaN(src.truth[r]));
  const x = new Float64Array(basis.length * p);
  basis.forEach((r, i) => x.set(src.encoded.subarray(r * p, r * p + p), i * p));
  const seed = summary.settings.seed;

  let chosen: ReportMap | null = null;
  let mapNote: string | undefined;
  const pick = src.chosen?.map((n) => summary.features.indexOf(n));
  const pair = pick && pick[0] >= 0 && pick[1] >= 0 && pick[0] !== pick[1] ? pick : ranked.length >= 2 ? ranked.slice(0, 2) : null;
  if (pair && basis.length > 0) chosen = { ...scoreMap(forest, x, basis.length, pair[0], pair[1], CHOSEN_RESOLUTION), points: points(src, basis, pair[0], pair[1], seed) };
  else mapNote = 'No map: the forest needs two features a map can lay out (numbers, or at most 200 levels) and rows to span them.';
  const pairs = basis.length ? topPairs(ranked, PAIR_FEATURES).map(([a, b]) => scoreMap(forest, x, basis.length, a, b, PAIR_RESOLUTION)) : [];

  const dependence = ranked.slice(0, DEPENDENCE_FEATURES).flatMap((f) => (basis.length ? [dependenceOf(forest, x, basis.length, f, summary)] : []));
  const c = contributionsOf(forest, x, basis.length, seed);
  return {
    summary,
    file: src.file,
    model: src.model,
    version: src.version,
    date: (src.date ?? new Date()).toISOString().replace(/\.\d+Z$/, 'Z'),
    chosen,
    pairs,
    mapNote,
    dependence,
    contributions: 'missing' in c ? null : c,
    contributionsMissing: 'missing' in c ? c.missing : undefined,
  };
}

/** Features by the importance the panel ranks by: permutation where measured, impurity otherwise. */
function ranking(forest: Forest, s: FitSummary): number[] {
  const names = forest.schema.features.map((f) => f.name);
  const perm = Float64Array.from(names, (n) => s.importance.permutation[n] ?? NaN);
  const impurity = Float64Array.from(names, (n) => s.importance.impurity[n] ?? NaN);
  return rankFeatures(perm, impurity);
}

function mappable(forest: Forest, f: number): boolean {
  const info = forest.schema.features[f];
  const levels = info.levels?.length ?? 0;
  return info.kind === 'numeric' || (levels > 0 && levels <= MAX_LEVEL_CELLS);
}

function scoreMap(forest: Forest, x: Float64Array, rows: number, fx: number, fy: number, resolution: number): ReportMap {
  const features = forest.schema.features;
  const p = features.length;
  const xa = planAxis(fx, features[fx], x, p, rows, resolution);
  const ya = planAxis(fy, features[fy], x, p, rows, resolution);
  const base = Float64Array.from(features, (f) => f.reference);
  const plan: GridPlan = { x: xa, y: ya, p, base, baseRows: 1 };
  const classes = forest.schema.target.classes?.length ?? 0;
  const acc = new GridAccumulator(forest.params.task, classes, xa.n * ya.n);
  for (const batch of gridBatches(plan)) acc.add(batch, predictEncoded(forest, batch.x, batch.rows));
  const heldAt = features
    .map((f, i) => ({ f, i }))
    .filter(({ i }) => i !== fx && i !== fy)
    .map(({ f, i }) => ({ feature: f.name, value: f.kind === 'numeric' ? formatNumber(base[i]) : (f.levels?.[base[i]] ?? 'missing') }));
  return { x: xa.axis, y: ya.axis, nx: xa.n, ny: ya.n, cells: acc.finish(), heldAt, points: null };
}

function points(src: ReportSource, basis: number[], fx: number, fy: number, seed: number): ReportMap['points'] {
  const p = src.forest.schema.features.length;
  const usable = basis.filter((r) => !Number.isNaN(src.encoded[r * p + fx]) && !Number.isNaN(src.encoded[r * p + fy]) && !Number.isNaN(src.truth[r]));
  const rows = Array.from(sampleRows(usable.length, POINTS_DRAWN, seed + 1), (i) => usable[i]).sort((a, b) => a - b);
  return {
    x: rows.map((r) => src.encoded[r * p + fx]),
    y: rows.map((r) => src.encoded[r * p + fy]),
    target: rows.map((r) => src.truth[r]),
    total: usable.length,
  };
}

function dependenceOf(forest: Forest, x: Float64Array, rows: number, f: number, s: FitSummary): ReportDependence {
  const d = partialDependence(forest, x, rows, f, { sampleRows: DEPENDENCE_ROWS, seed: s.settings.seed });
  const G = d.grid.values.length;
  const at = d.grid.labels ? [...d.grid.labels] : Array.from(d.grid.values);
  const outputs = s.task === 'classification' ? s.classes.map((name, k) => ({ name, k })) : [{ name: s.target, k: 0 }];
  // Two classes move as mirror images; the second class's line says all there is.
  const shown = s.task === 'classification' && outputs.length === 2 ? [outputs[1]] : outputs;
  return {
    feature: d.grid.name,
    kind: d.grid.kind,
    at,
    lines: shown.map(({ name, k }) => ({ name, colour: k, values: Array.from({ length: G }, (_, g) => d.average[g * d.outputs + k]) })),
    rows: d.iceRows.length,
  };
}

function contributionsOf(forest: Forest, x: Float64Array, rows: number, seed: number): ReportContributions | { missing: string } {
  if (rows === 0) return { missing: 'No rows to explain.' };
  let cost = 0;
  for (const t of forest.trees) cost += t.nodeCount * Math.max(1, Math.log2(t.nodeCount + 1));
  const affordable = Math.floor(CONTRIBUTION_BUDGET / Math.max(1, cost));
  const wanted = Math.min(CONTRIBUTION_ROWS, rows, affordable);
  if (wanted < 20) return { missing: 'Not worked out for the report: this forest is too large to explain enough rows quickly (the editor’s panel works it out in the background).' };
  const p = forest.schema.features.length;
  const pick = Array.from(sampleRows(rows, wanted, seed + 2)).sort((a, b) => a - b);
  const sample = new Float64Array(pick.length * p);
  pick.forEach((r, i) => sample.set(x.subarray(r * p, r * p + p), i * p));
  const g = meanAbsoluteContributions(new ContributionExplainer(forest).explainRows(sample, pick.length));
  const byFeature: Record<string, number> = {};
  forest.schema.features.forEach((f, j) => (byFeature[f.name] = g.overall[j]));
  return { byFeature, rows: pick.length };
}
