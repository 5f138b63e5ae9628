/**
 * Row hashes for duplicate-unit detection in the fused activity pass (internal).
 *
 * Two 32-bit hashes over the row's 32-bit words (a Float32 row: one word a cell; Float64: two)
 * and its missing mask: A is FNV-1a taken a word at a time instead of a byte at a time
 * (Fowler–Noll–Vo; IETF draft draft-eastlake-fnv), B a multiply–xorshift mix with another
 * constant. Each runs as two lanes (even and odd words) folded at the end, which breaks the
 * multiply dependency chain. Together a 64-bit signature: not cryptographic, but two different
 * rows of real data agreeing on both is an accident of the order of 2⁻⁶⁴ per pair. Bit-exact:
 * 0 and −0, or two NaN payloads, hash differently. Cost O(bins), no allocation.
 */
import { cleanScan, type RowScan } from './activity-pass-row.ts';
import { COUNTING_RANGE_LIMIT } from './activity-pass-gini.ts';

const FNV_PRIME = 16777619;
const FNV_BASIS = 2166136261;
const MIX_PRIME = 0x5bd1e995;
const A1 = FNV_BASIS ^ 0x5a5a5a5a;
const B0 = 0x9747b28c;
const B1 = 0x3c6ef372;

function fold(a0: number, a1: number, b0: number, b1: number, wordCount: number, out: Uint32Array): void {
  let a = Math.imul(a0 ^ (a1 >>> 16) ^ (a1 << 16), FNV_PRIME) ^ a1;
  let b = Math.imul(b0 ^ wordCount, MIX_PRIME) ^ b1;
  b ^= b >>> 13;
  a ^= a >>> 16;
  out[0] = a >>> 0;
  out[1] = b >>> 0;
}

/** Hash `wordCount` words from `wordOff`, then the row's mask bytes if any; into `out[0]`, `out[1]`. */
export function hashRow(words: Uint32Array, wordOff: number, wordCount: number, mask: Uint8Array | undefined, off: number, bins: number, out: Uint32Array): void {
  let a0 = FNV_BASIS, a1 = A1, b0 = B0, b1 = B1;
  let i = 0;
  for (; i + 1 < wordCount; i += 2) {
    const w0 = words[wordOff + i], w1 = words[wordOff + i + 1];
    a0 = Math.imul(a0 ^ w0, FNV_PRIME);
    a1 = Math.imul(a1 ^ w1, FNV_PRIME);
    b0 = Math.imul(b0 ^ w0, MIX_PRIME);
    b1 = Math.imul(b1 ^ w1, MIX_PRIME);
    b0 ^= b0 >>> 15;
    b1 ^= b1 >>> 15;
  }
  if (i < wordCount) {
    a0 = Math.imul(a0 ^ words[wordOff + i], FNV_PRIME);
    b0 = Math.imul(b0 ^ words[wordOff + i], MIX_PRIME);
  }
  if (mask !== undefined) {
    for (let j = 0; j < bins; j++) {
      const m = mask[off + j];
      a0 = Math.imul(a0 ^ m, FNV_PRIME);
      b0 = Math.imul(b0 ^ m, MIX_PRIME);
      b0 ^= b0 >>> 15;
    }
  }
  fold(a0, a1, b0, b1, wordCount, out);
}

/**
 * Pass 1, the row hash and the Gini histogram fused, for a Float32 row without a mask: Σx, min,
 * max, the same hashes as `hashRow`, and the counts of the values, in one loop, so that an
 * integer row (spike counts) is read twice in all: here, and for the per-bin sums.
 * `hist` (length > COUNTING_RANGE_LIMIT) must be all zero on entry.
 * Returns 1 when every cell is an integer in [0, COUNTING_RANGE_LIMIT]: `hist[v]` then holds how
 * many cells equal v, and the caller zeroes `hist[0 ..= max]` after using it. Returns 0 for a
 * finite row that is not (`out` filled) and −1 for a row with NaN or ±Infinity (hash written,
 * `out` untouched: the caller then classifies the row with `scanRow`); in both cases `hist` is
 * left all zero again.
 */
export function scanHashHistFloat32(data: Float32Array, words: Uint32Array, off: number, bins: number, out: RowScan, hash: Uint32Array, hist: Int32Array): -1 | 0 | 1 {
  let a0 = FNV_BASIS, a1 = A1, b0 = B0, b1 = B1;
  let sum = 0, min = Infinity, max = -Infinity;
  // While `counting`, every cell so far is an integer in [0, LIMIT] and is counted in `hist`, and
  // `max` (updated after the check) is the largest counted value: what to zero if counting stops.
  let counting = true;
  let countedTop = -1;
  const LIMIT = COUNTING_RANGE_LIMIT;
  let j = 0;
  for (; j + 1 < bins; j += 2) {
    const x0 = data[off + j], x1 = data[off + j + 1];
    const w0 = words[off + j], w1 = words[off + j + 1];
    if (counting) {
      const i0 = x0 | 0, i1 = x1 | 0;
      if (i0 === x0 && i1 === x1 && i0 >= 0 && i1 >= 0 && i0 <= LIMIT && i1 <= LIMIT) {
        hist[i0]++;
        hist[i1]++;
      } else {
        counting = false;
        countedTop = max;
      }
    }
    sum += x0;
    sum += x1;
    if (x0 > max) max = x0;
    if (x0 < min) min = x0;
    if (x1 > max) max = x1;
    if (x1 < min) min = x1;
    a0 = Math.imul(a0 ^ w0, FNV_PRIME);
    a1 = Math.imul(a1 ^ w1, FNV_PRIME);
    b0 = Math.imul(b0 ^ w0, MIX_PRIME);
    b1 = Math.imul(b1 ^ w1, MIX_PRIME);
    b0 ^= b0 >>> 15;
    b1 ^= b1 >>> 15;
  }
  if (j < bins) {
    const x = data[off + j];
    if (counting) {
      const i = x | 0;
      if (i === x && i >= 0 && i <= LIMIT) hist[i]++;
      else {
        counting = false;
        countedTop = max;
      }
    }
    sum += x;
    if (x > max) max = x;
    if (x < min) min = x;
    a0 = Math.imul(a0 ^ words[off + j], FNV_PRIME);
    b0 = Math.imul(b0 ^ words[off + j], MIX_PRIME);
  }
  fold(a0, a1, b0, b1, bins, hash);
  if (!counting && countedTop >= 0) hist.fill(0, 0, countedTop + 1);
  if (sum - sum !== 0) return -1; // (a NaN or ±Infinity also stopped the counting)
  cleanScan(data, off, bins, sum, min, max, out);
  return counting ? 1 : 0;
}
