// Where to put the decision threshold for two classes. A row is flagged (given the second class, the
// "positive" one) when its probability of that class exceeds the threshold, so 0.5 gives the usual
// answer (the larger probability; a tie goes to the first class, as everywhere in Copse).

export interface ThresholdTally {
  readonly threshold: number;
  /** Rows of the positive class flagged, and rows of the other class flagged. */
  readonly truePositives: number;
  readonly falsePositives: number;
}

export interface ThresholdTable {
  /** Rows of each class: the tallies are counts out of these. */
  readonly positives: number;
  readonly negatives: number;
  /** One tally per threshold in THRESHOLD_STEPS steps from 0 to 1, lowest first. */
  readonly tallies: readonly ThresholdTally[];
}

/** Thresholds are offered in steps of 1/100: finer than out-of-bag probabilities of a forest of 100 trees. */
export const THRESHOLD_STEPS = 100;

export const thresholdAt = (j: number): number => j / THRESHOLD_STEPS;

/** The tallies at every threshold step; rows where include(i) is false, or truth is negative, are left out. */
export function thresholdTable(truth: ArrayLike<number>, proba: ArrayLike<number>, include?: (i: number) => boolean): ThresholdTable {
  const grid = Array.from({ length: THRESHOLD_STEPS + 1 }, (_, j) => thresholdAt(j));
  // above[j]: rows whose probability exceeds grid[j - 1] but not grid[j] end their run at step j.
  const posEnd = new Float64Array(THRESHOLD_STEPS + 2);
  const negEnd = new Float64Array(THRESHOLD_STEPS + 2);
  let positives = 0;
  let negatives = 0;
  for (let i = 0; i < truth.length; i++) {
    if ((include && !include(i)) || truth[i] < 0) continue;
    const p = proba[i * 2 + 1];
    // Steps whose threshold p exceeds: 0 .. m - 1, where m is the first step with grid[m] >= p.
    let lo = 0;
    let hi = grid.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (grid[mid] >= p) hi = mid;
      else lo = mid + 1;
    }
    if (truth[i] === 1) {
      positives++;
      posEnd[lo]++;
    } else {
      negatives++;
      negEnd[lo]++;
    }
  }
  // Flagged at step j: rows whose run ends after j.
  const tallies: ThresholdTally[] = [];
  let tp = positives;
  let fp = negatives;
  for (let j = 0; j <= THRESHOLD_STEPS; j++) {
    tp -= posEnd[j];
    fp -= negEnd[j];
    tallies.push({ threshold: grid[j], truePositives: tp, falsePositives: fp });
  }
  return { positives, negatives, tallies };
}

export interface ThresholdReading {
  readonly threshold: number;
  /** confusion[truth][predicted] with the first class first. */
  readonly confusion: readonly [readonly [number, number], readonly [number, number]];
  readonly precision: number;
  readonly recall: number;
  readonly specificity: number;
  readonly balancedAccuracy: number;
  /** Share of rows flagged. */
  readonly flagged: number;
}

/** What a tally means to a reader; the panel's threshold control reads it from the same tallies. */
export function readTally(table: ThresholdTable, t: ThresholdTally): ThresholdReading {
  const { positives, negatives } = table;
  const tp = t.truePositives;
  const fp = t.falsePositives;
  const recall = positives ? tp / positives : NaN;
  const specificity = negatives ? (negatives - fp) / negatives : NaN;
  return {
    threshold: t.threshold,
    confusion: [
      [negatives - fp, fp],
      [positives - tp, tp],
    ],
    precision: tp + fp ? tp / (tp + fp) : NaN,
    recall,
    specificity,
    balancedAccuracy: (recall + specificity) / 2,
    flagged: positives + negatives ? (tp + fp) / (positives + negatives) : NaN,
  };
}

export type PresetKind = 'balanced-accuracy' | 'recall' | 'precision';

export interface ThresholdPreset {
  readonly kind: PresetKind;
  /** The recall or precision aimed at; absent for balanced accuracy. */
  readonly target?: number;
  /** null when no threshold reaches the target. */
  readonly threshold: number | null;
}

/** Targets the presets aim at unless asked otherwise. */
export const PRESET_TARGET = 0.9;

/**
 * Thresholds chosen on the rows of `table`: the highest balanced accuracy (ties: nearest 0.5), the highest
 * threshold that keeps recall at the target, the lowest that reaches the target precision.
 */
export function thresholdPresets(table: ThresholdTable, target = PRESET_TARGET): ThresholdPreset[] {
  const read = table.tallies.map((t) => readTally(table, t));
  let best: ThresholdReading | undefined;
  for (const r of read) {
    if (!Number.isFinite(r.balancedAccuracy)) continue;
    if (!best || r.balancedAccuracy > best.balancedAccuracy || (r.balancedAccuracy === best.balancedAccuracy && Math.abs(r.threshold - 0.5) < Math.abs(best.threshold - 0.5))) best = r;
  }
  const recalled = read.filter((r) => r.recall >= target);
  const precise = read.filter((r) => r.precision >= target);
  return [
    { kind: 'balanced-accuracy', threshold: best?.threshold ?? null },
    { kind: 'recall', target, threshold: recalled.length ? recalled[recalled.length - 1].threshold : null },
    { kind: 'precision', target, threshold: precise.length ? precise[0].threshold : null },
  ];
}

/**
 * Class codes (0 or 1) at a threshold from rows * 2 probabilities: 1 when the second class's probability
 * exceeds it. A row whose `keep` entry is NaN (no answer, e.g. no out-of-bag tree) stays NaN.
 */
export function decideAt(proba: ArrayLike<number>, threshold: number, keep?: ArrayLike<number>): Float64Array {
  const rows = proba.length / 2;
  const out = new Float64Array(rows);
  for (let i = 0; i < rows; i++) out[i] = keep && Number.isNaN(keep[i]) ? NaN : proba[i * 2 + 1] > threshold ? 1 : 0;
  return out;
}
