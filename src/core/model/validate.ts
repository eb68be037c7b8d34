// Small checkers for untrusted JSON: each names the path of the bad field, so a broken file gets a clear message.

export class ModelError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ModelError';
  }
}

export type Json = unknown;

export class Reader {
  constructor(private readonly label: string) {}

  fail(path: string, what: string): never {
    throw new ModelError(`${this.label} is not a valid Copse model: ${path} ${what}.`);
  }

  object(v: Json, path: string): Record<string, Json> {
    if (typeof v !== 'object' || v === null || Array.isArray(v)) this.fail(path, 'should be an object');
    return v as Record<string, Json>;
  }

  /** Own properties only: a key such as __proto__ in the file is just data. */
  field(o: Record<string, Json>, key: string, path: string): Json {
    if (!Object.prototype.hasOwnProperty.call(o, key)) this.fail(`${path}.${key}`, 'is missing');
    return o[key];
  }

  string(v: Json, path: string): string {
    if (typeof v !== 'string') this.fail(path, 'should be a string');
    return v;
  }

  number(v: Json, path: string): number {
    if (typeof v !== 'number' || !Number.isFinite(v)) this.fail(path, 'should be a finite number');
    return v;
  }

  integer(v: Json, path: string, min: number, max = Number.MAX_SAFE_INTEGER): number {
    if (typeof v !== 'number' || !Number.isInteger(v) || v < min || v > max) this.fail(path, `should be a whole number from ${min} to ${max}`);
    return v;
  }

  boolean(v: Json, path: string): boolean {
    if (typeof v !== 'boolean') this.fail(path, 'should be true or false');
    return v;
  }

  array(v: Json, path: string, length?: number): Json[] {
    if (!Array.isArray(v)) this.fail(path, 'should be a list');
    if (length !== undefined && v.length !== length) this.fail(path, `should have ${length} entries, not ${v.length}`);
    return v;
  }

  oneOf<T extends string>(v: Json, path: string, options: readonly T[]): T {
    if (typeof v !== 'string' || !options.includes(v as T)) this.fail(path, `should be one of ${options.join(', ')}`);
    return v as T;
  }

  /** A numeric list read straight into a typed array (made by `make`), each entry checked. */
  numbers<T extends Float64Array | Float32Array | Int32Array | Uint8Array | Uint32Array>(
    v: Json,
    path: string,
    make: new (n: number) => T,
    length: number | undefined,
    check: (x: number) => boolean,
    rule: string,
    alloc: (n: number) => T = (n) => new make(n),
  ): T {
    const list = this.array(v, path, length);
    const out = alloc(list.length);
    for (let i = 0; i < list.length; i++) {
      const x = list[i];
      if (typeof x !== 'number' || !check(x)) this.fail(`${path}[${i}]`, rule);
      out[i] = x;
    }
    return out;
  }
}
