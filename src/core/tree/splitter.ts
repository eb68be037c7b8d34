// Finds the best split of one node on one feature from a histogram over its bins.
// Missing values have their own slot; each candidate is tried with missing rows on either side and keeps the
// better one (sparsity-aware split finding, Chen & Guestrin 2016). Categorical levels are ordered by class
// proportion or mean target and then scanned like ordered bins (Breiman et al. 1984; Fisher 1958).
import { MAX_BINS } from '../data/binning';
import type { SideScore } from './criterion';

const SLOTS = MAX_BINS + 1;
const WORDS = (SLOTS + 31) >>> 5;
/** Slots per histogram in a HistogramSet: whole words of held bits, so lane i's bits start at word i * WORDS. */
const LANE = WORDS * 32;

interface Backing {
  readonly ch: Float64Array;
  readonly cnt: Int32Array;
  readonly held: Int32Array;
}

export interface SplitCandidate {
  score: number;
  feature: number;
  /** Numeric: bins <= bin go left. */
  bin: number;
  /** Numeric: the next bin holding rows of the node (-1 when only missing rows lie right). */
  nextBin: number;
  missingLeft: boolean;
  /** Whether the node had missing rows on this feature; without them the side for missing is still open. */
  sawMissing: boolean;
  /** Categorical: levels going left (bit per level). */
  levelSet: Uint32Array;
  categorical: boolean;
}

export function emptyCandidate(): SplitCandidate {
  return { score: -Infinity, feature: -1, bin: -1, nextBin: -1, missingLeft: false, sawMissing: false, levelSet: new Uint32Array((SLOTS >>> 5) + 1), categorical: false };
}

export class Histogram {
  readonly ch: Float64Array;
  readonly cnt: Int32Array;
  /**
   * A bit per slot holding rows. Reading its set bits word by word lists the bins in ascending order, so a
   * node's bins come out sorted in O(bins held) whether the node is small or dense: no sort, no 256-bin walk.
   */
  readonly held: Int32Array;
  private readonly left: Float64Array;
  private readonly right: Float64Array;
  private readonly order = new Int32Array(SLOTS);
  private orderCount = 0;
  private readonly keys = new Float64Array(SLOTS);

  constructor(readonly channels: number, backing?: Backing) {
    this.ch = backing?.ch ?? new Float64Array(SLOTS * channels);
    this.cnt = backing?.cnt ?? new Int32Array(SLOTS);
    this.held = backing?.held ?? new Int32Array(WORDS);
    this.left = new Float64Array(channels);
    this.right = new Float64Array(channels);
  }

  /** Classification: add rows idx[start..end) of feature f. */
  addClasses(bins: Uint8Array, p: number, f: number, idx: Int32Array, start: number, end: number, y: Int32Array, w: Float64Array): void {
    const { ch, cnt, held, channels } = this;
    for (let j = start; j < end; j++) {
      const r = idx[j];
      const b = bins[r * p + f];
      if (cnt[b]++ === 0) held[b >>> 5] |= 1 << (b & 31);
      ch[b * channels + y[r]] += w[r];
    }
  }

  /** Regression: add rows idx[start..end) of feature f (channel 0 weight, channel 1 weighted target). */
  addValues(bins: Uint8Array, p: number, f: number, idx: Int32Array, start: number, end: number, y: Float64Array, w: Float64Array): void {
    const { ch, cnt, held } = this;
    for (let j = start; j < end; j++) {
      const r = idx[j];
      const b = bins[r * p + f];
      if (cnt[b]++ === 0) held[b >>> 5] |= 1 << (b & 31);
      const o = b * 2;
      ch[o] += w[r];
      ch[o + 1] += w[r] * y[r];
    }
  }

  clear(): void {
    const { ch, cnt, held, channels } = this;
    for (let wd = 0; wd < WORDS; wd++) {
      let bits = held[wd];
      while (bits !== 0) {
        const low = bits & -bits;
        bits ^= low;
        const b = (wd << 5) + 31 - Math.clz32(low);
        cnt[b] = 0;
        for (let k = b * channels, e = k + channels; k < e; k++) ch[k] = 0;
      }
      held[wd] = 0;
    }
  }

  /** Writes the held value bins (every held slot but the missing one) to order in ascending order; returns how many. */
  private heldBins(missingSlot: number): number {
    const { held, order } = this;
    let m = 0;
    for (let wd = 0; wd < WORDS; wd++) {
      let bits = held[wd];
      while (bits !== 0) {
        const low = bits & -bits;
        bits ^= low;
        const b = (wd << 5) + 31 - Math.clz32(low);
        if (b !== missingSlot) order[m++] = b;
      }
    }
    return m;
  }

