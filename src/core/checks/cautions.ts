// Cautions shown with every fit: things that make a good-looking score mean less than it seems.
// Thresholds are our own choices (stated beside each); the checks are cheap counting over at most
// CHECK_ROWS rows, not model fitting, so they run in the host without holding it up.

import type { Column } from '../data/table';
import { sampleRows } from '../data/sample';
import type { Task } from '../forest/params';
import { formatShare } from '../format';
import { singleFeatureScore } from './single-feature';

/** What a caution is about; `column` names the feature concerned, when one is. */
export type CautionKind = 'imbalance' | 'leakage' | 'cardinality' | 'missing';

export interface Caution {
  readonly kind: CautionKind;
  readonly column?: string;
  readonly message: string;
}

export interface CautionInput {
  readonly task: Task;
  readonly classes: readonly string[];
  readonly target: string;
  /** The table's columns for the model's features, in feature order. */
  readonly features: readonly Column[];
  /** Table row of each training row. */
  readonly trainRows: Int32Array;
  /** Class code or value per training row (indexed like trainRows). */
  readonly truth: Float64Array;
  readonly permutation?: Float64Array;
  /** OOB accuracy (classification) or R² (regression); NaN when unknown. */
  readonly oobScore: number;
  readonly oobBalancedAccuracy?: number;
  readonly seed: number;
}

/** Rows looked at by the single-feature check; enough to tell "nearly perfect" from "good". */
const CHECK_ROWS = 20_000;
/** Minority share below which accuracy is dominated by the larger classes (our threshold). */
const MINORITY_SHARE = 0.1;
/** A feature whose held-back single-feature accuracy reaches this "nearly predicts" the target. */
const LEAK_ACCURACY = 0.98;
const LEAK_R2 = 0.98;
/** Share of all positive permutation importance above which one feature "dominates". */
const DOMINANT_SHARE = 0.9;
const MANY_LEVELS = 50;
const MISSING_SHARE = 0.2;

export function cautions(input: CautionInput): Caution[] {
  const out: Caution[] = [];
  if (input.task === 'classification') imbalance(input, out);
  leakage(input, out);
  cardinality(input, out);
  missing(input, out);
  return out;
}

function imbalance(input: CautionInput, out: Caution[]): void {
  const K = input.classes.length;
  if (K < 2) return;
  const counts = new Array<number>(K).fill(0);
  for (const c of input.truth) if (c >= 0 && c < K) counts[c]++;
  const total = counts.reduce((a, b) => a + b, 0);
  if (total === 0) return;
  let minK = 0;
  for (let k = 1; k < K; k++) if (counts[k] < counts[minK]) minK = k;
  const share = counts[minK] / total;
  if (share >= MINORITY_SHARE) return;
  const bal =
    input.oobBalancedAccuracy !== undefined && Number.isFinite(input.oobBalancedAccuracy)
      ? ` Out-of-bag balanced accuracy is ${formatShare(input.oobBalancedAccuracy)}.`
      : '';
  out.push({
    kind: 'imbalance',
    message:
      `Class imbalance: "${input.classes[minK]}" is ${formatShare(share)} of training rows (${counts[minK]} of ${total}). ` +
      `Plain accuracy can look good by favouring the larger classes; read per-class recall.${bal} ` +
      'Weighting classes equally helps (the balance setting in the editor, --class-weight balanced on the command line).',
  });
}

function leakage(input: CautionInput, out: Caution[]): void {
  const rows = sampleRows(input.trainRows.length, CHECK_ROWS, input.seed);
  const half = rows.length >> 1;
  if (half < 30) return;
  const fit = rows.subarray(0, half);
  const check = rows.subarray(half);
  let flagged = false;
  input.features.forEach((col) => {
    const s = singleFeatureScore(col, input, fit, check);
    if (!s) return;
    const nearly =
      input.task === 'classification'
        ? s.score >= LEAK_ACCURACY && 1 - s.score <= 0.1 * (1 - s.baseline)
        : s.score >= LEAK_R2;
    if (!nearly) return;
    flagged = true;
    const what = input.task === 'classification' ? `${formatShare(s.score)} accuracy` : `R² ${s.score.toFixed(3)}`;
    out.push({
      kind: 'leakage',
      column: col.name,
      message:
        `Possible leakage: "${col.name}" alone predicts "${input.target}" with ${what} on rows it was not tallied on. ` +
        'If it is recorded after the outcome, or computed from it, leave it out and fit again.',
    });
  });
  if (flagged || !input.permutation || input.features.length < 3) return;
  let total = 0;
  let top = 0;
  for (let f = 0; f < input.permutation.length; f++) {
    const v = input.permutation[f];
    if (v > 0) total += v;
    if (v > input.permutation[top]) top = f;
  }
  if (total <= 0) return;
  const share = input.permutation[top] / total;
  if (share >= DOMINANT_SHARE) {
    out.push({
      kind: 'leakage',
      column: input.features[top].name,
      message:
        `One feature dominates: "${input.features[top].name}" carries ${formatShare(share)} of the permutation importance. ` +
        `Check that it is known before "${input.target}" is, not a restatement of it.`,
    });
  }
}

function cardinality(input: CautionInput, out: Caution[]): void {
  const n = input.trainRows.length;
  for (const col of input.features) {
    if (col.kind === 'numeric') continue;
    const levels = col.levels.length;
    if (levels > MANY_LEVELS || (levels > 10 && levels >= 0.5 * n)) {
      out.push({
        kind: 'cardinality',
        column: col.name,
        message:
          `"${col.name}" has ${levels} distinct values for ${n} training rows. Splits on many-valued categories fit noise ` +
          'easily and inflate impurity importance (Strobl et al. 2007, BMC Bioinformatics 8:25); trust its permutation importance instead, or leave it out.',
      });
    }
  }
}

function missing(input: CautionInput, out: Caution[]): void {
  const n = input.trainRows.length;
  if (n === 0) return;
  const heavy: string[] = [];
  for (const col of input.features) {
    let miss = 0;
    for (const r of input.trainRows) {
      if (col.kind === 'numeric' ? Number.isNaN(col.values[r]) : col.codes[r] < 0) miss++;
    }
    if (miss / n > MISSING_SHARE) heavy.push(`"${col.name}" ${formatShare(miss / n)}`);
  }
  if (heavy.length) {
    out.push({
      kind: 'missing',
      message:
        `Many missing values: ${heavy.join(', ')} of training rows. Each split sends missing cells one way, ` +
        'so the model learns where values tend to be absent as much as what they are.',
    });
  }
}
