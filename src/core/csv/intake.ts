// Where parsed records go: the header is checked, then each row's cells go to the column builders.

import type { ColumnKind } from '../data/table';
import type { CellCleaner } from './cells';
import { ColumnBuilder } from './column-builder';
import { Reservoir } from './reservoir';
import { DEFAULT_MAX_COLUMNS } from '../limits';
import { DataError } from './types';
import { count, plural, q, someNames } from './wording';

export interface IntakeConfig {
  readonly label: string;
  readonly target?: string;
  readonly columnTypes: Readonly<Record<string, ColumnKind | 'exclude'>>;
  readonly cleaner: CellCleaner;
  readonly maxLevels: number;
  readonly sample?: { readonly rows: number; readonly seed: number };
  /** Most columns the header may have (LoadOptions.maxColumns); default DEFAULT_MAX_COLUMNS. */
  readonly maxColumns?: number;
}

const KINDS: readonly string[] = ['numeric', 'categorical', 'boolean', 'exclude'];
const FIRST_CAPACITY = 1024;

export class Intake {
  header: string[] | null = null;
  headerLine = 0;
  /** The first problem found; records after it are ignored and the load stops. */
  failure: DataError | null = null;
  /** Settings that did not apply, for the result's warnings. */
  readonly warnings: string[] = [];
  rowsRead = 0;
  missingTarget = 0;
  firstMissingTargetLine = 0;
  targetIndex = -1;
  builders: (ColumnBuilder | null)[] = [];
  /** Slots in use: rows kept so far without sampling, reservoir fill with it. */
  slots = 0;
  lineOfSlot: Int32Array = new Int32Array(0);
  /** Row number of each slot's occupant; only needed to put a sample back in file order. */
  rowOfSlot: Float64Array | null = null;
  readonly reservoir: Reservoir | null;
  private capacity = 0;
  private maxCapacity = Infinity;
  private width = 0;

  constructor(private readonly config: IntakeConfig) {
    this.reservoir = config.sample ? new Reservoir(config.sample.rows, config.sample.seed) : null;
  }

  /** One record: text cells from a CSV, or from a typed file text and numbers (a number is never cleaned; NaN is missing). */
  readonly onRecord = (fields: readonly (string | number)[], line: number): void => {
    if (this.failure !== null) return;
    if (this.header === null) {
      this.takeHeader(fields, line);
      return;
    }
    if (fields.length !== this.width) {
      this.failure = this.raggedRow(fields.length, line);
      return;
    }
    this.rowsRead++;
    const t = this.targetIndex;
    const targetCell = t >= 0 ? fields[t] : 0;
    if (t >= 0 && (typeof targetCell === 'number' ? targetCell !== targetCell : this.config.cleaner.clean(targetCell).length === 0)) {
      if (this.missingTarget++ === 0) this.firstMissingTargetLine = line;
      return;
    }
    let slot = this.slots;
    if (this.reservoir !== null) {
      slot = this.reservoir.admit();
      if (slot < 0) return;
    }
    if (slot >= this.capacity) this.grow(Math.min(this.capacity * 2, this.maxCapacity));
    if (this.rowOfSlot !== null) this.rowOfSlot[slot] = this.rowsRead - 1;
    if (slot >= this.slots) this.slots = slot + 1;
    this.lineOfSlot[slot] = line;
    const builders = this.builders;
    for (let j = 0; j < builders.length; j++) {
      const b = builders[j];
      if (b === null) continue;
      const cell = fields[j];
      if (typeof cell === 'number') b.addNumber(cell, slot);
      else b.add(cell, slot);
    }
  };

  private grow(capacity: number): void {
    this.capacity = capacity;
    const lines = new Int32Array(capacity);
    lines.set(this.lineOfSlot);
    this.lineOfSlot = lines;
    if (this.rowOfSlot !== null) {
      const rows = new Float64Array(capacity);
      rows.set(this.rowOfSlot);
      this.rowOfSlot = rows;
    }
    for (const b of this.builders) b?.grow(capacity);
  }

