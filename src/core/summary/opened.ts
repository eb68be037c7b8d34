// The summary of a forest opened from a file and shown against a table. There is no fit report: scores come
// from scoring the table. When the table is the forest's own training file and its training rows can be
// recovered (membership.ts), the out-of-bag scores and doubtful rows are the fit's own, and held-out rows
// are scored as the fit scored them; otherwise a labelled table is scored as test data, except the training
// file read another way, whose in-sample scores would flatter the forest, so none are shown.

import type { Table } from '../data/table';
import { impurityFromTrees } from '../explain/impurity';
import type { Forest } from '../forest/forest';
import type { TrainingRows } from '../forest/membership';
import type { Prediction } from '../forest/predict';
import { membershipOf, RowVotes } from '../forest/row-votes';
import { evaluateProbabilities } from '../metrics/evaluation';
import { predictionPairs } from '../metrics/residual-plot';
import { classificationScores, regressionScores, type Scores } from '../metrics/scores';
import { byName, residualSummary, scoresSummary, suspectRows } from './parts';
import type { FitSummary, ScoresSummary } from './types';

export interface OpenedSummaryInput {
  readonly forest: Forest;
  readonly table: Table;
  /** The table scored with every tree, and with the training membership when it is known. */
  readonly prediction: Prediction;
  /** The table's target per row in the forest's codes; NaN where missing. */
  readonly truth: Float64Array;
  readonly file: string;
  readonly fingerprint: string;
  readonly rowsRead: number;
  readonly sampled: boolean;
  /** Row answers already made for this scoring with the training membership, if the caller has them. */
  readonly votes?: RowVotes;
  /** The forest's training rows in this table, or why they are not known. */
  readonly training: TrainingRows | { readonly unknown: string };
  /** Permutation importance measured on the table's labelled rows, when it was. */
  readonly permutation?: { readonly mean: ArrayLike<number>; readonly spread: ArrayLike<number> };
  /** Why permutation importance was not measured, when it was not. */
  readonly permutationMissing?: string;
  readonly notes?: readonly string[];
  readonly warnings?: readonly string[];
  readonly suspectLimit?: number;
}

export function summarizeOpened(i: OpenedSummaryInput): FitSummary {
  const { forest, table, prediction, truth } = i;
  const target = forest.schema.target;
  const classes = target.classes ?? [];
  const names = forest.schema.features.map((f) => f.name);
  const warnings = [...(i.warnings ?? [])];
  const sameFile = forest.training.fingerprint !== '' && forest.training.fingerprint === i.fingerprint;
  const known = 'trainRows' in i.training ? i.training : undefined;
  let oob: ScoresSummary | null = null;
  let test: ScoresSummary | undefined;
  let testFrom: FitSummary['testFrom'];
  let suspects: FitSummary['suspects'] = [];
  let suspectCount: number | null = null;
  if (known && prediction.oob) {
    const votes = i.votes ?? new RowVotes(target.task, classes, prediction, truth, membershipOf(known.trainRows, table.rowCount, known.inBag));
    oob = scoresOn(forest, truth, prediction.oob.proba ?? prediction.oob.predicted, known.trainRows, (r) => prediction.oob!.trees[r] > 0, true);
    const doubts = votes.doubtful(known.trainRows);
    suspectCount = doubts.length;
    suspects = suspectRows(doubts.slice(0, i.suspectLimit ?? 50), {
      table,
      classes,
      tableRow: (k) => known.trainRows[k],
      truth: (k) => truth[known.trainRows[k]],
      oobPredicted: (k) => prediction.oob!.predicted[known.trainRows[k]],
    });
    if (known.holdoutRows && known.holdoutRows.length > 0) {
      test = scoresOn(forest, truth, prediction.proba ?? prediction.predicted, known.holdoutRows, () => true, false);
      testFrom = 'holdout';
    }
  } else if (sameFile) {
    warnings.push(
      `${i.file} is the file this forest was trained on, but its training rows cannot be told apart here (${'unknown' in i.training ? i.training.unknown : 'no membership'}), ` +
        'so scores on it would be in-sample and too kind; none are shown.',
    );
  } else {
    const labelled = Int32Array.from(truth.keys()).filter((r) => !Number.isNaN(truth[r]));
    if (labelled.length > 0) {
      test = scoresOn(forest, truth, prediction.proba ?? prediction.predicted, labelled, () => true, false);
      testFrom = 'file';
    } else warnings.push(`${i.file} has no "${target.name}" values, so the forest's predictions cannot be scored here.`);
  }
  const perm = i.permutation;
  return {
    task: target.task,
    target: target.name,
    classes,
    data: { file: i.file, fingerprint: i.fingerprint, rowsRead: i.rowsRead, sampled: i.sampled },
    // Rows of this table: the training rows when they are known here, plus the rows scored (held out, or
    // the whole file for a forest from elsewhere).
    rows: known ? known.trainRows.length : 0,
    scoredRows: test ? test.rows : known ? 0 : table.rowCount,
    features: names,
    featureKinds: forest.schema.features.map((f) => f.kind),
    dropped: forest.training.dropped,
    trees: forest.trees.length,
    settings: { trees: forest.trees.length, seed: forest.params.seed },
    oob,
    oobUnavailable: oob ? undefined : 'unknown' in i.training ? `No out-of-bag score: ${i.training.unknown}.` : 'No out-of-bag score: the scoring did not keep the out-of-bag votes.',
    test,
    testFrom,
    importance: {
      impurity: byName(names, impurityFromTrees(forest)),
      permutation: perm ? byName(names, perm.mean) : {},
      permutationSpread: perm ? byName(names, perm.spread) : {},
      permutationOn: perm ? 'file' : null,
      permutationMissing: perm ? undefined : i.permutationMissing,
    },
    curve: [],
    suspects,
    suspectCount,
    cautions: [],
    notes: [...(i.notes ?? [])],
    warnings,
    fitSeconds: null,
  };
}

/** Scores over the given table rows; `predicted` is rows × K probabilities, or values. */
function scoresOn(forest: Forest, truth: Float64Array, predicted: Float64Array, rows: Int32Array, keep: (r: number) => boolean, residuals: boolean): ScoresSummary {
  const target = forest.schema.target;
  const classes = target.classes ?? [];
  const K = classes.length;
  const picked = rows.filter((r) => keep(r) && !Number.isNaN(truth[r]));
  const y = Float64Array.from(picked, (r) => truth[r]);
  let s: Scores;
  if (target.task === 'classification') {
    const proba = new Float64Array(picked.length * K);
    picked.forEach((r, j) => proba.set(predicted.subarray(r * K, r * K + K), j * K));
    s = classificationScores(y, proba, classes);
    return scoresSummary(s, classes, undefined, { evaluation: evaluateProbabilities(y, proba, classes) });
  }
  const v = Float64Array.from(picked, (r) => predicted[r]);
  s = regressionScores(y, v);
  return scoresSummary(s, classes, residuals ? residualSummary(y, v) : undefined, { diagnostics: predictionPairs(y, v) });
}
