// Limits `copse fit` checks before it grows a tree: each refusal is one sentence naming the limit and, where one
// exists, the option that gets under it. The limits themselves are core's (src/core/limits.ts), shared with the
// model reader, so a forest fit saves is one predict loads.
import { cellText, findColumn, type Table } from '../core/data/table';
import { inferTask } from '../core/forest/target';
import type { Task } from '../core/forest/params';
import { grouped, MAX_CLASSES_STORED, MAX_ROW_CLASS_CELLS, MAX_ROW_TREE_CELLS, MAX_SEED, MIN_SEED } from '../core/limits';
import { UsageError } from './args';

/**
 * --seed as an exact whole number. Digits only, and within what a double holds exactly: a larger seed would be
 * rounded to a neighbour, and two different seeds would give the same forest without a word.
 */
export function seedOf(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const t = text.trim();
  const n = /^[-+]?\d{1,20}$/.test(t) ? Number(t) : NaN;
  if (Number.isNaN(n)) throw new UsageError(`--seed takes a whole number written in digits; got "${text}".`, 'fit');
  if (n < MIN_SEED || n > MAX_SEED) {
    throw new UsageError(`--seed ${text} is outside the range a model keeps exactly, -${grouped(MAX_SEED)} to ${grouped(MAX_SEED)}.`, 'fit');
  }
  return n;
}

/** Distinct values among the cells that have one, and how many cells have one. */
function distinctCount(table: Table, target: string): { rows: number; classes: number } {
  const column = findColumn(table, target);
  if (!column) return { rows: 0, classes: 0 };
  const seen = new Set<string | number>();
  let rows = 0;
  for (let i = 0; i < table.rowCount; i++) {
    const text = cellText(column, i);
    if (text === '') continue;
    rows++;
    seen.add(column.kind === 'categorical' ? column.codes[i] : text);
  }
  return { rows, classes: seen.size };
}

/**
 * Why a classification fit on this table would outgrow its bounds, or undefined. The product of training rows
 * and classes sets the memory of the out-of-bag tallies and of every full-depth tree's leaf values, so it is
 * checked here, on the loaded table, before a worker starts.
 */
export function fitSizeProblem(table: Table, target: string, task: Task | undefined, holdout: number | undefined): string | undefined {
  const column = findColumn(table, target);
  if (!column || (task ?? inferTask(column)) !== 'classification') return undefined;
  const { rows, classes } = distinctCount(table, target);
  if (classes > MAX_CLASSES_STORED) {
    return `the target "${target}" has ${grouped(classes)} classes, more than the ${grouped(MAX_CLASSES_STORED)} a model file can name; choose another --target.`;
  }
  const trainRows = holdout ? rows - Math.max(1, Math.floor(rows * holdout)) : rows;
  const cells = trainRows * classes;
  if (cells > MAX_ROW_CLASS_CELLS) {
    const most = Math.max(1, Math.floor(MAX_ROW_CLASS_CELLS / classes));
    return (
      `${grouped(trainRows)} training rows times ${grouped(classes)} classes is ${grouped(cells)}, more than the limit of ` +
      `${grouped(MAX_ROW_CLASS_CELLS)} this fit keeps per-row class tallies for; fit on fewer rows with --sample-rows ${grouped(most).replace(/,/g, '')}, or choose a target with fewer classes.`
    );
  }
  return undefined;
}

/** Why listing every tree's vote for `rows` rows of a forest of `trees` trees is too much, or undefined. */
export function votesSizeProblem(rows: number, trees: number): string | undefined {
  if (rows * trees <= MAX_ROW_TREE_CELLS) return undefined;
  const most = Math.max(1, Math.floor(MAX_ROW_TREE_CELLS / trees));
  return `--rows asks for ${grouped(rows)} rows of ${grouped(trees)} trees' votes each, more than the limit of ${grouped(MAX_ROW_TREE_CELLS)} votes; ask for at most ${grouped(most)} rows at a time.`;
}

/** The sentence for an option that needs to read the data twice, given standard input or a pipe, read once. */
export function secondPass(what: string): string {
  return `${what}, which reads the data a second time; standard input or a pipe can be read only once, so save it to a file first.`;
}
