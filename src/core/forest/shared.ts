// A forest whose tree arrays live in shared memory, so scoring threads read the one copy instead of each
// receiving their own: a full-depth forest on millions of rows is gigabytes, and two threads would triple it.
import type { FlatTree } from '../tree/tree';
import type { Forest } from './forest';

type Numbers = Int32Array | Float64Array | Float32Array | Uint8Array | Uint32Array;

export type SharedMake<T> = { new (buffer: SharedArrayBuffer, offset: number, length: number): T; readonly BYTES_PER_ELEMENT: number };

/** A typed array of `length` on a SharedArrayBuffer. */
export function sharedArray<T extends Numbers>(make: SharedMake<T>, length: number): T {
  return new make(new SharedArrayBuffer(Math.max(1, length) * make.BYTES_PER_ELEMENT), 0, length);
}

function shared<T extends Numbers>(a: T): T {
  if (a.buffer instanceof SharedArrayBuffer) return a;
  const b = sharedArray(a.constructor as unknown as SharedMake<T>, a.length);
  b.set(a);
  return b;
}

const cache = new WeakMap<Forest, Forest>();

function arraysOf(t: FlatTree): Numbers[] {
  return [t.left, t.right, t.feature, t.threshold, t.missingLeft, t.value, t.cover, t.catBits];
}

/** The forest with every tree array in shared memory: itself when they already are (a loaded model), else a copy made once. */
export function sharedForest(forest: Forest): Forest {
  if (forest.trees.every((t) => arraysOf(t).every((a) => a.buffer instanceof SharedArrayBuffer))) return forest;
  let out = cache.get(forest);
  if (!out) {
    const trees = forest.trees.map(
      (t): FlatTree => ({
        nodeCount: t.nodeCount,
        left: shared(t.left),
        right: shared(t.right),
        feature: shared(t.feature),
        threshold: shared(t.threshold),
        missingLeft: shared(t.missingLeft),
        value: shared(t.value),
        cover: shared(t.cover),
        catBits: shared(t.catBits),
      }),
    );
    out = { ...forest, trees };
    cache.set(forest, out);
  }
  return out;
}
