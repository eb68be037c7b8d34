// What a forest knows about its inputs and target. These types sit below data/, tree/ and forest/ so the
// binning, the grower and the predictor can name them without importing the model file that saves them.
import type { Task } from './task';

export type ColumnKind = 'numeric' | 'categorical' | 'boolean';

/** How a model reads one input column. Saved with the model so raw rows can be scored later. */
export interface FeatureInfo {
  readonly name: string;
  readonly kind: ColumnKind;
  /** categorical/boolean: the training levels, in code order. Unseen levels score as missing. */
  readonly levels?: readonly string[];
  /** numeric: bin b holds x <= edges[b] (and x > edges[b-1]); the last bin holds x > edges[last]. */
  readonly edges?: readonly number[];
  /** Whether training data had missing cells in this column. */
  readonly hadMissing: boolean;
  /** Training median (numeric) or most frequent level code (categorical): the default reference row. */
  readonly reference: number;
}

export interface TargetInfo {
  readonly name: string;
  readonly task: Task;
  /** classification: the class labels, in code order. */
  readonly classes?: readonly string[];
}

export interface Schema {
  readonly features: readonly FeatureInfo[];
  readonly target: TargetInfo;
}

export function outputCount(target: TargetInfo): number {
  return target.task === 'classification' ? (target.classes?.length ?? 0) : 1;
}