  private takeHeader(raw: readonly (string | number)[], line: number): void {
    const { label } = this.config;
    this.headerLine = line;
    const maxColumns = this.config.maxColumns ?? DEFAULT_MAX_COLUMNS;
    if (raw.length > maxColumns) {
      // Checked before a builder is made: a transposed table or a wrong delimiter costs a sentence, not gigabytes.
      this.failure = new DataError(
        `${label} line ${line}: the header has ${count(raw.length)} columns, more than the limit of ${count(maxColumns)}; check the delimiter, or raise the limit with --max-columns.`,
      );
      return;
    }
    const names = raw.map((n) => String(n).trim());
    for (let j = 0; j < names.length; j++) {
      if (names[j] === '') {
        const before = j > 0 ? names[j - 1] : '';
        const after = j + 1 < names.length ? names[j + 1] : '';
        const where = before !== '' ? ` (after ${q(before)})` : after !== '' ? ` (before ${q(after)})` : '';
        this.failure = new DataError(`${label} line ${line}: column ${j + 1}${where} has an empty name in the header.`);
        return;
      }
    }
    const seen = new Map<string, number>();
    for (let j = 0; j < names.length; j++) {
      const earlier = seen.get(names[j]);
      if (earlier !== undefined) {
        this.failure = new DataError(
          `${label} line ${line}: columns ${earlier + 1} and ${j + 1} are both named ${q(names[j])}; column names must be unique.`,
        );
        return;
      }
      seen.set(names[j], j);
    }
    const problem = this.checkOptions(names, line);
    if (problem) {
      this.failure = problem;
      return;
    }
    this.header = names;
    this.width = names.length;
    this.targetIndex = this.config.target === undefined ? -1 : names.indexOf(this.config.target);
    // A sample never needs more slots than it keeps; start small either way, the file may be short.
    if (this.config.sample) this.maxCapacity = this.config.sample.rows;
    const capacity = Math.min(FIRST_CAPACITY, this.maxCapacity);
    this.capacity = capacity;
    this.lineOfSlot = new Int32Array(capacity);
    // Every slot remembers its data row: samples are put back in file order by it, and rows dropped for a
    // missing target leave gaps that callers number by it.
    this.rowOfSlot = new Float64Array(capacity);
    const { columnTypes, maxLevels, cleaner } = this.config;
    this.builders = names.map((name, j) => {
      const forced = Object.hasOwn(columnTypes, name) ? columnTypes[name] : undefined;
      if (forced === 'exclude') return null;
      // A level cap only for columns that may be dropped as free text; a little slack above it keeps the exact
      // count for the drop reason and survives levels that only evicted sample rows had.
      const exactText = forced === 'categorical' || forced === 'boolean';
      const unlimited = j === this.targetIndex || exactText;
      return new ColumnBuilder(name, capacity, unlimited ? Infinity : Math.max(4 * maxLevels, maxLevels + 1), cleaner, exactText);
    });
  }

  private checkOptions(names: readonly string[], line: number): DataError | undefined {
    const { label, target, columnTypes } = this.config;
    if (target !== undefined && !names.includes(target)) {
      const near = names.find((n) => n.toLowerCase() === target.trim().toLowerCase());
      const hint = near !== undefined ? ` (did you mean ${q(near)}?)` : '';
      return new DataError(
        `${label} has no column named ${q(target)} to predict (header on line ${line}); its columns are ${someNames(names)}${hint}.`,
      );
    }
    for (const [name, kind] of Object.entries(columnTypes)) {
      if (!KINDS.includes(kind)) {
        return new DataError(`${label}: the type given for column ${q(name)} is ${q(String(kind))}; use numeric, categorical, boolean or exclude.`);
      }
      if (!names.includes(name)) {
        // Not an error: a forest's feature list is forced onto files that may lack some of them, and the
        // caller names what is missing in its own terms.
        this.warnings.push(`${label} has no column named ${q(name)}, so the type set for it was not used.`);
      }
      if (name === target && kind === 'exclude') {
        return new DataError(`${label}: column ${q(name)} is the target to predict, so it cannot be excluded.`);
      }
    }
    return undefined;
  }

  private raggedRow(fields: number, line: number): DataError {
    const header = this.header as string[];
    const { label } = this.config;
    const detail =
      fields < header.length
        ? `so column ${q(header[fields])} has no value`
        : `so ${plural(fields - header.length, 'field')} after column ${q(header[header.length - 1])} ${fields - header.length === 1 ? 'has' : 'have'} no header name`;
    return new DataError(
      `${label} line ${line} has ${plural(fields, 'field')}, but the header (line ${this.headerLine}) has ${count(header.length)}, ${detail}.`,
    );
  }
}
