// Prints the accuracy table for the README: Copse's out-of-bag scores beside the scikit-learn and ranger
// figures recorded in test/fixtures/reference/ (same data, 500 trees, same settings). Run after `npm run build`:
//   node out/bench/accuracy.js
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { loadCsv } from '../src/core/csv/load';
import { fitForest } from '../src/core/forest/fit';

const root = path.join(__dirname, '..', '..');

// The parts of the recorded reference files this table reads.
interface Figure {
  mean: number;
  sd: number;
}
interface Ref {
  file: string;
  target: string;
  task: 'classification' | 'regression';
  rows: number;
  features: number;
  oobAccuracy?: Figure;
  oobR2?: Figure;
}
interface Reference {
  sklearnVersion?: string;
  rangerVersion?: string;
  datasets: Record<string, Ref>;
}
const read = (f: string) => JSON.parse(readFileSync(path.join(root, 'test/fixtures/reference', f), 'utf8')) as Reference;

async function main(): Promise<void> {
  const sklearn = read('sklearn.json');
  const ranger = read('ranger.json');
  const seeds = [1, 2, 3];
  console.log(`| dataset (rows × features) | score | Copse (seeds ${seeds.join(', ')}) | scikit-learn ${sklearn.sklearnVersion} (10 seeds) | ranger ${ranger.rangerVersion} (10 seeds) |`);
  console.log('|---|---|---|---|---|');
  for (const [name, ref] of Object.entries(sklearn.datasets)) {
    const { table } = await loadCsv(path.join(root, ref.file), { target: ref.target });
    const key = ref.task === 'classification' ? 'oobAccuracy' : 'oobR2';
    const ours: number[] = [];
    for (const seed of seeds) {
      const r = await fitForest(table, { target: ref.target, task: ref.task, params: { trees: 500, seed }, workers: 2, permutationImportance: false });
      ours.push(r.oob.kind === 'classification' ? r.oob.accuracy : r.oob.r2);
    }
    const mean = ours.reduce((a, b) => a + b, 0) / ours.length;
    const label = key === 'oobAccuracy' ? 'OOB accuracy' : 'OOB R²';
    console.log(`| ${name} (${ref.rows} × ${ref.features}) | ${label} | ${mean.toFixed(3)} | ${ref[key]!.mean.toFixed(3)} ± ${ref[key]!.sd.toFixed(3)} | ${ranger.datasets[name][key]!.mean.toFixed(3)} ± ${ranger.datasets[name][key]!.sd.toFixed(3)} |`);
  }
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
