// The typed, column-oriented form every CSV becomes. Nothing downstream sees text.
import type { ColumnKind } from '../base/schema';

export type { ColumnKind };

export interface NumericColumn {
  readonly name: string;
  readonly kind: 'numeric';
  /** NaN marks a missing cell. */
  readonly values: Float64Array;
}

export interface LevelColumn {
  readonly name: string;
  readonly kind: 'categorical' | 'boolean';
  /** Index into `levels`; -1 marks a missing cell. */
  readonly codes: Int32Array;
  readonly levels: readonly string[];
}

export type Column = NumericColumn | LevelColumn;

export interface DroppedColumn {
  readonly name: string;
  readonly reason: string;
}

export interface Table {
  readonly rowCount: number;
  readonly columns: readonly Column[];
  /** 1-based line in the file where each data row starts (quoted newlines make this differ from row + 1). */
  readonly lineOfRow: Int32Array;
  /** 1-based data row in the file (the first row after the header is 1), where rows were dropped or sampled. */
  readonly rowNumber?: Int32Array;
}

export function findColumn(table: Table, name: string): Column | undefined {
  return table.columns.find((c) => c.name === name);
}

export function isMissing(column: Column, row: number): boolean {
  return column.kind === 'numeric' ? Number.isNaN(column.values[row]) : column.codes[row] < 0;
}

/** The cell as the user would read it back; '' for missing. */
export function cellText(column: Column, row: number): string {
  if (column.kind === 'numeric') {
    const v = column.values[row];
    return Number.isNaN(v) ? '' : String(v);
  }
  const c = column.codes[row];
  return c < 0 ? '' : column.levels[c];
}
