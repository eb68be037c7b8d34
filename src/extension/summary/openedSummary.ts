// The summary for a forest opened from a file and shown against a CSV. There is no fit report, so no
// out-of-bag scores or curve; if the CSV has the target, it is scored as test data, unless it is the very
// file the forest was trained on (then any score would be in-sample, and we show none rather than flatter it).

import type { FitSummary } from '../../protocol/messages';
import type { Forest, Prediction, Scores } from '../engine';
import { classificationScores, regressionScores } from '../engine';
import { scoreSummary } from './summary';
import { impurityFromTrees } from './treeImportance';

export interface OpenedInput {
  readonly forest: Forest;
  readonly prediction: Prediction;
  /** Per table row in the forest's codes; NaN where missing or absent. */
  readonly truth: Float64Array;
  readonly dataset: { label: string; uri: string };
  readonly rowsRead: number;
  readonly sampled: boolean;
  /** sha256 of the CSV, compared with the forest's training fingerprint. */
  readonly fingerprint: string;
  readonly modelLabel: string;
  readonly warnings: readonly string[];
}

export function openedSummary(i: OpenedInput): FitSummary {
  const { forest, prediction, truth } = i;
  const target = forest.schema.target;
  const warnings = [...i.warnings];
  const sameFile = forest.training.fingerprint !== '' && forest.training.fingerprint === i.fingerprint;
  let labelled = 0;
  for (const v of truth) if (!Number.isNaN(v)) labelled++;
  let scores: Scores | undefined;
  if (sameFile) {
    warnings.push(
      `${i.dataset.label} is the file this forest was trained on, so scores on it would be in-sample and too kind; none are shown. Fit again to see out-of-bag scores.`,
    );
  } else if (labelled > 0) {
    scores =
      target.task === 'classification'
        ? classificationScores(truth, prediction.proba!, target.classes ?? [], (r) => !Number.isNaN(truth[r]))
        : regressionScores(truth, prediction.predicted, (r) => !Number.isNaN(truth[r]));
  } else {
    warnings.push(`${i.dataset.label} has no "${target.name}" values, so the forest's predictions cannot be scored here.`);
  }
  const impurity = impurityFromTrees(forest);
  const heldOut = scores ? scoreSummary(scores, null) : null;
  return {
    dataset: i.dataset,
    target: target.name,
    task: target.task,
    classes: target.task === 'classification' ? [...(target.classes ?? [])] : [],
    trees: forest.trees.length,
    rowsUsed: prediction.rows,
    rowsRead: i.rowsRead,
    sampled: i.sampled,
    features: forest.schema.features.map((f) => ({ name: f.name, kind: f.kind })),
    dropped: forest.training.dropped.map((d) => ({ name: d.name, reason: d.reason })),
    oob: null,
    heldOut: heldOut ? { from: 'test', scores: heldOut } : null,
    curve: [],
    importance: forest.schema.features.map((f, k) => ({ feature: f.name, impurity: impurity[k], permutation: null, permutationSpread: null })),
    warnings: [`Opened from ${i.modelLabel}: trained on ${forest.training.rows} rows; out-of-bag scores are not kept in the model file.`, ...warnings],
    fitSeconds: null,
  };
}
