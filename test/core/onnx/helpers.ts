// Building small ONNX graphs by hand and running them with onnxruntime, the reference every ONNX check here is
// held against: what a runtime computes from a file is what the file means.
import * as ort from 'onnxruntime-node';
import seedrandom from 'seedrandom';
import type { Column, Table } from '../../../src/core/data/table';
import { ATTR, DTYPE, encodeModel, type OnnxAttribute, type OnnxModel, type OnnxNode, type OnnxTensor } from '../../../src/core/onnx/proto';

const utf8 = new TextEncoder();

/** What make_sklearn_onnx.py recorded from scikit-learn beside its two ONNX files (sklearn-predictions.json). */
export interface SklearnDataset {
  file: string;
  target: string;
  classes?: string[];
  /** Row by row, one probability per class. */
  proba?: number[][];
  value?: number[];
}
export interface SklearnPredictions {
  iris: SklearnDataset & { classes: string[]; proba: number[][] };
  diabetes: SklearnDataset & { value: number[] };
}

export type AttrValue = number | string | { ints: number[] } | { floats: number[] } | { strings: string[] } | { tensor: OnnxTensor };

export function attr(name: string, v: AttrValue): OnnxAttribute {
  if (typeof v === 'number') return { name, type: ATTR.INT, i: v };
  if (typeof v === 'string') return { name, type: ATTR.STRING, s: utf8.encode(v) };
  if ('ints' in v) return { name, type: ATTR.INTS, ints: v.ints };
  if ('floats' in v) return { name, type: ATTR.FLOATS, floats: v.floats };
  if ('strings' in v) return { name, type: ATTR.STRINGS, strings: v.strings.map((s) => utf8.encode(s)) };
  return { name, type: ATTR.TENSOR, t: v.tensor };
}

export function floatTensor(values: number[], dtype: number = DTYPE.FLOAT): { tensor: OnnxTensor } {
  const key = dtype === DTYPE.DOUBLE ? 'double_data' : dtype === DTYPE.FLOAT ? 'float_data' : 'int32_data';
  return { tensor: { dims: [values.length], data_type: dtype, [key]: values } };
}

export interface GraphOptions {
  readonly features: number;
  readonly inputType?: number;
  readonly mlOpset?: number;
  readonly outputs?: string[];
  readonly before?: OnnxNode[];
  readonly after?: OnnxNode[];
  readonly metadata?: Array<{ key: string; value: string }>;
  readonly inputName?: string;
}

/** A model holding one ensemble node `op` with the given attributes, reading input "x" [N, features]. */
export function ensembleModel(op: string, attributes: Record<string, AttrValue>, o: GraphOptions): OnnxModel {
  const inputType = o.inputType ?? DTYPE.FLOAT;
  const outputs = o.outputs ?? (op === 'TreeEnsembleClassifier' ? ['label', 'probabilities'] : ['y']);
  const node: OnnxNode = {
    op_type: op,
    domain: 'ai.onnx.ml',
    input: [o.before?.length ? 'scaled' : (o.inputName ?? 'x')],
    output: outputs,
    attribute: Object.entries(attributes).map(([k, v]) => attr(k, v)),
  };
  const mlOpset = o.mlOpset ?? (op === 'TreeEnsemble' ? 5 : 3);
  return {
    ir_version: mlOpset >= 5 ? 10 : 8,
    opset_import: [
      { domain: '', version: mlOpset >= 5 ? 21 : 13 },
      { domain: 'ai.onnx.ml', version: mlOpset },
    ],
    producer_name: 'copse-test',
    graph: {
      name: 'g',
      node: [...(o.before ?? []), node, ...(o.after ?? [])],
      input: [{ name: o.inputName ?? 'x', type: { tensor_type: { elem_type: inputType, shape: { dim: [{ dim_param: 'N' }, { dim_value: o.features }] } } } }],
      output: outputs.map((name, i) => ({ name, type: { tensor_type: { elem_type: op === 'TreeEnsembleClassifier' && i === 0 ? DTYPE.STRING : inputType === DTYPE.DOUBLE && op === 'TreeEnsemble' ? DTYPE.DOUBLE : DTYPE.FLOAT } } })),
    },
    metadata_props: o.metadata,
  };
}

export const bytesOf = (m: OnnxModel) => encodeModel(m);

/** Runs a model on row-major rows; float inputs are rounded to float32 here, as a caller of the runtime must. */
export async function runOnnx(bytes: Uint8Array, x: ArrayLike<number>, rows: number, features: number, options: { input?: string; double?: boolean } = {}): Promise<Record<string, ArrayLike<number | string>>> {
  const session = await ort.InferenceSession.create(bytes);
  const data = options.double ? Float64Array.from(x) : Float32Array.from(x);
  const tensor = new ort.Tensor(options.double ? 'float64' : 'float32', data, [rows, features]);
  const out = await session.run({ [options.input ?? 'x']: tensor });
  const result: Record<string, ArrayLike<number | string>> = {};
  for (const [k, v] of Object.entries(out)) result[k] = v.data as ArrayLike<number | string>;
  await session.release();
  return result;
}

export function maxDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`lengths differ: ${a.length} and ${b.length}`);
  let m = 0;
  for (let i = 0; i < a.length; i++) {
    const d = Math.abs(a[i] - b[i]);
    if (!(d <= m)) m = Number.isNaN(d) ? Infinity : d;
  }
  return m;
}

/** A copy of the table with a share of the cells of every column but `keep` made missing. */
export function blankOut(table: Table, share: number, keep: string, seed: string): Table {
  const rnd = seedrandom(seed);
  const columns = table.columns.map((c): Column => {
    if (c.name === keep) return c;
    if (c.kind === 'numeric') return { ...c, values: c.values.map((v) => (rnd() < share ? NaN : v)) };
    return { ...c, codes: c.codes.map((v) => (rnd() < share ? -1 : v)) };
  });
  return { ...table, columns };
}
