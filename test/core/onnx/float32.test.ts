// Float32 stepping and the double thresholds that reproduce float32 comparisons. The facts checked are IEEE 754
// binary32 and binary64 with round-to-nearest-even (common practice); Math.fround is the reference rounding.
import * as assert from 'node:assert/strict';
import seedrandom from 'seedrandom';
import { atMost32, next32, nextDown64, prev32, roundDown32 } from '../../../src/core/onnx/float32';

const F32_MAX = 3.4028234663852886e38;

describe('float32 helpers', () => {
  it('step between neighbouring float32 values, across zero and to the largest finite one', () => {
    assert.equal(next32(1), 1 + 2 ** -23);
    assert.equal(prev32(1), 1 - 2 ** -24);
    assert.equal(next32(0), 2 ** -149);
    assert.equal(prev32(0), -(2 ** -149));
    assert.ok(next32(-(2 ** -149)) === 0);
    assert.equal(next32(F32_MAX), Infinity);
    assert.equal(prev32(-F32_MAX), -Infinity);
    assert.equal(nextDown64(1), 1 - 2 ** -53);
    assert.equal(nextDown64(0), -Number.MIN_VALUE);
  });

  it('roundDown32 gives the largest float32 not above t', () => {
    const rnd = seedrandom('round-down');
    for (let i = 0; i < 20000; i++) {
      const t = (rnd() - 0.5) * 10 ** Math.floor(rnd() * 12 - 6);
      const r = roundDown32(t);
      assert.equal(Math.fround(r), r);
      assert.ok(r <= t && next32(r) > t, `t = ${t}`);
    }
    assert.equal(roundDown32(1.699999988079071), 1.6999999284744263);
    assert.equal(roundDown32(Number.MAX_VALUE), F32_MAX);
  });

  it('atMost32(v) is where rounding to float32 stops landing at or below v', () => {
    const rnd = seedrandom('at-most');
    const vs = [0, -0, 1, -1, Math.fround(0.1), F32_MAX, -F32_MAX, 2 ** -149, -Infinity, Math.fround(1e-40)];
    for (let i = 0; i < 2000; i++) vs.push(Math.fround((rnd() - 0.5) * 10 ** Math.floor(rnd() * 40 - 20)));
    for (const v of vs) {
      const d = atMost32(v);
      assert.ok(Math.fround(d) <= v, `fround(${d}) <= ${v}`);
      assert.ok(!(Math.fround(nextUp(d)) <= v), `the next double above ${d} rounds above ${v}`);
    }
    assert.equal(atMost32(Infinity), Infinity);
  });
});

function nextUp(x: number): number {
  return -nextDown64(-x);
}
