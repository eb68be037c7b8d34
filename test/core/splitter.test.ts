// The Gini fast path keeps its sums of squares up to date instead of recomputing them; it must choose the
// same split, with the same score, as the general scan.
import * as assert from 'node:assert/strict';
import seedrandom from 'seedrandom';
import { sideScore } from '../../src/core/tree/criterion';
import { emptyCandidate, Histogram } from '../../src/core/tree/splitter';

describe('splitter', () => {
  it('finds the same Gini split on the fast path as on the general scan', () => {
    const rng = seedrandom('splitter');
    const score = sideScore('gini');
    for (let trial = 0; trial < 200; trial++) {
      const K = 2 + Math.floor(rng() * 3);
      const bins = 2 + Math.floor(rng() * 40);
      const n = 5 + Math.floor(rng() * 300);
      const p = 1;
      const data = new Uint8Array(n);
      const y = new Int32Array(n);
      const w = new Float64Array(n);
      const idx = Int32Array.from({ length: n }, (_, i) => i);
      const total = new Float64Array(K);
      for (let i = 0; i < n; i++) {
        data[i] = Math.floor(rng() * bins);
        y[i] = Math.floor(rng() * K);
        w[i] = 1 + Math.floor(rng() * 3);
        total[y[i]] += w[i];
      }
      const minLeaf = 1 + Math.floor(rng() * 3);
      const categorical = rng() < 0.3;
      const key = (ch: Float64Array, o: number) => ch[o] / Math.max(1e-9, ch.subarray(o, o + K).reduce((a, b) => a + b, 0));
      const run = (gini: boolean) => {
        const h = new Histogram(K);
        h.addClasses(data, p, 0, idx, 0, n, y, w);
        const best = emptyCandidate();
        h.scan(0, bins, categorical, total, n, minLeaf, score, key, best, gini);
        return best;
      };
      const a = run(false);
      const b = run(true);
      assert.equal(b.bin, a.bin, `trial ${trial}`);
      assert.equal(b.nextBin, a.nextBin);
      assert.deepEqual(b.levelSet, a.levelSet);
      if (a.feature >= 0) assert.ok(Math.abs(a.score - b.score) <= 1e-9 * Math.abs(a.score), `trial ${trial}: ${a.score} vs ${b.score}`);
      else assert.equal(b.feature, -1);
    }
  });
});
