// Everything the extension takes from the core engine, in one place, so the contract the host depends on
// is visible at a glance and a core rename touches one file.

export type { Table, Column, LevelColumn, NumericColumn, DroppedColumn, ColumnKind } from '../core/data/table';
export { findColumn, cellText, isMissing } from '../core/data/table';
export type { LoadOptions, LoadResult } from '../core/csv/types';
export { DataError } from '../core/csv/types';
// Loading runs on a worker thread: parsing a large file on the host's thread would freeze the editor.
export { loadCsvOffThread as loadCsv, loadCsvTextOffThread as loadCsvText } from '../core/csv/load-off-thread';
export type { ForestParams, Task, FeaturesPerSplit } from '../core/forest/params';
export { defaultParams, resolveFeaturesPerSplit } from '../core/forest/params';
export type { Schema, FeatureInfo, TargetInfo } from '../core/base/schema';
export { outputCount } from '../core/base/schema';
export type { Forest } from '../core/forest/forest';
export type { FitOptions, FitReport, RowResults } from '../core/forest/fit';
export type { Scores, ClassificationScores, RegressionScores } from '../core/metrics/scores';
export { classificationScores, regressionScores } from '../core/metrics/scores';
export { fitForest, inferTask } from '../core/forest/fit';
export { inBagCounts, outOfBagTrees } from '../core/forest/bootstrap';
export type { Prediction } from '../core/forest/predict';
export { encodeTable, SchemaMismatchError } from '../core/forest/predict';
export { Scorer } from '../core/forest/scorer';
export { rawScoreName } from '../core/forest/boosting';
export { treeOutputs } from '../core/forest/tree-outputs';
export { saveModel, loadModel } from '../core/model/file';
export { predictionColumns, writePredictions } from '../core/forest/score-file';
export { writeScored } from '../core/forest/score-formats';
// Explanations. The slow ones (contributions, dependence, intervals) run in src/extension/workers.
export {
  ContributionExplainer,
  meanAbsoluteContributions,
  partialDependence,
  partialDependence2D,
  predictInterval,
  quantileIndexFromFit,
  quantileIndexFromTrainingTable,
  sweepFeaturesPerSplit,
  TrainingMismatchError,
  type Contributions,
  type FeaturesSweep,
  type PartialDependence,
  type QuantileIndex,
} from '../core/explain/index';
export { shuffle, stream } from '../core/forest/rng';
// Opening models from either file kind, and what an imported forest needs before it can be explained.
export { openModelFile, isOnnxFile, knowsTraining, nameByPosition, namedByPosition, ModelError, type ModelOrigin, type OpenedModel } from '../core/open/open';
export { saveOnnxFile } from '../core/onnx/save';
export { writeFileAtomic } from '../core/atomic';
// The one check every output goes through, the command line's too: never over one of the command's inputs.
export { refuseInputAsOutput, OverwriteError } from '../core/output-guard';
export { readHeader } from '../core/csv/header';
export { withCoverFrom } from '../core/forest/cover';
export { median } from '../core/data/binning';
export { permutationOnRows, type PermutationImportance } from '../core/explain/permutation';
export { csvLine } from '../core/csv/write';
// Numbers as every surface writes them, the cautions every fit carries, and per-row answers.
export { formatBytes, formatNumber, formatSeconds, formatShare } from '../core/format';
export { cautions, type Caution, type CautionKind } from '../core/checks/cautions';
export { sampleRows } from '../core/data/sample';
export { RowVotes, membershipOf, targetTolerance, voteEntropy, voteMargin, type GroupAnswer, type RowAnswer, type RowRole, type VoteTally } from '../core/forest/row-votes';
export type { Membership } from '../core/forest/predict';
export { crossValidate } from '../core/summary/cross-validation';
export type { CrossValidationSummary } from '../core/summary/types';
export type { FitSummary as CoreFitSummary, ScoresSummary as CoreScoresSummary, SuspectRow as CoreSuspectRow } from '../core/summary/types';
export { summarizeFit } from '../core/summary/fit';
export { summarizeOpened } from '../core/summary/opened';
export { trainingRowsIn, type TrainingRows } from '../core/forest/membership';
export { doubtfulByMargin, doubtfulByResidual, type Doubt } from '../core/forest/doubtful';
export { impurityFromTrees } from '../core/explain/impurity';
export { cellsFromAverages, GridAccumulator, gridBatches, planAxis, rankFeatures, topPairs, type GridPlan } from '../core/explain/region-grid';
export { targetCodes } from '../core/forest/target';
export { UNAVAILABLE_FOR_IMPORT } from '../core/forest/membership';
export { targetDoubt, type TargetDoubt } from '../core/checks/target';
// The shareable report: the same gathering and drawing as `copse fit --report`.
export { gatherReport } from '../report/gather';
export { renderReport } from '../report/html';
