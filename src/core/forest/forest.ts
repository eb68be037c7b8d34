import type { Schema } from '../base/schema';
import type { DroppedColumn } from '../data/table';
import type { FlatTree } from '../tree/tree';
import type { Boosting } from './boosting';
import type { ForestParams } from './params';

export interface TrainingInfo {
  /** Training rows; 0 when not known (an imported forest): nothing that needs the training sample is offered. */
  readonly rows: number;
  /** sha256 of the training file's bytes (empty when fitted from memory). */
  readonly fingerprint: string;
  /** Rows with a target that the fit held out of training; absent in files written before it was recorded. */
  readonly heldOut?: number;
  readonly dropped: readonly DroppedColumn[];
}

/** A fitted forest: all that scoring, saving and inspecting need. */
export interface Forest {
  readonly schema: Schema;
  readonly params: ForestParams;
  readonly trees: readonly FlatTree[];
  readonly training: TrainingInfo;
  /** Present for a boosted ensemble (XGBoost, a SUM ensemble with a link): see boosting.ts. Absent: a forest. */
  readonly boosting?: Boosting;
}

/** Everything of a forest but its trees: known before the first tree is grown, and the model file's first line. */
export type ForestHead = Omit<Forest, 'trees'>;
