// Features are binned once into bytes; every split is then a scan over at most 256 bins (the histogram idea
// of LightGBM). Numeric edges sit between distinct training values, so a raw value and its bin always fall on
// the same side of a threshold.
import type { FeatureInfo } from '../base/schema';
import type { Column, LevelColumn, NumericColumn } from './table';

export const MAX_BINS = 256;

/** Row-major bytes bins[row * features + f], in shared memory so worker threads read it without a copy. */
export interface BinnedMatrix {
  readonly rows: number;
  readonly features: number;
  readonly bins: Uint8Array;
  /** Value bins of each feature; the code valueBins[f] (when present) means missing. */
  readonly valueBins: Int32Array;
  readonly categorical: Uint8Array;
  /** Numeric features: mean training value in each bin (empty for categorical ones). */
  readonly centres: readonly (readonly number[])[];
}

/** Numeric edges from the training values: exact below MAX_BINS distinct values, quantiles above. */
export function numericEdges(values: Float64Array, hasMissingSlot: boolean): number[] {
  const sorted = Float64Array.from(values.filter((v) => !Number.isNaN(v))).sort();
  const distinct: number[] = [];
  for (let i = 0; i < sorted.length; i++) if (i === 0 || sorted[i] !== sorted[i - 1]) distinct.push(sorted[i]);
  const maxBins = hasMissingSlot ? MAX_BINS - 1 : MAX_BINS;
  const uppers: number[] = [];
  if (distinct.length <= maxBins) {
    for (let j = 0; j < distinct.length - 1; j++) uppers.push(j);
  } else {
    // Upper ends of equal-frequency bins, as positions in `distinct`; duplicates collapse.
    let d = 0;
    for (let b = 1; b < maxBins; b++) {
      const q = sorted[Math.min(sorted.length - 1, Math.floor((b * sorted.length) / maxBins))];
      while (d < distinct.length - 1 && distinct[d] < q) d++;
      if (d >= distinct.length - 1) break;
      if (uppers.length === 0 || uppers[uppers.length - 1] !== d) uppers.push(d);
    }
  }
  return uppers.map((j) => midpoint(distinct[j], distinct[j + 1]));
}

function midpoint(a: number, b: number): number {
  const m = a + (b - a) / 2;
  // Adjacent doubles: the midpoint rounds onto b, which would put b on the wrong side.
  return m < b ? m : a;
}

/** First bin whose upper edge is >= x. */
export function binOf(edges: readonly number[], x: number): number {
  let lo = 0;
  let hi = edges.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (x <= edges[mid]) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

export function median(values: Float64Array): number {
  const s = Float64Array.from(values.filter((v) => !Number.isNaN(v))).sort();
  if (s.length === 0) return NaN;
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Schema entries for the given feature columns, computed from the training rows only. */
export function describeFeatures(columns: readonly Column[], rows: Int32Array): { infos: FeatureInfo[]; notes: string[] } {
  const infos: FeatureInfo[] = [];
  const notes: string[] = [];
  for (const col of columns) {
    if (col.kind === 'numeric') infos.push(describeNumeric(col, rows));
    else {
      const { info, note } = describeLevels(col, rows);
      infos.push(info);
      if (note) notes.push(note);
    }
  }
  return { infos, notes };
}

function describeNumeric(col: NumericColumn, rows: Int32Array): FeatureInfo {
  const v = new Float64Array(rows.length);
  let hadMissing = false;
  for (let i = 0; i < rows.length; i++) {
    v[i] = col.values[rows[i]];
    if (Number.isNaN(v[i])) hadMissing = true;
  }
  return { name: col.name, kind: 'numeric', edges: numericEdges(v, hadMissing), hadMissing, reference: median(v) };
}

function describeLevels(col: LevelColumn, rows: Int32Array): { info: FeatureInfo; note?: string } {
  const counts = new Float64Array(col.levels.length);
  let hadMissing = false;
  for (let i = 0; i < rows.length; i++) {
    const c = col.codes[rows[i]];
    if (c < 0) hadMissing = true;
    else counts[c]++;
  }
  // Bins are bytes: beyond the cap, the rarest levels score as unseen (and so take the missing side).
  const cap = hadMissing ? MAX_BINS - 1 : MAX_BINS;
  let keep = col.levels.map((_, i) => i).filter((i) => counts[i] > 0);
  let note: string | undefined;
  if (keep.length > cap) {
    const dropped = keep.length - cap;
    keep = [...keep].sort((a, b) => counts[b] - counts[a] || a - b).slice(0, cap).sort((a, b) => a - b);
    hadMissing = true;
    note = `Column "${col.name}" has more than ${cap} levels; its ${dropped} rarest are treated as missing.`;
  }
  let best = keep[0] ?? 0;
  for (const i of keep) if (counts[i] > counts[best]) best = i;
  const levels = keep.map((i) => col.levels[i]);
  return { info: { name: col.name, kind: col.kind, levels, hadMissing, reference: Math.max(0, keep.indexOf(best)) }, note };
}

/** Feature-space value of one cell: the raw number, or the level's code in the schema; NaN when missing or unseen. */
export function levelIndex(info: FeatureInfo): Map<string, number> {
  const m = new Map<string, number>();
  (info.levels ?? []).forEach((l, i) => m.set(l, i));
  return m;
}

/** Bins the given rows of the feature columns. The byte matrix lives in a SharedArrayBuffer. */
export function binColumns(columns: readonly Column[], infos: readonly FeatureInfo[], rows: Int32Array): BinnedMatrix {
  const n = rows.length;
  const p = columns.length;
  const bins = new Uint8Array(new SharedArrayBuffer(Math.max(1, n * p)));
  const valueBins = new Int32Array(p);
  const categorical = new Uint8Array(p);
  const centres: number[][] = [];
  for (let f = 0; f < p; f++) {
    const col = columns[f];
    const info = infos[f];
    if (col.kind === 'numeric') {
      const edges = info.edges ?? [];
      valueBins[f] = edges.length + 1;
      const missing = valueBins[f];
      const sum = new Float64Array(valueBins[f]);
      const count = new Float64Array(valueBins[f]);
      for (let i = 0; i < n; i++) {
        const x = col.values[rows[i]];
        if (Number.isNaN(x)) bins[i * p + f] = missing;
        else {
          const b = binOf(edges, x);
          bins[i * p + f] = b;
          sum[b] += x;
          count[b]++;
        }
      }
      centres.push(Array.from(sum, (s, b) => (count[b] ? s / count[b] : b < edges.length ? edges[b] : edges[edges.length - 1] ?? 0)));
    } else {
      centres.push([]);
      categorical[f] = 1;
      const levels = info.levels ?? [];
      valueBins[f] = levels.length;
      const index = levelIndex(info);
      const remap = col.levels.map((l) => index.get(l) ?? -1);
      for (let i = 0; i < n; i++) {
        const c = col.codes[rows[i]];
        const code = c < 0 ? -1 : remap[c];
        bins[i * p + f] = code < 0 ? valueBins[f] : code;
      }
    }
  }
  return { rows: n, features: p, bins, valueBins, categorical, centres };
}
