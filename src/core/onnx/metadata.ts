// What a Copse export writes into the ONNX file's metadata_props: the model's own schema, settings and training
// facts (so an import gets names, levels and classes back), and plain statements of how the graph encodes them,
// for anyone reading the file with other tools.
import type { Forest } from '../forest/forest';

export const META = {
  format: 'copse.format',
  version: 'copse.version',
  schema: 'copse.schema',
  params: 'copse.params',
  training: 'copse.training',
  input: 'copse.input',
  levelSplits: 'copse.level-splits',
  missing: 'copse.missing',
  outputs: 'copse.outputs',
  cover: 'copse.cover',
} as const;

/** Only in a boosted ensemble's export: its link, base scores and the output each tree adds to. */
export const META_BOOSTING = 'copse.boosting';
export const META_FORMAT = 'copse-forest';
export const META_VERSION = 1;

export const INPUT_NAME = 'features';

export function exportMetadata(forest: Forest): Array<{ key: string; value: string }> {
  const classification = forest.schema.target.task === 'classification';
  const entries: Array<[string, string]> = [
    [META.format, META_FORMAT],
    [META.version, String(META_VERSION)],
    // NaN (a column missing throughout training has no median) is written as null, as in the model file.
    [META.schema, JSON.stringify(forest.schema)],
    [META.params, JSON.stringify(forest.params)],
    [META.training, JSON.stringify(forest.training)],
    [
      META.input,
      `"${INPUT_NAME}" is a float tensor [rows, ${forest.schema.features.length}] with one column per feature of copse.schema, in that order: ` +
        'the value of a numeric feature; for a categorical or boolean feature its level code, the position of the level in ' +
        'that feature\'s "levels" (0 for the first); NaN for a missing cell or a level not in the list.',
    ],
    [
      META.levelSplits,
      'BRANCH_EQ chains: a split on a categorical or boolean feature is a chain of BRANCH_EQ nodes, one per level code on the ' +
        'side of the split that missing values do not take, each sending its level to that side; the last node of the chain ' +
        'sends everything else (other codes and NaN) to the side missing values take. The node a chain leads to is shared by ' +
        'its links, so a node can have several parents. Where that missing side splits on the same feature again, the chain ' +
        'ends in a BRANCH_LEQ node whose two branches are the same node, so runtimes that merge runs of BRANCH_EQ nodes keep ' +
        'the two splits apart.',
    ],
    [
      META.missing,
      'Numeric splits are BRANCH_LEQ (value <= threshold is the true branch) with nodes_missing_value_tracks_true 1 where ' +
        'missing values go to the true branch. Thresholds are rounded down to float32, so every float32 input is routed ' +
        'exactly as Copse routes it.',
    ],
    [
      META.outputs,
      classification
        ? '"probabilities": float tensor [rows, classes], the forest\'s soft vote (class probabilities averaged over the trees; ' +
          'each leaf weight is the leaf\'s probability divided by the tree count, and the operator sums them), classes in the ' +
          'order of copse.schema target.classes. "label": string tensor [rows], the class with the highest probability ' +
          '(ArgMax over "probabilities", first class on ties). No ZipMap.'
        : '"value": float tensor [rows, 1], the mean of the trees\' leaf values (aggregate_function AVERAGE).',
    ],
    [META.cover, 'nodes_hitrates hold the weighted in-bag training rows that reached each node.'],
  ];
  // A boosted ensemble's link and base scores; the graph's post_transform and base_values say the same to a runtime.
  if (forest.boosting) {
    entries.push([META_BOOSTING, JSON.stringify(forest.boosting)]);
    entries.push([META.outputs, boostedOutputs(forest)]);
  }
  // A later entry for the same key (a boosted ensemble's outputs) replaces the forest's.
  const byKey = new Map(entries);
  return [...byKey].map(([key, value]) => ({ key, value }));
}

function boostedOutputs(forest: Forest): string {
  const link = forest.boosting!.link;
  if (link === 'identity') return '"value": float tensor [rows, 1], the sum of the trees\' raw scores plus base_values (aggregate_function SUM).';
  return (
    '"probabilities": float tensor [rows, classes], the boosted ensemble\'s probabilities: the trees\' raw scores summed per class plus ' +
    (link === 'logistic'
      ? 'base_values give the log-odds of the second class (all weights are listed for class id 0, the runtime\'s one-score two-class form), and post_transform LOGISTIC turns them into probabilities.'
      : 'base_values, through post_transform SOFTMAX.') +
    ' "label": the class with the highest probability.'
  );
}
