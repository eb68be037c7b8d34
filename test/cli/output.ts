// What the command line's --json output holds, as the tests read it: written here, apart from the code that
// prints it, so a renamed or dropped key shows up as a failing test rather than following the code silently.
import * as assert from 'node:assert/strict';

export interface ScoresJson {
  rows: number;
  accuracy?: number;
  balancedAccuracy?: number;
  logLoss?: number;
  r2?: number;
  rmse?: number;
  mae?: number;
  confusion?: { labels: string[]; counts: number[][] };
}

/** A training row the fit doubts. */
export interface SuspectJson {
  row: number;
  label: string | number;
  oobPredicted: string | number;
  margin?: number;
}

export interface FitJson {
  task: 'classification' | 'regression';
  rows: number;
  trees: number;
  features: string[];
  dropped: Array<{ name: string; reason: string }>;
  /** Null when no row has an out-of-bag tree. */
  oob: ScoresJson | null;
  test?: ScoresJson;
  importance: { impurity: Record<string, number>; permutation: Record<string, number> };
  cautions: Array<{ kind: string; column?: string; message: string }>;
  suspects: SuspectJson[];
  seconds: { load: number; fit: number };
}

/** One scored row: its data row number, then one entry per added column (text for a predicted class, null when empty). */
export type PredictedRow = Record<string, number | string | null>;

export interface PredictJson {
  rows: number;
  columns: string[];
  warnings: string[];
  /** The out-of-bag scores over the forest's own training file; null for any other file. */
  outOfBag: ScoresJson | null;
  predictions: PredictedRow[];
}

/** One group of trees' answer: all of them, or those that never drew the row. */
export interface ClassVoteGroup {
  prediction: string;
  probabilities: Record<string, number>;
  counts: Record<string, number>;
  agreement: number;
  /** How many trees are in the group. */
  trees: number;
}

export interface ValueVoteGroup {
  prediction: number;
  spread: number;
  trees: number;
}

interface VoteRow {
  row: number;
  line: number;
  role: string;
  label?: string | number;
  /** Which answer to read first. */
  lead: 'out-of-bag' | 'all-trees';
  margin?: number;
}

/** The top-level answer keys are all the trees' answer (allTrees); outOfBag is there for a training row. */
export interface ClassVoteRow extends VoteRow, Omit<ClassVoteGroup, 'trees'> {
  outOfBag?: ClassVoteGroup;
  allTrees: ClassVoteGroup;
  /** Every tree's vote, in tree order. */
  trees: string[];
}

export interface ValueVoteRow extends VoteRow, Omit<ValueVoteGroup, 'trees'> {
  outOfBag?: ValueVoteGroup;
  allTrees: ValueVoteGroup;
  trees: number[];
}

export interface VotesJson<Row = ClassVoteRow | ValueVoteRow> {
  task: 'classification' | 'regression';
  trees: number;
  warnings: string[];
  rows: Row[];
}

interface ExplainedRow {
  row: number;
  line: number;
  /** 'out-of-bag': only the trees that never drew the row (every tree, for a row the fit did not train on). */
  trees: 'out-of-bag' | 'all';
  treeCount: number;
}

export interface ClassExplainedRow extends ExplainedRow {
  prediction: string;
  probabilities: Record<string, number>;
  base: Record<string, number>;
  /** class, then feature. */
  contributions: Record<string, Record<string, number>>;
}

export interface ValueExplainedRow extends ExplainedRow {
  prediction: number;
  base: number;
  contributions: Record<string, number>;
}

export interface ExplainJson<Row> {
  task: 'classification' | 'regression';
  trees: number;
  features: string[];
  warnings: string[];
  rows: Row[];
}

/** A cell of a scored row that must be a number (a probability or a predicted value). */
export function numberIn(row: PredictedRow, column: string): number {
  const v = row[column];
  assert.equal(typeof v, 'number', `${column} should be a number, not ${JSON.stringify(v)}`);
  return v as number;
}
