// What the target picker says about each column: its type, distinct values, missing share, and the task
// a fit on it would be. Pure, so the picker's wording is tested without an editor.

import type { Column, DroppedColumn, Table, Task } from '../engine';
import { inferTask } from '../engine';
import { formatShare } from '../engine';

export interface ColumnProfile {
  readonly name: string;
  /** undefined for a column the loader left out. */
  readonly kind?: Column['kind'];
  readonly distinct: number;
  readonly missingShare: number;
  /** The task a fit on this column would infer; undefined when it cannot be a target. */
  readonly task?: Task;
  /** Why the loader left the column out, when it did. */
  readonly dropped?: string;
}

export function profileColumns(table: Table, header: readonly string[], dropped: readonly DroppedColumn[]): ColumnProfile[] {
  const byName = new Map(table.columns.map((c) => [c.name, c]));
  const droppedBy = new Map(dropped.map((d) => [d.name, d.reason]));
  const names = header.length ? header : table.columns.map((c) => c.name);
  return names.map((name) => {
    const col = byName.get(name);
    if (!col) return { name, distinct: 0, missingShare: 0, dropped: droppedBy.get(name) ?? 'not read' };
    return { name, kind: col.kind, ...countColumn(col, table.rowCount), task: safeTask(col) };
  });
}

function safeTask(col: Column): Task | undefined {
  try {
    return inferTask(col);
  } catch {
    return undefined;
  }
}

function countColumn(col: Column, rows: number): { distinct: number; missingShare: number } {
  let missing = 0;
  if (col.kind === 'numeric') {
    const seen = new Set<number>();
    for (let i = 0; i < rows; i++) {
      const v = col.values[i];
      if (Number.isNaN(v)) missing++;
      else seen.add(v);
    }
    return { distinct: seen.size, missingShare: rows ? missing / rows : 0 };
  }
  const seen = new Uint8Array(col.levels.length);
  let distinct = 0;
  for (let i = 0; i < rows; i++) {
    const c = col.codes[i];
    if (c < 0) missing++;
    else if (!seen[c]) {
      seen[c] = 1;
      distinct++;
    }
  }
  return { distinct, missingShare: rows ? missing / rows : 0 };
}

/** One line under the column name in the picker. */
export function describeProfile(p: ColumnProfile): string {
  if (p.dropped) return `left out when reading: ${p.dropped}`;
  const parts = [p.kind ?? 'unknown', `${p.distinct} distinct`, `${formatShare(p.missingShare)} missing`];
  if (p.task) parts.push(`fits as ${p.task}`);
  return parts.join(' · ');
}

export function otherTask(task: Task): Task {
  return task === 'classification' ? 'regression' : 'classification';
}

/** Whether a column can be fitted as `task` at all (regression needs numbers). */
export function taskAllowed(p: ColumnProfile, task: Task): boolean {
  if (p.dropped || !p.kind) return false;
  return task === 'classification' || p.kind === 'numeric';
}
