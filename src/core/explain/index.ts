// What the editor panel and the command line call to explain a fitted forest, in one import.
export { ContributionExplainer, explainRows, meanAbsoluteContributions, type Contributions, type GlobalContributions } from './contributions';
export {
  DEFAULT_GRID_POINTS,
  DEFAULT_SAMPLE_ROWS,
  featureGrid,
  gridDistribution,
  partialDependence,
  partialDependence2D,
  sampleRowIndices,
  type Dependence2DOptions,
  type DependenceOptions,
  type Distribution,
  type FeatureGrid,
  type GridOptions,
  type PartialDependence,
  type PartialDependence2D,
} from './dependence';
export { sweepCandidates, sweepFeaturesPerSplit, type FeaturesSweep, type SweepPoint } from './features-sweep';
export {
  buildQuantileIndex,
  predictInterval,
  predictQuantiles,
  quantileIndexFromFit,
  quantileIndexFromTrainingFile,
  quantileIndexFromTrainingTable,
  trainingLeaves,
  TrainingMismatchError,
  type PredictionInterval,
  type QuantileIndex,
  type QuantileTraining,
  type TrainingFileOptions,
} from './quantiles';
