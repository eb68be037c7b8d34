// Decision-region maps of the active forest: core plans and folds the grid (core/explain/region-grid.ts), the
// session's scorer scores it in its worker, and this shapes the result for the panel. No `vscode` here.

import { describeRegions } from '../../core/explain/region-text';
import type { PointSample, ReferenceChoice, RegionMap } from '../../protocol/messages';
import { cellsFromAverages, GridAccumulator, gridBatches, planAxis, rankFeatures, sampleRows, topPairs, type GridPlan } from '../engine';
import type { PanelSettings } from '../settings';
import { featureValueText } from './explanations';
import type { ForestSession } from './session';

/**
 * Cells per axis at most for partial-dependence maps, as copse.panel.gridResolution's description promises.
 * Core's grid walk would afford finer maps; the cap stays until that description changes with it.
 */
export const AVERAGED_RESOLUTION = 40;

/**
 * Features by the importance the panel shows, best first: permutation importance where it was measured,
 * impurity otherwise (core's rankFeatures), keeping only features a map can draw.
 */
export function mappableRanking(s: ForestSession): number[] {
  const imp = s.summary.importance;
  const perm = Float64Array.from(imp, (m) => m.permutation ?? NaN);
  const impurity = Float64Array.from(imp, (m) => m.impurity);
  return rankFeatures(perm, impurity).filter((f) => mappable(s, f));
}

function mappable(s: ForestSession, f: number): boolean {
  const info = s.forest.schema.features[f];
  const levels = info.levels?.length ?? 0;
  return info.kind === 'numeric' || (levels > 0 && levels <= 200);
}

export async function regionMap(s: ForestSession, x: string, y: string, reference: ReferenceChoice, panel: PanelSettings): Promise<RegionMap> {
  const fx = s.featureIndex(x);
  const fy = s.featureIndex(y);
  if (fx === fy) throw new RangeError('Pick two different features for the map.');
  // Each averaged cell costs one prediction per sampled row, so those maps are drawn coarser.
  const resolution = reference.mode === 'averaged' ? Math.min(panel.gridResolution, AVERAGED_RESOLUTION) : panel.gridResolution;
  const map = await scoreMap(s, fx, fy, reference, resolution, panel.dependenceRows);
  return { ...map, points: points(s, fx, fy, panel.pointsDrawn) };
}

/** Small maps for pairs among the most important features, drawn without points. */
export async function mapMatrix(s: ForestSession, panel: PanelSettings, limit: number): Promise<RegionMap[]> {
  const pairs = topPairs(mappableRanking(s), panel.pairFeatures).slice(0, limit);
  const res = Math.max(10, Math.min(32, Math.round(panel.gridResolution / 3)));
  const maps: RegionMap[] = [];
  for (const [a, b] of pairs) maps.push({ ...(await scoreMap(s, a, b, { mode: 'typical' }, res, panel.dependenceRows)), points: null });
  return maps;
}

async function scoreMap(s: ForestSession, fx: number, fy: number, reference: ReferenceChoice, resolution: number, averageRows: number): Promise<Omit<RegionMap, 'points'>> {
  const schema = s.forest.schema;
  const { p } = s;
  const rows = s.table.rowCount;
  const xa = planAxis(fx, schema.features[fx], s.encoded, p, rows, resolution);
  const ya = planAxis(fy, schema.features[fy], s.encoded, p, rows, resolution);
  let base: Float64Array;
  let used: RegionMap['reference'];
  if (reference.mode === 'row') {
    const t = s.numbering.tableRow(reference.row);
    if (t === undefined) throw new RangeError(`Row ${reference.row} is not among the rows the forest was shown against.`);
    base = s.encoded.slice(t * p, t * p + p);
    used = { mode: 'row', row: reference.row };
  } else if (reference.mode === 'averaged') {
    // Two-feature partial dependence (Friedman 2001, section 8.2 from memory): core walks each sampled row
    // through each tree once, splitting the grid only where a tree tests one of the two features.
    const e = s.requireExplanations();
    const d = await e.dependence2D(fx, fy, xa.values, ya.values, averageRows);
    const cells = cellsFromAverages(s.task, d.outputs, xa.n * ya.n, d.values);
    const grid = { x: xa.axis, y: ya.axis, nx: xa.n, ny: ya.n, cells };
    return { ...grid, reference: { mode: 'averaged', sampleRows: d.rows }, heldAt: [], text: describeRegions(grid, s.classes) };
  } else {
    base = Float64Array.from(schema.features, (f) => f.reference);
    used = { mode: 'typical' };
  }
  const plan: GridPlan = { x: xa, y: ya, p, base, baseRows: 1 };
  const acc = new GridAccumulator(s.task, s.classes.length, xa.n * ya.n);
  for (const batch of gridBatches(plan)) acc.add(batch, await s.scorer.predict(batch.x, batch.rows));
  const grid = { x: xa.axis, y: ya.axis, nx: xa.n, ny: ya.n, cells: acc.finish() };
  return { ...grid, reference: used, heldAt: heldAtText(s, base, fx, fy), text: describeRegions(grid, s.classes) };
}

function heldAtText(s: ForestSession, base: Float64Array, fx: number, fy: number): RegionMap['heldAt'] {
  return s.forest.schema.features
    .map((f, i) => ({ f, i }))
    .filter(({ i }) => i !== fx && i !== fy)
    .map(({ f, i }) => ({ feature: f.name, value: featureValueText(f, base[i]) }));
}

/** A seeded sample of training rows with both coordinates, for drawing over a map. */
function points(s: ForestSession, fx: number, fy: number, limit: number): PointSample | null {
  if (limit <= 0) return null;
  const { p } = s;
  const usable: number[] = [];
  for (const r of s.trainRows) {
    if (!Number.isNaN(s.encoded[r * p + fx]) && !Number.isNaN(s.encoded[r * p + fy]) && !Number.isNaN(s.truth[r])) usable.push(r);
  }
  const pick = sampleRows(usable.length, limit, s.seed + 1);
  const rows = Array.from(pick, (i) => usable[i]).sort((a, b) => a - b);
  const out: PointSample = { x: [], y: [], target: [], row: [], total: usable.length };
  for (const r of rows) {
    out.target.push(s.truth[r]);
    out.x.push(s.encoded[r * p + fx]);
    out.y.push(s.encoded[r * p + fy]);
    out.row.push(s.numbering.dataRow(r));
  }
  return out;
}
