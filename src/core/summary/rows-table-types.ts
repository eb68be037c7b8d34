// The panel's rows table (re-exported by src/protocol/rows.ts): what it asks the host for (one page of a sorted, filtered view) and what comes back.
// The host keeps every row; the panel holds only the pages it has drawn, so 100,000 rows never cross at once.

export type RowsTableSortKey = 'row' | 'label' | 'predicted' | 'agreement' | 'residual' | 'margin';

export interface RowsTableQuery {
  readonly sort: RowsTableSortKey;
  readonly descending: boolean;
  /** Only the rows the forest doubts (negative margin, or a residual beyond the cut). */
  readonly doubtfulOnly: boolean;
  /** Only rows labelled with this class code (classification); null for every class. */
  readonly labelClass: number | null;
  /** Only rows whose out-of-bag prediction differs from the label (classification). */
  readonly mismatchOnly: boolean;
}

export interface RowsTableRequest {
  readonly query: RowsTableQuery;
  /** First position in the sorted, filtered view, and how many rows from there. */
  readonly offset: number;
  readonly limit: number;
}

export interface RowsTableRow {
  /** 1-based data row in the file, the number every other view uses. */
  readonly row: number;
  /** 1-based line in a text file, null for a file without text lines (Parquet, compressed). */
  readonly line: number | null;
  /** Class code or value; null when missing. */
  readonly label: number | null;
  /** The out-of-bag prediction (class code or value); null when no tree had the row out-of-bag. */
  readonly predicted: number | null;
  /** Classification: share of out-of-bag votes for the predicted class. Regression: null. */
  readonly agreement: number | null;
  /** Regression: label − out-of-bag value. Classification: null. */
  readonly residual: number | null;
  /** Classification: Breiman's margin. Regression: the modified z-score of the residual. Null without out-of-bag trees. */
  readonly margin: number | null;
  readonly doubtful: boolean;
}

export interface RowsTablePage {
  /** Rows in the filtered view, to size the scroll area. */
  readonly total: number;
  readonly offset: number;
  readonly rows: readonly RowsTableRow[];
}

/** Largest page handed out at once: a screenful many times over, never the whole of a large file. */
export const MAX_PAGE = 500;
