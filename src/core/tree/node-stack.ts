// The grower's stack of nodes still to split, as parallel typed arrays: pushing and popping a node allocates
// nothing, where an object and two Float64Arrays per node kept the garbage collector busy on deep trees.

export class NodeStack {
  size = 0;
  private id: Int32Array;
  private start: Int32Array;
  private end: Int32Array;
  private depth: Int32Array;
  private totals: Float64Array;

  constructor(private readonly channels: number, capacity = 64) {
    this.id = new Int32Array(capacity);
    this.start = new Int32Array(capacity);
    this.end = new Int32Array(capacity);
    this.depth = new Int32Array(capacity);
    this.totals = new Float64Array(capacity * channels);
  }

  push(id: number, start: number, end: number, depth: number, total: Float64Array): void {
    if (this.size === this.id.length) this.enlarge();
    const s = this.size++;
    this.id[s] = id;
    this.start[s] = start;
    this.end[s] = end;
    this.depth[s] = depth;
    this.totals.set(total, s * this.channels);
  }

  /** Removes the top node, copying its channel sums into total; read its fields with the getters below first. */
  pop(total: Float64Array): void {
    const s = --this.size;
    const o = s * this.channels;
    for (let k = 0; k < this.channels; k++) total[k] = this.totals[o + k];
  }

  topId(): number {
    return this.id[this.size - 1];
  }

  topStart(): number {
    return this.start[this.size - 1];
  }

  topEnd(): number {
    return this.end[this.size - 1];
  }

  topDepth(): number {
    return this.depth[this.size - 1];
  }

  private enlarge(): void {
    const n = this.id.length * 2;
    const grow = <T extends Int32Array | Float64Array>(a: T, length: number): T => {
      const b = new (a.constructor as new (n: number) => T)(length);
      b.set(a);
      return b;
    };
    this.id = grow(this.id, n);
    this.start = grow(this.start, n);
    this.end = grow(this.end, n);
    this.depth = grow(this.depth, n);
    this.totals = grow(this.totals, n * this.channels);
  }
}
