// Uniform sampling of rows from a stream of unknown length.

import seedrandom from 'seedrandom';

/**
 * Reservoir sampling (Vitter's Algorithm R, common practice): row i (0-based) is kept with probability k/(i+1)
 * and replaces a uniformly chosen earlier keeper, so at the end every row was kept with the same probability.
 * The same seed and the same rows give the same sample.
 */
export class Reservoir {
  private seen = 0;
  private readonly random: seedrandom.PRNG;

  constructor(
    readonly capacity: number,
    seed: number,
  ) {
    this.random = seedrandom(`copse-sample:${seed}`);
  }

  /** Rows offered so far. */
  get offered(): number {
    return this.seen;
  }

  /** The slot the next row goes to, or -1 when it is not kept. */
  admit(): number {
    const i = this.seen++;
    if (i < this.capacity) return i;
    const j = Math.floor(this.random() * (i + 1));
    return j < this.capacity ? j : -1;
  }
}
