// What opening a forest from a file needs before it can be shown against a CSV, apart from the dialogs: naming
// a foreign model's positional features by the CSV's columns, covers counted from the CSV when the file has
// none, and permutation importance on the CSV's labelled rows. No `vscode` here, so tests run it as the command does.

import { readFileSync } from 'node:fs';
import type { CoreFitSummary, Forest, ModelOrigin, PermutationImportance, Table, TrainingRows } from '../engine';
import { findColumn, knowsTraining, median, ModelError, nameByPosition, namedByPosition, permutationOnRows, summarizeOpened, targetCodes, withCoverFrom } from '../engine';
import { panelSummary } from '../summary/panel';
import { ExplainClient } from '../workers/explainClient';
import { COVERS_FROM_FILE, UNAVAILABLE_FOR_IMPORT } from './importText';
import { csvLabel, type LoadedCsv } from './csvSource';
import { ForestSession, type ScorerLike, type Scored } from './session';

export { COVERS_FROM_FILE, UNAVAILABLE_FOR_IMPORT } from './importText';

export interface PositionalNaming {
  /** The question to put to the user, once. */
  readonly question: string;
  /** The column taken as the target, if any: left out of the features. */
  readonly target: string | undefined;
}

/**
 * For a model whose features are positions (f0, f1, ...) that the CSV does not have: which column would be the
 * target, and the question to ask. The target is the forest's own target name if the header has it; otherwise,
 * with one column more than the features, the last column (where a target most often sits). Undefined when no
 * naming is needed; a ModelError when the counts cannot match, naming both.
 */
export function positionalNaming(forest: Forest, origin: ModelOrigin, header: readonly string[], csvLabel: string, modelLabel: string): PositionalNaming | undefined {
  if (!namedByPosition(origin)) return undefined;
  const features = forest.schema.features;
  const columns = new Set(header);
  if (features.every((f) => columns.has(f.name))) return undefined;
  const p = features.length;
  const own = forest.schema.target.name;
  let target: string | undefined;
  if (header.includes(own) && header.length === p + 1) target = own;
  else if (header.length === p + 1) target = header[p];
  else if (header.length !== p) {
    throw new ModelError(
      `${modelLabel} reads ${p} features by position and names none of them; ${csvLabel} has ${header.length} columns, so its columns cannot be taken in order ` +
        `(that needs ${p} columns, or ${p + 1} with the target). Make a CSV with just the features in the model's order, and the target if you want scores.`,
    );
  }
  const first = header.filter((h) => h !== target);
  const span = p <= 3 ? first.map((c) => `"${c}"`).join(', ') : `"${first[0]}", "${first[1]}", … "${first[p - 1]}"`;
  const question =
    `${modelLabel} names its ${p} features by position only (f0 … f${p - 1}). Take ${csvLabel}'s columns in order as those features (${span})` +
    (target === undefined ? ', with no column as the target (nothing can be scored)?' : `, leaving out "${target}" as the target?`);
  return { question, target };
}

/** The forest with the CSV's columns as its features, and the left-out column (if any) as its target's name. */
export function nameByHeader(forest: Forest, header: readonly string[], target: string | undefined): Forest {
  const named = nameByPosition(forest, header, target === undefined ? [] : [target]);
  if (target === undefined || target === named.schema.target.name) return named;
  // truthOf looks the target up by name: the file's output name is not the CSV's column name.
  return { ...named, schema: { ...named.schema, target: { ...named.schema.target, name: target } } };
}

/**
 * The forest ready for this table. A file without training facts has no covers and no typical values: covers
 * are counted from the table's rows, and each numeric feature's typical value (what maps hold the other
 * features at) is its median in the table. `x` is the table in the forest's feature space (encodeTable), which
 * the caller encodes once for this, permutation importance and the session.
 */
export function forestForTable(forest: Forest, table: Table, x: Float64Array): Forest {
  if (knowsTraining(forest)) return forest;
  const features = forest.schema.features.map((f) => {
    const column = findColumn(table, f.name);
    return f.kind === 'numeric' && Number.isNaN(f.reference) && column?.kind === 'numeric' ? { ...f, reference: median(column.values) } : f;
  });
  const typical = { ...forest, schema: { ...forest.schema, features } };
  // An XGBoost file carries each node's hessian sum, the covers XGBoost's own TreeSHAP weighs by: they stay.
  return forest.boosting?.source === 'xgboost' ? typical : withCoverFrom(typical, x, table.rowCount);
}

/**
 * Why permutation importance will not be measured on this table, or undefined when it will: it needs target
 * values, and on the forest's own training file it would be in-sample (its rows were fitted).
 */
export function permutationSkipped(forest: Forest, table: Table, fingerprint: string): string | undefined {
  if (forest.training.fingerprint !== '' && forest.training.fingerprint === fingerprint) {
    return 'not measured: this is the file the forest was trained on, so shuffling its columns would be measured on rows the trees fitted. Fit again for out-of-bag permutation importance.';
  }
  if (!targetCodes(forest, table).some((v) => !Number.isNaN(v))) return `not measured: the file has no "${forest.schema.target.name}" values to score against.`;
  return undefined;
}

