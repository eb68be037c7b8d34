// Scoring a forest's own training file. Most trees drew each of its rows and fitted them closely, so what all
// the trees say about such a row looks better than the forest is; the trees that never drew the row give the
// honest answer. Here the command line finds out whether DATA.csv is that file and, if so, which trees drew
// which row (core recovers that from the forest's seed), so predict and votes can lead with the honest answer.
import type { LoadResult } from '../core/csv/types';
import { cellText, findColumn, type Column } from '../core/data/table';
import type { Forest } from '../core/forest/forest';
import { trainingRowsIn } from '../core/forest/membership';
import type { Membership } from '../core/forest/predict';
import { loadForScoring } from '../core/forest/score-file';
import { membershipOf, type RowRole } from '../core/forest/row-votes';
import { codesFor } from '../core/forest/target';
import { knowsTraining } from '../core/model/open';

export interface TrainingView {
  /** Which table rows the forest trained on, and how often each tree drew them. */
  readonly membership: Membership;
  /** Table rows the fit held out. */
  readonly holdout: ReadonlySet<number>;
}

export interface ScoringData {
  readonly loaded: LoadResult;
  /** The file's target column, when it has one. */
  readonly target?: Column;
  /** Present when DATA.csv is the forest's training file, read as the fit read it. */
  readonly training?: TrainingView;
  /** Why the training rows could not be told apart although the file looks like the training file. */
  readonly trainingUnknown?: string;
}

/**
 * Loads DATA.csv as core loads a file to score (the features' types forced, the target read as inference reads
 * it, which on the training file is how the fit read it) and recovers the training rows when the file is the
 * one the forest was fitted on.
 */
export async function loadScoringData(forest: Forest, dataPath: string): Promise<ScoringData> {
  const { schema } = forest;
  const loaded = await loadForScoring(dataPath, schema);
  const target = findColumn(loaded.table, schema.target.name);
  const same = knowsTraining(forest) && forest.training.fingerprint !== '' && forest.training.fingerprint === loaded.fingerprint;
  if (!same) return { loaded, target };
  if (!target) {
    const dropped = loaded.dropped.find((d) => d.name === schema.target.name);
    return { loaded, trainingUnknown: `its column "${schema.target.name}" was left out${dropped ? ` (${dropped.reason})` : ''}` };
  }
  const rows = trainingRowsIn(forest, loaded.table, loaded.fingerprint);
  if ('unknown' in rows) return { loaded, target, trainingUnknown: rows.unknown };
  return {
    loaded,
    target,
    training: {
      membership: membershipOf(rows.trainRows, loaded.table.rowCount, rows.inBag),
      holdout: new Set(rows.holdoutRows ?? []),
    },
  };
}

/** The membership of chosen table rows only, for scoring those rows alone; rows keep their training index. */
export function membershipOfRows(m: Membership, tableRows: readonly number[]): Membership {
  return { trainPos: Int32Array.from(tableRows, (r) => m.trainPos[r]), trainCount: m.trainCount, inBag: m.inBag };
}

/** Per table row: class code (or value) of the label under the forest's classes; NaN where missing or unknown. */
export function truthOf(forest: Forest, target: Column | undefined, rows: number): Float64Array | undefined {
  if (!target) return undefined;
  const t = forest.schema.target;
  if (t.task === 'regression') return target.kind === 'numeric' ? target.values : new Float64Array(rows).fill(NaN);
  return codesFor(target, t.classes!).map((c) => (c < 0 ? NaN : c));
}

/** The label as written in the file ('' when missing); a number for regression. */
export function labelOf(forest: Forest, target: Column | undefined, r: number): string | number | undefined {
  if (!target) return undefined;
  const text = cellText(target, r);
  if (text === '') return undefined;
  return forest.schema.target.task === 'regression' ? Number(text) : text;
}

/** Our names for a row's part in the fit. */
export type Role = 'training' | 'holdout' | 'other';

export function roleName(role: RowRole): Role {
  return role === 'scored' ? 'other' : role;
}
