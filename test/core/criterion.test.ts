// Hand-worked split figures. Definitions: Gini index and entropy as in Breiman, Friedman, Olshen & Stone (1984),
// "Classification and Regression Trees", ch. 4; squared error (variance) reduction as in its ch. 8.
import * as assert from 'node:assert/strict';
import { nodeImpurity, sideScore } from '../../src/core/tree/criterion';

const decrease = (criterion: 'gini' | 'entropy' | 'squared-error', parent: number[], left: number[], right: number[]) => {
  const s = sideScore(criterion);
  const c = parent.length;
  return s(Float64Array.from(left), 0, c) + s(Float64Array.from(right), 0, c) - s(Float64Array.from(parent), 0, c);
};

describe('split criteria (hand-worked)', () => {
  it('Gini: 4 A + 4 B split into (3 A, 1 B) and (1 A, 3 B)', () => {
    // Parent Gini 1 - (0.5² + 0.5²) = 0.5; each child 1 - (0.75² + 0.25²) = 0.375.
    assert.equal(nodeImpurity('gini', [4, 4]), 0.5);
    assert.equal(nodeImpurity('gini', [3, 1]), 0.375);
    // Weighted decrease 8·0.5 - 4·0.375 - 4·0.375 = 1.
    assert.ok(Math.abs(decrease('gini', [4, 4], [3, 1], [1, 3]) - 1) < 1e-12);
  });

  it('Gini: a pure split of 2 A + 2 B removes all impurity (4 · 0.5 = 2)', () => {
    assert.ok(Math.abs(decrease('gini', [2, 2], [2, 0], [0, 2]) - 2) < 1e-12);
  });

  it('entropy: the same split gains 1 - H(0.75, 0.25) = 0.188722 bits per row', () => {
    assert.equal(nodeImpurity('entropy', [4, 4]), 1);
    assert.ok(Math.abs(nodeImpurity('entropy', [3, 1]) - 0.811278) < 1e-6);
    // The splitter works in nats and weighted rows: 8 rows · 0.188722 bits · ln 2.
    assert.ok(Math.abs(decrease('entropy', [4, 4], [3, 1], [1, 3]) - 8 * 0.1887219 * Math.LN2) < 1e-6);
  });

  it('squared error: y = 1,2,3,4 split into {1,2} and {3,4}', () => {
    // Parent variance 1.25, children 0.25 each: 4·1.25 - 2·0.25 - 2·0.25 = 4.
    // Regression channels are (weight, weighted sum).
    assert.ok(Math.abs(decrease('squared-error', [4, 10], [2, 3], [2, 7]) - 4) < 1e-12);
  });

  it('no split can have a negative Gini decrease (concavity of the index)', () => {
    for (let a = 0; a <= 5; a++) for (let b = 0; b <= 5; b++) {
      if (a + b === 0 || a + b === 10) continue;
      assert.ok(decrease('gini', [5, 5], [a, b], [5 - a, 5 - b]) >= -1e-12);
    }
  });
});