  /**
   * Scans the histogram of feature f (valueBins value bins, missing in slot valueBins) and updates best when a
   * valid split beats it. Returns false when the feature is constant in the node (so it does not count as tried).
   * `total` holds the node's channel sums; `levelKey` orders categorical levels.
   */
  scan(
    f: number,
    valueBins: number,
    categorical: boolean,
    total: Float64Array,
    totalCount: number,
    minLeaf: number,
    score: SideScore,
    levelKey: (ch: Float64Array, offset: number) => number,
    best: SplitCandidate,
    gini = false,
  ): boolean {
    const { ch, cnt, channels, left, right, order } = this;
    const missingCount = cnt[valueBins];
    const m = this.heldBins(valueBins);
    if (m + (missingCount > 0 ? 1 : 0) < 2) return false;
    if (categorical) {
      const keys = this.keys;
      for (let i = 0; i < m; i++) keys[order[i]] = levelKey(ch, order[i] * channels);
      sortBy(order, m, keys);
    }
    this.orderCount = m;
    if (gini && missingCount === 0) {
      if (channels === 2 || channels === 3) this.scanGiniFew(f, m, categorical, total, totalCount, minLeaf, best);
      else this.scanGini(f, m, categorical, total, totalCount, minLeaf, best);
      return true;
    }
    const mo = valueBins * channels;
    left.fill(0);
    let leftCount = 0;
    // i = m - 1 puts every value left and leaves only missing rows right; valid only when some are missing.
    const last = missingCount > 0 ? m : m - 1;
    for (let i = 0; i < last; i++) {
      const b = order[i];
      const o = b * channels;
      for (let k = 0; k < channels; k++) left[k] += ch[o + k];
      leftCount += cnt[b];
      const rightCount = totalCount - leftCount - missingCount;
      // Missing rows to the right.
      if (leftCount >= minLeaf && rightCount + missingCount >= minLeaf && (rightCount > 0 || missingCount > 0)) {
        for (let k = 0; k < channels; k++) right[k] = total[k] - left[k];
        const s = score(left, 0, channels) + score(right, 0, channels);
        if (s > best.score) {
          this.record(best, s, f, i, b, false, categorical, missingCount > 0);
        }
      }
      // Missing rows to the left.
      if (missingCount > 0 && rightCount >= minLeaf && rightCount > 0 && leftCount + missingCount >= minLeaf) {
        for (let k = 0; k < channels; k++) {
          right[k] = total[k] - left[k] - ch[mo + k];
        }
        for (let k = 0; k < channels; k++) left[k] += ch[mo + k];
        const s = score(left, 0, channels) + score(right, 0, channels);
        for (let k = 0; k < channels; k++) left[k] -= ch[mo + k];
        if (s > best.score) {
          this.record(best, s, f, i, b, true, categorical, true);
        }
      }
    }
    return true;
  }

  /**
   * The common case, Gini with no missing rows in the node, with the sums of squares kept up to date as bins
   * move left instead of recomputed per candidate: the same scores, in a third of the arithmetic.
   */
  private scanGini(f: number, m: number, categorical: boolean, total: Float64Array, totalCount: number, minLeaf: number, best: SplitCandidate): void {
    const { ch, cnt, channels, left, right, order } = this;
    let wl = 0;
    let wr = 0;
    let sql = 0;
    let sqr = 0;
    for (let k = 0; k < channels; k++) {
      left[k] = 0;
      right[k] = total[k];
      wr += total[k];
      sqr += total[k] * total[k];
    }
    let leftCount = 0;
    for (let i = 0; i < m - 1; i++) {
      const b = order[i];
      const o = b * channels;
      for (let k = 0; k < channels; k++) {
        const c = ch[o + k];
        if (c === 0) continue;
        const l = left[k];
        const r = right[k];
        sql += c * (2 * l + c);
        sqr += c * (c - 2 * r);
        left[k] = l + c;
        right[k] = r - c;
        wl += c;
        wr -= c;
      }
      leftCount += cnt[b];
      if (leftCount < minLeaf || totalCount - leftCount < minLeaf) continue;
      const s = sql / wl + sqr / wr;
      if (s > best.score) this.record(best, s, f, i, b, false, categorical, false);
    }
  }

