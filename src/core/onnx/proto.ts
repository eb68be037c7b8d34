// The ONNX schema as protobufjs types, loaded from the committed JSON descriptor, and the typed shapes of the
// messages Copse reads and writes. Only the light build is used: no .proto parsing at run time.
import * as protobuf from 'protobufjs/light';
import { ONNX_DESCRIPTOR } from './onnx-descriptor';

export interface OnnxTensor {
  dims?: number[];
  data_type?: number;
  float_data?: number[];
  int32_data?: number[];
  int64_data?: number[];
  double_data?: number[];
  uint64_data?: number[];
  string_data?: Uint8Array[];
  raw_data?: Uint8Array;
  data_location?: number;
  name?: string;
}

export interface OnnxAttribute {
  name?: string;
  ref_attr_name?: string;
  type?: number;
  f?: number;
  i?: number;
  s?: Uint8Array;
  t?: OnnxTensor;
  floats?: number[];
  ints?: number[];
  strings?: Uint8Array[];
  tensors?: OnnxTensor[];
}

export interface OnnxNode {
  input?: string[];
  output?: string[];
  name?: string;
  op_type?: string;
  domain?: string;
  attribute?: OnnxAttribute[];
  doc_string?: string;
}

export interface OnnxTypeProto {
  tensor_type?: { elem_type?: number; shape?: { dim?: Array<{ dim_value?: number; dim_param?: string }> } };
}

export interface OnnxValueInfo {
  name?: string;
  type?: OnnxTypeProto;
  doc_string?: string;
}

export interface OnnxGraph {
  node?: OnnxNode[];
  name?: string;
  initializer?: OnnxTensor[];
  doc_string?: string;
  input?: OnnxValueInfo[];
  output?: OnnxValueInfo[];
}

export interface OnnxModel {
  ir_version?: number;
  opset_import?: Array<{ domain?: string; version?: number }>;
  producer_name?: string;
  producer_version?: string;
  domain?: string;
  model_version?: number;
  doc_string?: string;
  graph?: OnnxGraph;
  metadata_props?: Array<{ key?: string; value?: string }>;
  functions?: unknown[];
}

/** AttributeProto.AttributeType and TensorProto.DataType values used here (onnx.proto). */
export const ATTR = { FLOAT: 1, INT: 2, STRING: 3, TENSOR: 4, GRAPH: 5, FLOATS: 6, INTS: 7, STRINGS: 8, TENSORS: 9 } as const;
export const DTYPE = { FLOAT: 1, UINT8: 2, INT8: 3, INT32: 6, INT64: 7, STRING: 8, DOUBLE: 11, UINT64: 13 } as const;

let modelType: protobuf.Type | undefined;

function model(): protobuf.Type {
  modelType ??= protobuf.Root.fromJSON(ONNX_DESCRIPTOR).lookupType('onnx.ModelProto');
  return modelType;
}

/** A plain Uint8Array: under Node protobufjs returns a Buffer, whose slice() would share memory instead of copying. */
export function encodeModel(m: OnnxModel): Uint8Array {
  const b = model().encode(m).finish();
  return new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
}

/**
 * Decodes with 64-bit integers as plain numbers. protobufjs would otherwise make one Long object per integer,
 * which for a large ensemble's node lists costs far more memory than the file. An integer beyond 2^53 becomes
 * NaN, so every later range check refuses it instead of trusting a rounded value.
 */
export function decodeModel(bytes: Uint8Array): OnnxModel {
  const reader = protobuf.Reader.create(bytes);
  const asNumber = (name: 'int64' | 'uint64' | 'sint64') =>
    function (): number {
      const v = protobuf.Reader.prototype[name].call(reader);
      if (typeof v === 'number') return v;
      const high = v.unsigned ? v.high >>> 0 : v.high | 0;
      const n = high * 4294967296 + (v.low >>> 0);
      return Number.isSafeInteger(n) ? n : NaN;
    };
  const r = reader as unknown as Record<'int64' | 'uint64' | 'sint64', () => number>;
  r.int64 = asNumber('int64');
  r.uint64 = asNumber('uint64');
  r.sint64 = asNumber('sint64');
  return model().decode(reader) as unknown as OnnxModel;
}
