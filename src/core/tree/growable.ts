// A tree under construction: the FlatTree arrays, doubled when full, cut to size by finish(). The tree builder
// and the ONNX importer both grow trees node by node; this is the one place that knows how.
import type { FlatTree } from './tree';

type Grown = Int32Array | Float64Array | Float32Array | Uint8Array | Uint32Array;

function grow<T extends Grown>(a: T, length: number): T {
  const b = new (a.constructor as new (n: number) => T)(length);
  b.set(a);
  return b;
}

export class GrowableTree<V extends Float32Array | Float64Array = Float32Array> {
  count = 0;
  left: Int32Array;
  right: Int32Array;
  feature: Int32Array;
  threshold: Float64Array;
  missingLeft: Uint8Array;
  cover: Float32Array;
  /** count * outputs; an importer may sum leaf weights in doubles before they are rounded once. */
  value: V;
  catBits = new Uint32Array(64);
  words = 0;

  constructor(protected readonly outputs: number, makeValue: (n: number) => V, capacity = 256) {
    this.left = new Int32Array(capacity);
    this.right = new Int32Array(capacity);
    this.feature = new Int32Array(capacity);
    this.threshold = new Float64Array(capacity);
    this.missingLeft = new Uint8Array(capacity);
    this.cover = new Float32Array(capacity);
    this.value = makeValue(capacity * outputs);
  }

  /** A new leaf; children and splits are filled in by the caller. Adding may replace the arrays. */
  add(): number {
    if (this.count === this.left.length) this.enlarge(this.left.length * 2);
    const id = this.count++;
    this.left[id] = -1;
    this.right[id] = -1;
    this.feature[id] = -1;
    return id;
  }

  /** Room for a level set of `words` 32-bit words; returns its offset (the split's threshold). */
  addWords(words: number): number {
    const at = this.words;
    if (at + words > this.catBits.length) this.catBits = grow(this.catBits, Math.max(this.catBits.length * 2, at + words));
    this.words += words;
    return at;
  }

  finish(): FlatTree {
    const n = this.count;
    return {
      nodeCount: n,
      left: this.left.slice(0, n),
      right: this.right.slice(0, n),
      feature: this.feature.slice(0, n),
      threshold: this.threshold.slice(0, n),
      missingLeft: this.missingLeft.slice(0, n),
      value: Float32Array.from(this.value.subarray(0, n * this.outputs)),
      cover: this.cover.slice(0, n),
      catBits: this.catBits.slice(0, this.words),
    };
  }

  protected enlarge(capacity: number): void {
    this.left = grow(this.left, capacity);
    this.right = grow(this.right, capacity);
    this.feature = grow(this.feature, capacity);
    this.threshold = grow(this.threshold, capacity);
    this.missingLeft = grow(this.missingLeft, capacity);
    this.cover = grow(this.cover, capacity);
    this.value = grow(this.value, capacity * this.outputs);
  }
}
