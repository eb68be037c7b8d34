// Which fold each row belongs to in k-fold cross-validation. Stratified for classes: each class's rows are
// shuffled and dealt round the folds in turn, carrying on from where the previous class stopped, so every
// fold gets each class in (nearly) its overall share and the folds differ in size by at most one row.

/**
 * fold[i] in 0 .. folds - 1 for each of the given rows. `classOf` gives a row's class code (stratified), or
 * is absent (regression: one group). `shuffle` puts an array in a random order: the caller's seeded stream.
 */
export function foldsOf(rows: number, folds: number, shuffle: (a: Int32Array) => void, classOf?: (i: number) => number): Int32Array {
  if (!Number.isInteger(folds) || folds < 2) throw new RangeError(`Cross-validation needs at least 2 folds; got ${folds}.`);
  if (folds > rows) throw new RangeError(`${folds} folds need at least ${folds} rows; there are ${rows}.`);
  const groups = new Map<number, number[]>();
  for (let i = 0; i < rows; i++) {
    const g = classOf ? classOf(i) : 0;
    let list = groups.get(g);
    if (!list) groups.set(g, (list = []));
    list.push(i);
  }
  const fold = new Int32Array(rows);
  let next = 0;
  for (const g of [...groups.keys()].sort((a, b) => a - b)) {
    const members = Int32Array.from(groups.get(g)!);
    shuffle(members);
    for (const i of members) fold[i] = next++ % folds;
  }
  return fold;
}

export interface SpreadOf {
  readonly mean: number;
  /** Standard deviation with the n - 1 denominator; NaN for a single value. */
  readonly sd: number;
}

/** Mean and sample standard deviation of the finite values. */
export function spreadOf(values: readonly number[]): SpreadOf {
  const v = values.filter(Number.isFinite);
  if (v.length === 0) return { mean: NaN, sd: NaN };
  const mean = v.reduce((a, b) => a + b, 0) / v.length;
  const sd = v.length > 1 ? Math.sqrt(v.reduce((a, b) => a + (b - mean) ** 2, 0) / (v.length - 1)) : NaN;
  return { mean, sd };
}
