// A small bounded cache for per-row answers (contributions, intervals) that a moving cursor keeps asking for.

/** A map that forgets the least recently used entry beyond a size. */
export class Recent<V> {
  private readonly map = new Map<number, V>();
  constructor(private readonly limit: number) {}

  get(key: number): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }

  set(key: number, v: V): void {
    this.map.delete(key);
    this.map.set(key, v);
    if (this.map.size > this.limit) this.map.delete(this.map.keys().next().value!);
  }

  delete(key: number): void {
    this.map.delete(key);
  }
}
