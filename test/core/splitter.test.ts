// The Gini fast path keeps its sums of squares up to date instead of recomputing them; it must choose the
// same split, with the same score, as the general scan.
import * as assert from 'node:assert/strict';
import seedrandom from 'seedrandom';
import { sideScore } from '../../src/core/tree/criterion';
import { emptyCandidate, Histogram, HistogramSet } from '../../src/core/tree/splitter';

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

describe('histogram set', () => {
  // The one-pass fill of several features must give each lane exactly what filling that feature alone gives,
  // and the two/three-class Gini scan exactly the score of the array-based incremental reference below.
  it('fills each lane as a lone histogram would, and scans to bit-identical scores', () => {
    const rng = seedrandom('histogram-set');
    const score = sideScore('gini');
    const key = () => 0;
    for (let trial = 0; trial < 100; trial++) {
      const K = 2 + Math.floor(rng() * 2);
      const p = 6;
      const n = 2 + Math.floor(rng() * 400);
      const valueBins = 2 + Math.floor(rng() * 200);
      const bins = new Uint8Array(n * p);
      for (let i = 0; i < bins.length; i++) bins[i] = Math.floor(rng() * valueBins);
      const y = Int32Array.from({ length: n }, () => Math.floor(rng() * K));
      // Fractional weights too: sums then depend on their order, which the lanes must keep.
      const w = Float64Array.from({ length: n }, () => (rng() < 0.5 ? 1 + Math.floor(rng() * 3) : rng() * 2 + 0.01));
      const idx = Int32Array.from({ length: n }, (_, i) => i);
      const total = new Float64Array(K);
      for (let i = 0; i < n; i++) total[y[i]] += w[i];
      const features = Int32Array.from([4, 1, 5, 2]);
      const set = new HistogramSet(K, features.length);
      set.addClasses(bins, p, features, features.length, idx, 0, n, y, w);
      for (let i = 0; i < features.length; i++) {
        const alone = new Histogram(K);
        alone.addClasses(bins, p, features[i], idx, 0, n, y, w);
        assert.deepEqual(set.lanes[i].ch.subarray(0, alone.ch.length), alone.ch, `trial ${trial} lane ${i}`);
        assert.deepEqual(set.lanes[i].cnt.subarray(0, alone.cnt.length), alone.cnt);
        const a = emptyCandidate();
        const b = emptyCandidate();
        set.lanes[i].scan(features[i], valueBins, false, total, n, 1, score, key, a, true);
        alone.scan(features[i], valueBins, false, total, n, 1, score, key, b, true);
        assert.deepEqual(a, b);
        const ref = referenceGini(alone.ch, alone.cnt, valueBins, K, total, n);
        assert.equal(a.score, ref.score, `trial ${trial}: the fast scan's score differs from the reference in some bit`);
        assert.equal(a.bin, ref.bin);
        set.lanes[i].clear();
        assert.ok(set.lanes[i].cnt.every((c) => c === 0) && set.lanes[i].ch.every((c) => c === 0) && set.lanes[i].held.every((h) => h === 0));
      }
    }
  });
});

/** The Gini scan with its running sums in arrays, as the grower did before the two/three-class fast path. */
function referenceGini(ch: Float64Array, cnt: Int32Array, valueBins: number, K: number, total: Float64Array, totalCount: number): { score: number; bin: number } {
  const order: number[] = [];
  for (let b = 0; b < valueBins; b++) if (cnt[b] > 0) order.push(b);
  const left = new Float64Array(K);
  const right = Float64Array.from(total);
  let wl = 0;
  let wr = 0;
  let sql = 0;
  let sqr = 0;
  for (let k = 0; k < K; k++) {
    wr += total[k];
    sqr += total[k] * total[k];
  }
  let best = { score: -Infinity, bin: -1 };
  let leftCount = 0;
  for (let i = 0; i < order.length - 1; i++) {
    const o = order[i] * K;
    for (let k = 0; k < K; k++) {
      const c = ch[o + k];
      if (c === 0) continue;
      sql += c * (2 * left[k] + c);
      sqr += c * (c - 2 * right[k]);
      left[k] += c;
      right[k] -= c;
      wl += c;
      wr -= c;
    }
    leftCount += cnt[order[i]];
    if (leftCount < 1 || totalCount - leftCount < 1) continue;
    const s = sql / wl + sqr / wr;
    if (s > best.score) best = { score: s, bin: order[i] };
  }
  return best;
}
