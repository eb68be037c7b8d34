// Shaping explanations for the panel and the hover: pure functions from core's numbers to protocol data and
// to what a person reads. No `vscode` here.

import type { Dependence, RowContributions } from '../../protocol/messages';
import type { FeatureInfo, Forest, PartialDependence } from '../engine';
import { formatNumber } from '../engine';

/** The signed contributions of one row to one output, ready to show. */
export interface RowExplanation {
  /** Class code explained, or null for a regression value. */
  readonly output: number | null;
  /** The mean expected output, with no feature known, of the trees the row was explained over. */
  readonly base: number;
  /**
   * base plus the contributions: those trees' mean output for the row. With all trees, the forest's probability
   * of the class or its value; with the row's out-of-bag trees, its out-of-bag probability or value.
   */
  readonly prediction: number;
  /** One per feature, in the forest's order. */
  readonly values: Float64Array;
  /** How many trees the row was explained over. */
  readonly trees: number;
  /** true when those trees never drew the row (its out-of-bag trees, or every tree for a row not trained on). */
  readonly outOfBag: boolean;
  /** Set when the row's out-of-bag trees were asked for and all trees were used instead: why, as the end of a sentence. */
  readonly note?: string;
}

/** A feature's encoded value as a person reads it. */
export function featureValueText(f: FeatureInfo, v: number): string {
  if (Number.isNaN(v)) return '(missing)';
  if (f.kind === 'numeric') return formatNumber(v);
  return f.levels?.[v] ?? String(v);
}

export function rowContributionsMessage(forest: Forest, x: ArrayLike<number>, offset: number, dataRow: number, e: RowExplanation): RowContributions {
  return {
    row: dataRow,
    output: e.output,
    base: e.base,
    prediction: e.prediction,
    trees: e.trees,
    outOfBag: e.outOfBag,
    features: forest.schema.features.map((f, j) => ({ feature: f.name, value: featureValueText(f, x[offset + j]), contribution: e.values[j] })),
  };
}

/** The n contributions largest in size, largest first (ties: forest order), and what the rest add up to. */
export function largestContributions(names: readonly string[], values: ArrayLike<number>, n: number): { top: Array<{ feature: string; contribution: number }>; rest: number; others: number } {
  const order = Array.from({ length: values.length }, (_, j) => j).sort((a, b) => Math.abs(values[b]) - Math.abs(values[a]) || a - b);
  const top = order.slice(0, n).map((j) => ({ feature: names[j], contribution: values[j] }));
  let rest = 0;
  for (const j of order.slice(n)) rest += values[j];
  return { top, rest, others: Math.max(0, order.length - n) };
}

/**
 * The class a dependence view shows when none was asked for: the one whose average curve moves most, since
 * a flat curve says little. Regression has one output.
 */
export function defaultDependenceOutput(pd: PartialDependence): number {
  const G = pd.grid.values.length;
  const K = pd.outputs;
  let best = 0;
  let bestRange = -1;
  for (let k = 0; k < K; k++) {
    let lo = Infinity;
    let hi = -Infinity;
    for (let g = 0; g < G; g++) {
      const v = pd.average[g * K + k];
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
    if (hi - lo > bestRange + 1e-12) {
      best = k;
      bestRange = hi - lo;
    }
  }
  return best;
}

/** Partial dependence for one output as the protocol carries it; rows become data rows through `dataRowOf`. */
export function dependenceMessage(pd: PartialDependence, output: number, classification: boolean, dataRowOf: (trainPosition: number) => number): Dependence {
  const G = pd.grid.values.length;
  const K = pd.outputs;
  const k = Math.min(Math.max(0, output), K - 1);
  const average = Array.from({ length: G }, (_, g) => pd.average[g * K + k]);
  const ice = Array.from(pd.iceRows, (_, s) => Array.from({ length: G }, (_, g) => pd.ice[(s * G + g) * K + k]));
  return {
    feature: pd.grid.name,
    kind: pd.grid.kind,
    grid: Array.from(pd.grid.values),
    labels: pd.grid.kind === 'numeric' ? null : [...(pd.grid.labels ?? [])],
    output: classification ? k : null,
    average,
    ice,
    iceRows: Array.from(pd.iceRows, dataRowOf),
    counts: Array.from(pd.distribution.counts),
    boundaries: Array.from(pd.distribution.boundaries),
    missing: pd.distribution.missing,
  };
}

/**
 * Base plus contributions for each output of row i of an answer: the mean output of the trees it was explained
 * over (class probabilities, or the value). For an out-of-bag answer, the row's out-of-bag prediction.
 */
export function outputsOf(c: { base: Float64Array; values: Float64Array; features: number; outputs: number }, i = 0): Float64Array {
  const { features: p, outputs: K } = c;
  const out = c.base.slice(i * K, (i + 1) * K);
  for (let j = 0; j < p; j++) for (let k = 0; k < K; k++) out[k] += c.values[(i * p + j) * K + k];
  return out;
}
