// Per-row answers the panel shows: tree votes on selected rows and the rows the forest doubts.

export interface RowVotes {
  row: number;
  /** Classification: trees voting for each class, in class order. Regression: []. */
  counts: number[];
  /** Which answer leads: the trees that never saw the row (a training row), or all trees. */
  lead: 'out-of-bag' | 'all-trees';
  /** The all-trees answer (class code or value), which for a training row includes trees fitted on it. */
  allPredicted: number;
  /** Share of the leading answer's trees that vote for it (or lie near it, for regression), 0..1. */
  agreement: number;
  /** Entropy (bits) of the vote shares; null for regression. */
  entropy: number | null;
  /** Majority of the trees that did not see this row (class code or mean value); null without such trees. */
  oobVote: number | null;
  /** The row's own target (class code or value); null if missing. */
  label: number | null;
  /** votes[t] = tree t's class code or value. */
  votes: number[];
  /** Indices of the trees for which this row was out-of-bag (empty if not a training row). */
  outOfBag: number[];
  /** Regression: the central prediction interval at `level` (quantile regression forest); absent otherwise. */
  interval?: PredictionInterval;
  /** A boosted ensemble: its trees add raw scores rather than vote (votes and agreement then mean nothing). */
  boosted?: BoostedTrees;
}

/** Each tree's raw output on one row of a boosted ensemble, and the running total from the base score. */
export interface BoostedTrees {
  /** What the raw scores are: 'log-odds', 'raw class score' or 'value'. */
  scale: string;
  /** Per tree: the output (class code, 0 for a value) it adds to. */
  output: number[];
  raw: number[];
  /** Per tree: the raw score of its output after it and every earlier tree, base included. */
  cumulative: number[];
  /** Per output: the base score and the final raw score. */
  base: number[];
  total: number[];
  /** Classification: the predicted class's probability; null for a value. */
  probability: number | null;
  /** The output whose running total the strip follows (class 1 for two classes, else the predicted class). */
  shown: number;
}

export interface PredictionInterval {
  /** Share of the conditional distribution inside, e.g. 0.9. */
  level: number;
  lower: number;
  upper: number;
}

export interface SuspectRow {
  row: number;
  /**
   * How doubtful. Classification: the out-of-bag margin (share of out-of-bag votes for the label minus the
   * largest share for another class; negative). Regression: the modified z-score of label − out-of-bag value.
   */
  score: number;
  /** Class code, or the labelled value. */
  label: number;
  /** The out-of-bag trees' class code, or their mean value. */
  oobPredicted: number;
}

// The rows table's page requests and replies; their shapes live in core beside the model that answers them.
export { MAX_PAGE as ROWS_PAGE_MAX } from '../core/summary/rows-table-types';
export type { RowsTablePage, RowsTableQuery, RowsTableRequest, RowsTableRow, RowsTableSortKey } from '../core/summary/rows-table-types';
