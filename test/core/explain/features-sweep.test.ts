// Choosing features per split by out-of-bag error, as Breiman (2001, "Random forests", Machine Learning 45)
// suggests the out-of-bag estimate be used.
import * as assert from 'node:assert/strict';
import seedrandom from 'seedrandom';
import { sweepCandidates, sweepFeaturesPerSplit } from '../../../src/core/explain/features-sweep';
import { fitForest } from '../../../src/core/forest/fit';
import { tableFrom } from '../helpers/table';
import { openDataset } from './helpers/data';

/** One informative feature (the class is its sign, 5% of labels flipped) among `noise` uniform ones. */
function needle(n: number, noise: number): ReturnType<typeof tableFrom> {
  const rng = seedrandom('needle');
  const cells: Record<string, number[] | string[]> = { signal: [] };
  for (let f = 0; f < noise; f++) cells[`noise${f}`] = [];
  const label: string[] = [];
  for (let i = 0; i < n; i++) {
    const s = rng() * 2 - 1;
    (cells.signal as number[]).push(s);
    for (let f = 0; f < noise; f++) (cells[`noise${f}`] as number[]).push(rng());
    const flip = rng() < 0.05;
    label.push((s > 0) !== flip ? 'up' : 'down');
  }
  return tableFrom({ ...cells, label });
}

describe('features-per-split sweep', function () {
  this.timeout(300000);

  it('tries 1, sqrt(p)/2, sqrt(p), 2 sqrt(p), p/3, p/2 and p, whole, within 1..p, once each', () => {
    assert.deepEqual(sweepCandidates(1), [1]);
    assert.deepEqual(sweepCandidates(4), [1, 2, 4]);
    assert.deepEqual(sweepCandidates(10), [1, 3, 5, 6, 10]);
    assert.deepEqual(sweepCandidates(100), [1, 5, 10, 20, 33, 50, 100]);
  });

  it('reports one out-of-bag error per count, in order, the default among them, the same for the same seed', async () => {
    const table = await openDataset('wine.csv', 'cultivar');
    const options = { target: 'cultivar', params: { trees: 40, seed: 6 }, workers: 2 };
    let lastProgress = [0, 0];
    const a = await sweepFeaturesPerSplit(table, { ...options, onProgress: (d, t) => (lastProgress = [d, t]) });
    const b = await sweepFeaturesPerSplit(table, options);
    assert.equal(a.features, 13);
    assert.equal(a.defaultCount, 3);
    assert.deepEqual(a.points.map((p) => p.featuresPerSplit), [1, 3, 4, 6, 7, 13]);
    assert.deepEqual(lastProgress, [240, 240]);
    assert.deepEqual(a.points.map((p) => p.oobError), b.points.map((p) => p.oobError));
    assert.equal(a.best, b.best);
    const min = Math.min(...a.points.map((p) => p.oobError));
    assert.equal(a.points.find((p) => p.featuresPerSplit === a.best)!.oobError, min);
    // Each point is the very forest a fit with that count grows: the same out-of-bag accuracy.
    const single = await fitForest(table, { ...options, params: { ...options.params, featuresPerSplit: 4 }, permutationImportance: false });
    const four = a.points.find((p) => p.featuresPerSplit === 4)!;
    assert.ok(single.oob.kind === 'classification');
    assert.equal(four.oobScore, single.oob.accuracy);
    assert.ok(Math.abs(four.oobError - (1 - four.oobScore)) < 1e-12);
    const other = await sweepFeaturesPerSplit(table, { ...options, params: { trees: 40, seed: 7 } }, [2, 2, 40, 5]);
    assert.deepEqual(other.points.map((p) => p.featuresPerSplit), [2, 5, 13]);
  });

  it('does not pick one feature per split when one informative feature hides among 40 noise features', async () => {
    const table = needle(400, 40);
    const sweep = await sweepFeaturesPerSplit(table, { target: 'label', params: { trees: 60 }, workers: 2 });
    const one = sweep.points[0];
    assert.equal(one.featuresPerSplit, 1);
    assert.notEqual(sweep.best, 1);
    // With one feature per split most splits are on noise; with all 41 every split can find the signal.
    const all = sweep.points[sweep.points.length - 1];
    assert.ok(one.oobError > all.oobError + 0.05, sweep.points.map((p) => `${p.featuresPerSplit}: ${p.oobError.toFixed(3)}`).join(', '));
  });

  it('refuses counts that are not whole numbers of at least 1', async () => {
    const table = needle(50, 3);
    await assert.rejects(sweepFeaturesPerSplit(table, { target: 'label' }, [0]), /whole numbers/);
    await assert.rejects(sweepFeaturesPerSplit(table, { target: 'label' }, [1.5]), /whole numbers/);
    await assert.rejects(sweepFeaturesPerSplit(table, { target: 'nothing' }), /no column/);
  });
});
