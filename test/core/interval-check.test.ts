// Regression diagnostics: the out-of-bag check of the quantile regression forest's interval
// (src/core/summary/interval-check.ts) and the predicted-against-actual pairs.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import { fitForest } from '../../src/core/forest/fit';
import { intervalCoverage, predictionPairs } from '../../src/core/metrics/residual-plot';
import { outOfBagCoverage } from '../../src/core/summary/interval-check';

const root = path.join(__dirname, '..', '..', '..');

describe('regression diagnostics', function () {
  this.timeout(120000);

  it('coverage counts the rows inside [lower, upper], ends included, over rows where all three are known', () => {
    const c = intervalCoverage([1, 2, 3, 4, NaN], [0, 2, 3.5, 0, 0], [1, 5, 4, 3, 9], 0.8);
    assert.deepEqual([c.rows, c.coverage, c.meanWidth], [4, 0.5, (1 + 3 + 0.5 + 3) / 4]);
  });

  it('pairs: every row up to the limit, else an even sample of exactly the limit', () => {
    assert.equal(predictionPairs([1, 2, 3], [1, 2, 3]).pairs.length, 3);
    const big = predictionPairs(Float64Array.from({ length: 1001 }, (_, i) => i), Float64Array.from({ length: 1001 }, (_, i) => i), undefined, 400);
    assert.equal(big.pairs.length, 400);
    assert.equal(big.rows, 1001);
    assert.equal(big.pairs[0].actual, 0);
  });

  it("on Friedman #1 (test/fixtures/open/SOURCES.md), a 90% interval from each row's out-of-bag trees holds between 80% and 99% of rows, not all", async () => {
    const { table } = await loadCsv(path.join(root, 'test/fixtures/open/friedman1.csv'), { target: 'y' });
    const report = await fitForest(table, { target: 'y', params: { trees: 100, seed: 2 }, workers: 2, permutationImportance: false });
    const c = outOfBagCoverage(report, table)!;
    assert.equal(c.rows, 1000);
    // Quantile forests are roughly calibrated out of sample (Meinshausen 2006, from memory); measured here:
    // 96.2% out-of-bag, and 100% when every tree speaks for its own training rows, which the upper bound rejects.
    assert.ok(c.coverage > 0.8 && c.coverage < 0.99, `coverage ${c.coverage}`);
    const noTrees = { ...report, forest: { ...report.forest, trees: [] } };
    assert.equal(outOfBagCoverage(noTrees, table), undefined);
  });
});
