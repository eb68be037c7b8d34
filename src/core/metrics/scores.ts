// Scores users read off a forest, for out-of-bag, holdout and test rows alike.

export interface ClassScore {
  readonly label: string;
  readonly precision: number;
  readonly recall: number;
  readonly support: number;
}

export interface ClassificationScores {
  readonly kind: 'classification';
  readonly rows: number;
  readonly accuracy: number;
  readonly balancedAccuracy: number;
  readonly logLoss: number;
  readonly perClass: readonly ClassScore[];
  /** confusion[truth][predicted] */
  readonly confusion: readonly (readonly number[])[];
}

export interface RegressionScores {
  readonly kind: 'regression';
  readonly rows: number;
  readonly r2: number;
  readonly mae: number;
  readonly rmse: number;
}

export type Scores = ClassificationScores | RegressionScores;

/** Lowest index wins ties, everywhere in Copse, so votes and probabilities agree on one answer. */
export function argmaxAt(values: ArrayLike<number>, offset: number, k: number): number {
  let best = 0;
  for (let j = 1; j < k; j++) if (values[offset + j] > values[offset + best]) best = j;
  return best;
}

/** Log loss clips probabilities to [1e-15, 1] (common practice) so one confident mistake stays finite. */
const EPS = 1e-15;

/**
 * proba: rows * K probabilities (each row summing to 1); include[i] = false leaves row i out
 * (e.g. a row no tree had out-of-bag).
 */
export function classificationScores(truth: ArrayLike<number>, proba: ArrayLike<number>, labels: readonly string[], include?: (i: number) => boolean, decided?: ArrayLike<number>): ClassificationScores {
  const K = labels.length;
  const confusion = labels.map(() => new Array<number>(K).fill(0));
  let rows = 0;
  let correct = 0;
  let loss = 0;
  for (let i = 0; i < truth.length; i++) {
    if (include && !include(i)) continue;
    const y = truth[i];
    // decided: answers at a decision threshold (metrics/thresholds.ts) instead of the larger probability.
    const pred = decided ? decided[i] : argmaxAt(proba, i * K, K);
    confusion[y][pred]++;
    rows++;
    if (pred === y) correct++;
    loss -= Math.log(Math.min(1, Math.max(EPS, proba[i * K + y])));
  }
  const perClass = labels.map((label, k) => {
    let predicted = 0;
    for (let t = 0; t < K; t++) predicted += confusion[t][k];
    const support = confusion[k].reduce((a, b) => a + b, 0);
    return { label, precision: predicted ? confusion[k][k] / predicted : NaN, recall: support ? confusion[k][k] / support : NaN, support };
  });
  const present = perClass.filter((c) => c.support > 0);
  return {
    kind: 'classification',
    rows,
    accuracy: rows ? correct / rows : NaN,
    balancedAccuracy: present.length ? present.reduce((a, c) => a + c.recall, 0) / present.length : NaN,
    logLoss: rows ? loss / rows : NaN,
    perClass,
    confusion,
  };
}

export function regressionScores(truth: ArrayLike<number>, predicted: ArrayLike<number>, include?: (i: number) => boolean): RegressionScores {
  let rows = 0;
  let sum = 0;
  for (let i = 0; i < truth.length; i++) {
    if (include && !include(i)) continue;
    rows++;
    sum += truth[i];
  }
  const mean = sum / rows;
  let sse = 0;
  let sst = 0;
  let abs = 0;
  for (let i = 0; i < truth.length; i++) {
    if (include && !include(i)) continue;
    const d = truth[i] - predicted[i];
    sse += d * d;
    abs += Math.abs(d);
    sst += (truth[i] - mean) ** 2;
  }
  return { kind: 'regression', rows, r2: rows ? 1 - sse / sst : NaN, mae: rows ? abs / rows : NaN, rmse: rows ? Math.sqrt(sse / rows) : NaN };
}
