import * as assert from 'node:assert/strict';
import { drawSample } from '../../src/core/forest/bootstrap';

describe('bootstrap sample', () => {
  it('holds about 1 - 1/e ≈ 0.632 of the distinct rows (Efron 1979; Breiman 1996)', () => {
    const n = 5000;
    let share = 0;
    const trees = 40;
    for (let t = 0; t < trees; t++) {
      const counts = drawSample(7, t, n, n, true);
      assert.equal(counts.reduce((a, b) => a + b, 0), n);
      share += counts.filter((c) => c > 0).length / n;
    }
    share /= trees;
    // Exact expectation 1 - (1 - 1/n)^n; one tree's share has an sd under 0.007 at n = 5000, 40 trees about 0.001.
    const expected = 1 - (1 - 1 / n) ** n;
    assert.ok(Math.abs(share - expected) < 0.005, `share ${share} vs ${expected}`);
    assert.ok(Math.abs(expected - (1 - Math.exp(-1))) < 1e-4);
  });

  it('without replacement draws exactly m distinct rows', () => {
    const counts = drawSample(3, 0, 1000, 250, false);
    assert.equal(counts.filter((c) => c === 1).length, 250);
    assert.ok(counts.every((c) => c <= 1));
  });

  it('depends only on seed and tree index', () => {
    assert.deepEqual(drawSample(5, 2, 100, 100, true), drawSample(5, 2, 100, 100, true));
    assert.notDeepEqual(drawSample(5, 2, 100, 100, true), drawSample(5, 3, 100, 100, true));
    assert.notDeepEqual(drawSample(5, 2, 100, 100, true), drawSample(6, 2, 100, 100, true));
  });
});
