// The engine against outside sources: open datasets (test/fixtures/open/SOURCES.md names each publication)
// and the figures scikit-learn and R's ranger give on them, recorded by scripts/sklearn_reference.py and
// scripts/ranger_reference.R into test/fixtures/reference/ (with their versions). Tolerances are the
// ones recorded beside each figure.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import { fitForest, type FitReport } from '../../src/core/forest/fit';

const root = path.join(__dirname, '..', '..', '..');
interface Ref {
  file: string;
  target: string;
  task: 'classification' | 'regression';
  featureNames: string[];
  oobAccuracy?: { mean: number; min: number; max: number };
  oobR2?: { mean: number; min: number; max: number };
  tolerance: { oobAccuracy?: { absolute: number }; oobR2?: { absolute: number }; impurityImportance: { absolute: number } };
  impurityImportance: { mean: Record<string, number>; sd: Record<string, number>; stableTop: { k: number; features: string[] } };
  permutationImportance: { stableTop: { k: number; features: string[] } };
}
interface Reference {
  sklearnVersion?: string;
  rangerVersion?: string;
  datasets: Record<string, Ref>;
}

const sklearn = JSON.parse(readFileSync(path.join(root, 'test/fixtures/reference/sklearn.json'), 'utf8')) as Reference;
const ranger = JSON.parse(readFileSync(path.join(root, 'test/fixtures/reference/ranger.json'), 'utf8')) as Reference;

const SEEDS = [1, 2, 3];
const fits = new Map<string, FitReport[]>();

async function fitsFor(name: string): Promise<FitReport[]> {
  if (!fits.has(name)) {
    const ref: Ref = sklearn.datasets[name];
    const { table } = await loadCsv(path.join(root, ref.file), { target: ref.target });
    const reports: FitReport[] = [];
    // Same settings as the references: 500 trees, bootstrap, full depth, sqrt(p) or p/3 features per split.
    for (const seed of SEEDS) reports.push(await fitForest(table, { target: ref.target, task: ref.task, params: { trees: 500, seed }, workers: 2 }));
    fits.set(name, reports);
  }
  return fits.get(name)!;
}

const oobOf = (r: FitReport) => (r.oob.kind === 'classification' ? r.oob.accuracy : r.oob.r2);
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

function topK(names: string[], values: Float64Array, k: number): string[] {
  return names.map((n, i) => [n, values[i]] as const).sort((a, b) => b[1] - a[1]).slice(0, k).map(([n]) => n);
}

for (const name of ['iris', 'wine', 'pima', 'diabetes', 'friedman1']) {
  describe(`${name}: against scikit-learn ${sklearn.sklearnVersion} and ranger ${ranger.rangerVersion}`, function () {
    this.timeout(300000);
    const ref: Ref = sklearn.datasets[name];
    const key = ref.task === 'classification' ? 'oobAccuracy' : 'oobR2';

    it(`out-of-bag ${key} over seeds ${SEEDS.join(', ')} is within the recorded tolerance of scikit-learn's mean`, async () => {
      const reports = await fitsFor(name);
      const ours = reports.map(oobOf);
      const theirs = ref[key]!;
      const tol = ref.tolerance[key]!.absolute;
      assert.ok(Math.abs(mean(ours) - theirs.mean) <= tol, `ours ${ours.map((v) => v.toFixed(4)).join(',')} vs sklearn mean ${theirs.mean} ± ${tol}`);
      for (const v of ours) assert.ok(v >= theirs.min - tol && v <= theirs.max + tol, `run ${v} outside [${theirs.min}, ${theirs.max}] ± ${tol}`);
    });

    it(`out-of-bag ${key} is also near ranger's`, async () => {
      const ours = mean((await fitsFor(name)).map(oobOf));
      const theirs = ranger.datasets[name][key]!;
      const tol = ref.tolerance[key]!.absolute;
      assert.ok(Math.abs(ours - theirs.mean) <= tol + 0.005, `ours ${ours} vs ranger ${theirs.mean}`);
    });

    it("impurity importance matches scikit-learn's per feature within the recorded tolerance", async () => {
      const reports = await fitsFor(name);
      ref.featureNames.forEach((f) => {
        const i = reports[0].forest.schema.features.findIndex((x) => x.name === f);
        const ours = mean(reports.map((r) => r.importance.impurity[i]));
        const tol = Math.max(ref.tolerance.impurityImportance.absolute, 3 * ref.impurityImportance.sd[f]);
        assert.ok(Math.abs(ours - ref.impurityImportance.mean[f]) <= tol, `${f}: ours ${ours} vs ${ref.impurityImportance.mean[f]}`);
      });
    });

    it("permutation importance puts scikit-learn's stable top features in our top k", async () => {
      const r = (await fitsFor(name))[0];
      const names = r.forest.schema.features.map((f) => f.name);
      const { k, features } = ref.permutationImportance.stableTop;
      const ours = topK(names, r.importance.permutation, k);
      for (const f of features) assert.ok(ours.includes(f), `${f} not in our top ${k}: ${ours.join(',')}`);
    });
  });
}

describe('Friedman #1 (Friedman 1991): only x1..x5 carry signal', function () {
  this.timeout(300000);
  it('permutation importance ranks all five informative inputs above all five noise inputs', async () => {
    const r = (await fitsFor('friedman1'))[0];
    const names = r.forest.schema.features.map((f) => f.name);
    const top5 = topK(names, r.importance.permutation, 5).sort();
    assert.deepEqual(top5, ['x1', 'x2', 'x3', 'x4', 'x5']);
  });
});
