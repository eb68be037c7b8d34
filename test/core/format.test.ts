import * as assert from 'node:assert/strict';
import { formatBytes, formatNumber, formatSeconds, formatShare } from '../../src/core/format';

describe('extension number formatting', () => {
  it('shows shares as the panel does: a percentage with one decimal', () => {
    assert.equal(formatShare(0.9533), '95.3%');
    assert.equal(formatShare(1), '100.0%');
    assert.equal(formatShare(NaN), 'n/a');
  });
  it('keeps four significant digits and plain notation for everyday values', () => {
    assert.equal(formatNumber(3.14159), '3.142');
    assert.equal(formatNumber(1234.5678), '1235');
    assert.equal(formatNumber(-0.5), '\u22120.5', 'one minus sign everywhere');
    assert.equal(formatNumber(-2.5e-7), '\u22122.5e\u22127');
    assert.equal(formatNumber(undefined), 'n/a');
    assert.equal(formatNumber(42), '42');
    assert.equal(formatNumber(2.5e-7), '2.5e\u22127');
    assert.equal(formatNumber(NaN), 'n/a');
  });
  it('formats sizes and durations', () => {
    assert.equal(formatBytes(1536), '1.5 KB');
    assert.equal(formatBytes(52 * 1024 * 1024), '52.0 MB');
    assert.equal(formatSeconds(0.25), '250 ms');
    assert.equal(formatSeconds(75), '1 min 15 s');
  });
});