  /**
   * scanGini for two or three classes with the running sums in locals instead of arrays: the same operations on
   * the same values in the same order (so the same scores to the last bit), in fewer loads, stores and checks.
   */
  private scanGiniFew(f: number, m: number, categorical: boolean, total: Float64Array, totalCount: number, minLeaf: number, best: SplitCandidate): void {
    const { ch, cnt, channels, order } = this;
    const three = channels === 3;
    let l0 = 0;
    let l1 = 0;
    let l2 = 0;
    let r0 = total[0];
    let r1 = total[1];
    let r2 = three ? total[2] : 0;
    let wl = 0;
    let wr = r0;
    let sql = 0;
    let sqr = r0 * r0;
    wr += r1;
    sqr += r1 * r1;
    if (three) {
      wr += r2;
      sqr += r2 * r2;
    }
    let leftCount = 0;
    for (let i = 0; i < m - 1; i++) {
      const b = order[i];
      const o = b * channels;
      let c = ch[o];
      if (c !== 0) {
        sql += c * (2 * l0 + c);
        sqr += c * (c - 2 * r0);
        l0 += c;
        r0 -= c;
        wl += c;
        wr -= c;
      }
      c = ch[o + 1];
      if (c !== 0) {
        sql += c * (2 * l1 + c);
        sqr += c * (c - 2 * r1);
        l1 += c;
        r1 -= c;
        wl += c;
        wr -= c;
      }
      if (three) {
        c = ch[o + 2];
        if (c !== 0) {
          sql += c * (2 * l2 + c);
          sqr += c * (c - 2 * r2);
          l2 += c;
          r2 -= c;
          wl += c;
          wr -= c;
        }
      }
      leftCount += cnt[b];
      if (leftCount < minLeaf || totalCount - leftCount < minLeaf) continue;
      const s = sql / wl + sqr / wr;
      if (s > best.score) this.record(best, s, f, i, b, false, categorical, false);
    }
  }

  private record(best: SplitCandidate, s: number, f: number, i: number, b: number, missingLeft: boolean, categorical: boolean, sawMissing: boolean): void {
    best.score = s;
    best.sawMissing = sawMissing;
    best.nextBin = i + 1 < this.orderCount ? this.order[i + 1] : -1;
    best.feature = f;
    best.bin = b;
    best.missingLeft = missingLeft;
    best.categorical = categorical;
    if (categorical) {
      best.levelSet.fill(0);
      for (let j = 0; j <= i; j++) {
        const level = this.order[j];
        best.levelSet[level >>> 5] |= 1 << (level & 31);
      }
    }
  }
}

/**
 * Histograms of several features of one node, filled in one pass over its rows: each row's target, weight and
 * bin bytes (neighbours in the row-major matrix) are read once for all tried features instead of once per feature.
 * Lane i is an ordinary Histogram over its own stretch of the shared arrays.
 */
export class HistogramSet {
  readonly lanes: Histogram[] = [];
  private readonly ch: Float64Array;
  private readonly cnt: Int32Array;
  private readonly held: Int32Array;

  constructor(readonly channels: number, count: number) {
    this.ch = new Float64Array(count * LANE * channels);
    this.cnt = new Int32Array(count * LANE);
    this.held = new Int32Array(count * WORDS);
    for (let i = 0; i < count; i++) {
      this.lanes.push(
        new Histogram(channels, {
          ch: this.ch.subarray(i * LANE * channels, (i + 1) * LANE * channels),
          cnt: this.cnt.subarray(i * LANE, (i + 1) * LANE),
          held: this.held.subarray(i * WORDS, (i + 1) * WORDS),
        }),
      );
    }
  }

  /** Classification: lane i gets feature features[i] of rows idx[start..end), for i < k. */
  addClasses(bins: Uint8Array, p: number, features: Int32Array, k: number, idx: Int32Array, start: number, end: number, y: Int32Array, w: Float64Array): void {
    const { ch, cnt, held, channels } = this;
    for (let j = start; j < end; j++) {
      const r = idx[j];
      const row = r * p;
      const c = y[r];
      const wr = w[r];
      for (let i = 0, base = 0; i < k; i++, base += LANE) {
        const b = base + bins[row + features[i]];
        if (cnt[b]++ === 0) held[b >>> 5] |= 1 << (b & 31);
        ch[b * channels + c] += wr;
      }
    }
  }

  /** Regression: as addClasses, channel 0 weight and channel 1 weighted target. */
  addValues(bins: Uint8Array, p: number, features: Int32Array, k: number, idx: Int32Array, start: number, end: number, y: Float64Array, w: Float64Array): void {
    const { ch, cnt, held } = this;
    for (let j = start; j < end; j++) {
      const r = idx[j];
      const row = r * p;
      const wr = w[r];
      const wy = wr * y[r];
      for (let i = 0, base = 0; i < k; i++, base += LANE) {
        const b = base + bins[row + features[i]];
        if (cnt[b]++ === 0) held[b >>> 5] |= 1 << (b & 31);
        const o = b * 2;
        ch[o] += wr;
        ch[o + 1] += wy;
      }
    }
  }
}

/** Sorts the first m entries (held in ascending bin order) by key, ties by bin: insertion sort while m is small. */
function sortBy(order: Int32Array, m: number, keys: Float64Array): void {
  if (m > 64) {
    order.subarray(0, m).sort((a, b) => keys[a] - keys[b] || a - b);
    return;
  }
  for (let i = 1; i < m; i++) {
    const v = order[i];
    const kv = keys[v];
    let j = i - 1;
    while (j >= 0) {
      const u = order[j];
      const ku = keys[u];
      if (ku < kv || (ku === kv && u < v)) break;
      order[j + 1] = u;
      j--;
    }
    order[j + 1] = v;
  }
}
