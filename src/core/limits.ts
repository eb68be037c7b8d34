// The bounds every part of Copse agrees on, in one place: the fit refuses what the model reader would refuse,
// so anything `copse fit` saves, `copse predict` loads. Each is checked before the work it bounds starts, so a
// request past one costs a sentence, not minutes and gigabytes. The numbers are our own choices, stated beside
// each. This module imports nothing, so the loader, the fit, the model file and the ONNX reader can all share it.

/** Trees in one forest: the fit, the model file and the ONNX reader. */
export const MAX_TREES = 100_000;

/** Features one forest reads: the model file and the ONNX reader; the loader's hard ceiling on columns. */
export const MAX_FEATURES = 100_000;

/**
 * Columns a CSV may have unless the caller raises it (the command line's --max-columns, up to MAX_FEATURES + 1).
 * Every column costs a builder, a binning and an entry in every report, so ten thousand is a generous default for
 * a table someone reads, and a file with more is far more likely a delimiter mistake or a transposed table.
 */
export const DEFAULT_MAX_COLUMNS = 10_000;

/** Classes a model may name: the model file and the ONNX reader (the 16-bit ceiling of ai.onnx.ml class ids). */
export const MAX_CLASSES_STORED = 65_535;

/**
 * Training rows times classes. Out-of-bag tallies keep one sum and one vote count per row and class, and a tree
 * grown to full depth keeps a value per class in each of up to twice as many nodes as rows, so this product sets
 * the memory of a classification fit: 20 million cells is 160 MB of sums (our own bound).
 */
export const MAX_ROW_CLASS_CELLS = 20_000_000;

/**
 * Rows times trees for outputs that list every tree's answer per row (votes per tree). 50 million entries is a
 * few hundred megabytes of text, beyond what anyone reads (our own bound).
 */
export const MAX_ROW_TREE_CELLS = 50_000_000;

/**
 * One line of a model file, in bytes: one tree's JSON. JavaScript strings hold at most about 2^29 characters,
 * so a longer line could not be parsed anyway; the writer refuses to write one and the reader stops reading one.
 */
export const MAX_MODEL_LINE_BYTES = 2 ** 29 - 64;

/**
 * A whole model file, in bytes. Full-depth forests on millions of rows run to gigabytes, so this is far above the
 * ONNX reader's 512 MiB (protobuf needs the file in one piece; our lines are read one at a time).
 */
export const MAX_MODEL_BYTES = 16 * 2 ** 30;

/** Blank or whitespace-only bytes between a model's lines: Copse writes none, and a run of them is damage. */
export const MAX_MODEL_BLANK_BYTES = 2 ** 20;

/** Seeds are whole numbers that a double holds exactly; larger ones would be silently rounded. */
export const MAX_SEED = Number.MAX_SAFE_INTEGER;
export const MIN_SEED = -Number.MAX_SAFE_INTEGER;

/** A value that stays finite when stored as a float32 (leaf values and covers are kept in Float32Array). */
export function finiteAsFloat32(x: number): boolean {
  return Number.isFinite(Math.fround(x));
}

/** Thousands separators for limits in messages (100,000), without depending on the wording module. */
export function grouped(n: number): string {
  return n.toLocaleString('en-US');
}
