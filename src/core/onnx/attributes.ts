// Reading one node's attributes from an untrusted file: every attribute is checked for its declared type, every
// list for its element kind, every tensor for a data type, a shape and data that agree. Failures name the attribute.
import { ModelError } from '../model/validate';
import { ATTR, DTYPE, type OnnxAttribute, type OnnxNode, type OnnxTensor } from './proto';

const TYPE_NAMES: Record<number, string> = { 1: 'FLOAT', 2: 'INT', 3: 'STRING', 4: 'TENSOR', 5: 'GRAPH', 6: 'FLOATS', 7: 'INTS', 8: 'STRINGS', 9: 'TENSORS' };
const utf8 = new TextDecoder('utf-8', { fatal: true });

export type Fail = (what: string) => never;

export function failWith(label: string): Fail {
  return (what: string) => {
    throw new ModelError(`${label} is not a usable ONNX tree ensemble: ${what}.`);
  };
}

export function decodeText(bytes: Uint8Array | undefined, fail: Fail, what: string): string {
  try {
    return utf8.decode(bytes ?? new Uint8Array(0));
  } catch {
    return fail(`${what} is not UTF-8 text`);
  }
}

export class Attributes {
  private readonly byName = new Map<string, OnnxAttribute>();
  private readonly used = new Set<string>();

  constructor(node: OnnxNode, private readonly fail: Fail, private readonly where: string) {
    for (const a of node.attribute ?? []) {
      const name = a.name ?? '';
      if (a.ref_attr_name) fail(`${where} attribute "${name}" refers to a function attribute, which only functions may do`);
      if (this.byName.has(name)) fail(`${where} gives the attribute "${name}" twice`);
      this.byName.set(name, a);
    }
  }

  has(name: string): boolean {
    return this.byName.has(name);
  }

  /** Attributes the reader never asked for: a newer operator version's, or a mistake; reported, not guessed at. */
  unused(): string[] {
    return [...this.byName.keys()].filter((n) => !this.used.has(n));
  }

  private get(name: string, type: number, required: boolean): OnnxAttribute | undefined {
    this.used.add(name);
    const a = this.byName.get(name);
    if (!a) {
      if (required) this.fail(`${this.where} has no attribute "${name}"`);
      return undefined;
    }
    if (a.type !== type) this.fail(`${this.where} attribute "${name}" should be ${TYPE_NAMES[type]}, not ${TYPE_NAMES[a.type ?? 0] ?? `type ${a.type}`}`);
    return a;
  }

  int(name: string, fallback?: number): number {
    const a = this.get(name, ATTR.INT, fallback === undefined);
    if (!a) return fallback!;
    const v = a.i ?? 0;
    if (!Number.isSafeInteger(v)) this.fail(`${this.where} attribute "${name}" is out of range`);
    return v;
  }

  text(name: string, fallback?: string): string {
    const a = this.get(name, ATTR.STRING, fallback === undefined);
    return a ? decodeText(a.s, this.fail, `${this.where} attribute "${name}"`) : fallback!;
  }

  ints(name: string, required = true): number[] | undefined {
    const a = this.get(name, ATTR.INTS, required);
    if (!a) return undefined;
    const v = a.ints ?? [];
    for (let i = 0; i < v.length; i++) if (!Number.isSafeInteger(v[i])) this.fail(`${this.where} attribute "${name}"[${i}] is out of range`);
    return v;
  }

  floats(name: string): number[] | undefined {
    const a = this.get(name, ATTR.FLOATS, false);
    return a ? (a.floats ?? []) : undefined;
  }

  strings(name: string): string[] | undefined {
    const a = this.get(name, ATTR.STRINGS, false);
    return a ? (a.strings ?? []).map((s, i) => decodeText(s, this.fail, `${this.where} attribute "${name}"[${i}]`)) : undefined;
  }

  tensor(name: string, required: boolean): { type: number; values: ArrayLike<number> } | undefined {
    const a = this.get(name, ATTR.TENSOR, required);
    if (!a) return undefined;
    if (!a.t) this.fail(`${this.where} attribute "${name}" holds no tensor`);
    return { type: a.t.data_type ?? 0, values: tensorValues(a.t, this.fail, `${this.where} attribute "${name}"`) };
  }

  /** A list given either as FLOATS or, in double precision, as the `_as_tensor` variant; never both. */
  floatsOrTensor(name: string): ArrayLike<number> | undefined {
    const plain = this.floats(name);
    const tensor = this.tensor(`${name}_as_tensor`, false);
    if (plain && tensor) this.fail(`${this.where} gives both "${name}" and "${name}_as_tensor"`);
    return plain ?? tensor?.values;
  }
}

/** A numeric tensor's values, from whichever field its data type keeps them in; external data is refused. */
export function tensorValues(t: OnnxTensor, fail: Fail, what: string): ArrayLike<number> {
  if (t.data_location === 1) fail(`${what} keeps its data in an external file, which Copse does not read`);
  const type = t.data_type ?? 0;
  const raw = t.raw_data && t.raw_data.length > 0 ? t.raw_data : undefined;
  let values: ArrayLike<number>;
  const view = raw ? new DataView(raw.buffer, raw.byteOffset, raw.byteLength) : undefined;
  const fromRaw = (size: number, read: (offset: number) => number): number[] => {
    if (raw!.length % size !== 0) fail(`${what} has ${raw!.length} data bytes, not a whole number of ${size}-byte values`);
    const out = new Array<number>(raw!.length / size);
    for (let i = 0; i < out.length; i++) out[i] = read(i * size);
    return out;
  };
  switch (type) {
    case DTYPE.FLOAT:
      values = view ? fromRaw(4, (o) => view.getFloat32(o, true)) : (t.float_data ?? []);
      break;
    case DTYPE.DOUBLE:
      values = view ? fromRaw(8, (o) => view.getFloat64(o, true)) : (t.double_data ?? []);
      break;
    case DTYPE.UINT8:
    case DTYPE.INT8:
    case DTYPE.INT32: {
      const size = type === DTYPE.INT32 ? 4 : 1;
      values = view
        ? fromRaw(size, (o) => (type === DTYPE.INT32 ? view.getInt32(o, true) : type === DTYPE.INT8 ? view.getInt8(o) : view.getUint8(o)))
        : (t.int32_data ?? []);
      break;
    }
    case DTYPE.INT64:
      values = view
        ? fromRaw(8, (o) => {
            const v = Number(view.getBigInt64(o, true));
            return Number.isSafeInteger(v) ? v : NaN;
          })
        : (t.int64_data ?? []);
      break;
    default:
      return fail(`${what} has data type ${type}, not a number type`);
  }
  const dims = t.dims ?? [];
  let count = 1;
  for (const d of dims) {
    if (!Number.isSafeInteger(d) || d < 0) fail(`${what} has a negative or huge dimension`);
    count *= d;
    if (count > values.length) break;
  }
  if (count !== values.length) fail(`${what} has shape [${dims.join(', ')}] but ${values.length} values`);
  return values;
}
