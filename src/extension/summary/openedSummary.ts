// The summary for a forest opened from a file and shown against a CSV. There is no fit report, so no
// out-of-bag scores or curve; if the CSV has the target, it is scored as test data, unless it is the very
// file the forest was trained on (then any score would be in-sample, and we show none rather than flatter it).

import type { FitSummary } from '../../protocol/messages';
import type { Forest, ModelOrigin, PermutationImportance, Prediction, Scores } from '../engine';
import { classificationScores, knowsTraining, regressionScores } from '../engine';
import { COVERS_FROM_FILE, UNAVAILABLE_FOR_IMPORT } from '../session/importText';
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
  /** Where the model file came from; a Copse model file when absent. */
  readonly origin?: ModelOrigin;
  /** Measured on this CSV's labelled rows (see permutationOnTable); absent when it was not. */
  readonly permutation?: PermutationImportance;
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
  const perm = i.permutation;
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
    importance: forest.schema.features.map((f, k) => ({
      feature: f.name,
      impurity: impurity[k],
      permutation: perm ? perm.mean[k] : null,
      permutationSpread: perm ? perm.spread[k] : null,
    })),
    warnings: [...originWarnings(i), ...warnings],
    fitSeconds: null,
    permutationOn: perm ? 'file' : undefined,
    oobUnavailable: knowsTraining(forest)
      ? 'No out-of-bag score: the model file does not keep the votes it needs.'
      : `Out-of-bag scores and votes are ${UNAVAILABLE_FOR_IMPORT}.`,
  };
}

/** What the reader must know first: where the forest came from, and for an import what it cannot show. */
function originWarnings(i: OpenedInput): string[] {
  const { forest, origin } = i;
  const trained = `trained on ${forest.training.rows} rows; out-of-bag scores are not kept in the model file.`;
  if (!origin || origin.kind === 'copse') {
    // A model file saved from an import keeps the import's lack of a training sample.
    if (!knowsTraining(forest)) return [`Opened from ${i.modelLabel}, saved from an import: out-of-bag scores, bootstrap membership and prediction intervals are ${UNAVAILABLE_FOR_IMPORT}.`];
    return [`Opened from ${i.modelLabel}: ${trained}`];
  }
  const by = origin.producer ? `, written by ${origin.producer}` : '';
  const head = `Imported from ${i.modelLabel} (ONNX ${origin.operator}${by})`;
  const out: string[] = [];
  if (knowsTraining(forest)) out.push(`${head}, a Copse export: ${trained}`);
  else {
    out.push(
      `${head}: out-of-bag scores, bootstrap membership, doubtful-row margins and prediction intervals are ${UNAVAILABLE_FOR_IMPORT}.`,
      `Impurity decrease and ${COVERS_FROM_FILE}.`,
    );
  }
  if (origin.names === 'positions') out.push(`The file names no features: they were taken from ${i.dataset.label}'s columns in order.`);
  return [...out, ...origin.notes.map((n) => `Import: ${n}`)];
}