/** Permutation importance on the table's labelled rows, scored by the given scorer (a worker thread in the editor). */
export async function permutationOnTable(forest: Forest, table: Table, x: Float64Array, scorer: ScorerLike, seed: number, signal?: AbortSignal): Promise<PermutationImportance | undefined> {
  const truth = targetCodes(forest, table);
  const imp = await permutationOnRows(
    { x, rows: table.rowCount, features: forest.schema.features.length, truth, task: forest.schema.target.task, seed, signal },
    (rows, n) => scorer.predict(rows, n),
  );
  return imp.rows > 0 ? imp : undefined;
}

export interface OpenedSessionInput {
  /** Named for the CSV and ready for its table (forestForTable). */
  readonly forest: Forest;
  /** Whether the forest was imported without its training sample. */
  readonly imported: boolean;
  readonly origin: ModelOrigin;
  readonly modelLabel: string;
  /** The CSV as read, and its URI (for a refit after the panel is restored). */
  readonly csv: LoadedCsv & { readonly uri: string };
  /** The table in the forest's feature space, as forestForTable was given it. */
  readonly encoded: Float64Array;
  readonly warnings: readonly string[];
  readonly permutation: PermutationImportance | undefined;
  /** Why permutation importance was not measured (permutationSkipped), when it was not. */
  readonly permutationMissing?: string;
  /** The forest's training rows in this table, or why they are not known (core's trainingRowsIn). */
  readonly training: TrainingRows | { readonly unknown: string };
  readonly scorer: ScorerLike;
  readonly intervalLevel?: number;
}

/** The session for a forest opened from a file and shown against a CSV. */
export function openedSession(i: OpenedSessionInput): Promise<ForestSession> {
  const { forest, csv, modelLabel } = i;
  const label = csvLabel(csv);
  const training = i.training;
  let core: CoreFitSummary | undefined;
  const coreOf = ({ prediction, truth, votes }: Scored): CoreFitSummary =>
    (core ??= summarizeOpened({
      forest,
      table: csv.load.table,
      prediction,
      truth,
      votes,
      file: label,
      fingerprint: csv.load.fingerprint,
      rowsRead: csv.load.rowsRead,
      sampled: csv.sampled,
      training,
      permutation: i.permutation,
      permutationMissing: i.permutationMissing,
      notes: originNotes(forest, i.origin, modelLabel, label),
      warnings: i.warnings,
    }));
  return ForestSession.create({
    forest,
    csv,
    encoded: i.encoded,
    text: () => readFileSync(csv.path, 'utf8'),
    // The training file itself, read as the fit read it: the out-of-bag views are the fit's own.
    oob: 'trainRows' in training ? training : undefined,
    // One core summary serves the panel and the shareable report.
    summary: (fit, scored) => panelSummary(coreOf(scored), { fit, uri: csv.uri }),
    coreSummary: (scored) => coreOf(scored),
    scorer: i.scorer,
    explainer: (setup) => new ExplainClient(setup),
    // Intervals need the forest's training rows: they are there when this CSV is its training file, and
    // never for an import without Copse's metadata.
    quantiles: i.imported ? { from: 'none', reason: `${UNAVAILABLE_FOR_IMPORT}.` } : { from: 'table' },
    importedFrom: i.imported ? modelLabel : undefined,
    model: { file: modelLabel, kind: i.origin.kind },
    intervalLevel: i.intervalLevel,
  });
}

/** What the reader must know first: where the forest came from, and for an import what it cannot show. */
function originNotes(forest: Forest, origin: ModelOrigin, modelLabel: string, csvLabel: string): string[] {
  const trained = `trained on ${forest.training.rows} rows.`;
  if (origin.kind === 'copse') {
    // A model file saved from an import keeps the import's lack of a training sample.
    if (!knowsTraining(forest)) return [`Opened from ${modelLabel}, saved from an import: out-of-bag scores, bootstrap membership and prediction intervals are ${UNAVAILABLE_FOR_IMPORT}.`];
    return [`Opened from ${modelLabel}: ${trained}`];
  }
  const by = origin.kind === 'onnx' && origin.producer ? `, written by ${origin.producer}` : '';
  const head =
    origin.kind === 'onnx'
      ? `Imported from ${modelLabel} (ONNX ${origin.operator}${by})`
      : `Read from ${modelLabel} (XGBoost ${origin.version}, objective ${origin.objective}, boosted trees: agreement between trees does not apply)`;
  const out: string[] = [];
  if (knowsTraining(forest)) out.push(`${head}, a Copse export: ${trained}`);
  else {
    out.push(
      `${head}: out-of-bag scores, bootstrap membership, doubtful-row margins and prediction intervals are ${UNAVAILABLE_FOR_IMPORT}.`,
      `Impurity decrease and ${COVERS_FROM_FILE}.`,
    );
  }
  if (origin.names === 'positions') out.push(`The file names no features: they were taken from ${csvLabel}'s columns in order.`);
  return [...out, ...origin.notes.map((n) => `Import: ${n}`)];
}
