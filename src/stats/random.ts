/**
 * Seeded pseudo-random numbers: xoshiro128** seeded through SplitMix64.
 *
 * Generator: xoshiro128** 1.1 (Blackman & Vigna 2021, "Scrambled linear pseudorandom number
 * generators", ACM Trans. Math. Softw. 47(4):36). State: four 32-bit words; period 2¹²⁸ − 1;
 * all arithmetic is 32-bit (`Math.imul`, shifts), so it is exact and fast in JavaScript. One step:
 *
 *   result = rotl(s1 · 5, 7) · 9;  t = s1 << 9;
 *   s2 ^= s0; s3 ^= s1; s1 ^= s2; s0 ^= s3; s2 ^= t; s3 = rotl(s3, 11).
 *
 * Seeding (as the authors recommend): a SplitMix64 generator (Steele, Lea & Flood 2014,
 * "Fast splittable pseudorandom number generators", OOPSLA '14) started at the 64-bit seed;
 * its first output z₁ gives s0 = low 32 bits, s1 = high 32 bits, its second output z₂ gives
 * s2 = low, s3 = high. SplitMix64's output function is a bijection, so two consecutive outputs are
 * never both 0 and the state is never all-zero.
 *
 * Derived draws:
 * - `next()`: a double in [0, 1) with 53 random bits: the top 53 bits of the 64-bit word
 *   (a << 32 | b) made of two consecutive outputs a, b: (a·2²¹ + (b >>> 11)) · 2⁻⁵³.
 * - `int(n)`: unbiased integer in [0, n) by Lemire's multiply-and-reject method (Lemire 2019,
 *   "Fast random integer generation in an interval", ACM TOMACS 29(1):3): m = x·n (64-bit);
 *   if low32(m) < (2³² − n) mod n draw x again; return high32(m). Usually one output per draw.
 * - `normal()`: a standard normal variate by inversion, Φ⁻¹(u) with u = `next()` (u = 0 is
 *   redrawn), Φ⁻¹ from Wichura's AS241 (see normal.ts). Exactly one `next()` per variate
 *   except on the 2⁻⁵³ chance of u = 0.
 *
 * The raw stream is checked against a C implementation of the published algorithm in
 * test/stats/random.test.ts. Cost: O(1) per draw, no allocation after creation.
 */
import { normalPpf } from './normal.ts';

export interface Random {
  /** The seed this generator was created with (record it next to any result it produced). */
  readonly seed: number;
  /** The next raw 32-bit output, an integer in [0, 2³²). */
  nextUint32(): number;
  /** A double in [0, 1) with 53 random bits (two raw outputs). */
  next(): number;
  /** An unbiased integer in [0, n), n an integer in [1, 2³²] (Lemire 2019). */
  int(n: number): number;
  /** A standard normal variate (inversion with AS241). */
  normal(): number;
  /**
   * Fill `out` with `int(n)` draws, in order: the same numbers as `out.length` calls of `int(n)`
   * (a tight loop for the bootstrap's hot path when n ≤ 2²¹). n must be < 2³¹ to fit. Returns `out`.
   */
  fillInt(n: number, out: Int32Array): Int32Array;
}

const TWO32 = 4294967296;
const INV_TWO32 = 1 / TWO32;
const INV_TWO53 = 2 ** -53;
const MASK64 = (1n << 64n) - 1n;

/** SplitMix64 (Steele, Lea & Flood 2014), used only to expand the seed into a state. */
function splitMix64(seed: bigint): () => bigint {
  let x = seed & MASK64;
  return () => {
    x = (x + 0x9e3779b97f4a7c15n) & MASK64;
    let z = x;
    z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
    z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
    return z ^ (z >> 31n);
  };
}

/**
 * A seeded generator. `seed` must be an integer in [0, 2⁵³ − 1] (a `RangeError` otherwise);
 * the same seed always gives the same stream on every platform.
 *
 * @example createRandom(42).nextUint32() // the first xoshiro128** output for seed 42
 */
export function createRandom(seed: number): Random {
  if (!Number.isSafeInteger(seed) || seed < 0) {
    throw new RangeError(`createRandom: seed must be an integer in [0, 2^53 - 1], got ${String(seed)}`);
  }
  const sm = splitMix64(BigInt(seed));
  const z1 = sm();
  const z2 = sm();
  let s0 = Number(z1 & 0xffffffffn) | 0;
  let s1 = Number(z1 >> 32n) | 0;
  let s2 = Number(z2 & 0xffffffffn) | 0;
  let s3 = Number(z2 >> 32n) | 0;

  function nextUint32(): number {
    const m = Math.imul(s1, 5);
    const r = Math.imul((m << 7) | (m >>> 25), 9);
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    return r >>> 0;
  }

  function next(): number {
    const a = nextUint32();
    const b = nextUint32();
    return (a * 2097152 + (b >>> 11)) * INV_TWO53;
  }

  function int(n: number): number {
    if (n <= 2097152 && n >= 1 && Number.isInteger(n)) {
      // Fast path: x·n < 2⁵³, so the double product is the exact 64-bit product.
      let m = nextUint32() * n;
      let hi = Math.floor(m * INV_TWO32);
      let lo = m - hi * TWO32;
      if (lo < n) {
        const threshold = (TWO32 - n) % n;
        while (lo < threshold) {
          m = nextUint32() * n;
          hi = Math.floor(m * INV_TWO32);
          lo = m - hi * TWO32;
        }
      }
      return hi;
    }
    if (!Number.isInteger(n) || n < 1 || n > TWO32) {
      throw new RangeError(`random.int: n must be an integer in [1, 2^32], got ${String(n)}`);
    }
    if (n === TWO32) return nextUint32();
    let [hi, lo] = mul32(nextUint32(), n);
    if (lo < n) {
      const threshold = (TWO32 - n) % n;
      while (lo < threshold) [hi, lo] = mul32(nextUint32(), n);
    }
    return hi;
  }

  function normal(): number {
    let u = next();
    while (u === 0) u = next();
    return normalPpf(u);
  }

  function fillInt(n: number, out: Int32Array): Int32Array {
    if (!(n <= 2097152 && n >= 1 && Number.isInteger(n))) {
      for (let i = 0; i < out.length; i++) out[i] = int(n); // validates n; int32 holds < 2³¹ only
      return out;
    }
    const threshold = (TWO32 - n) % n;
    let a = s0;
    let b = s1;
    let c = s2;
    let d = s3;
    for (let i = 0; i < out.length; i++) {
      let hi: number;
      for (;;) {
        // One xoshiro128** step on local copies of the state (same as nextUint32).
        const m = Math.imul(b, 5);
        const x = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
        const t = b << 9;
        c ^= a;
        d ^= b;
        b ^= c;
        a ^= d;
        c ^= t;
        d = (d << 11) | (d >>> 21);
        const p = x * n;
        hi = Math.floor(p * INV_TWO32);
        if (p - hi * TWO32 >= threshold) break;
      }
      out[i] = hi;
    }
    s0 = a;
    s1 = b;
    s2 = c;
    s3 = d;
    return out;
  }

  return { seed, nextUint32, next, int, normal, fillInt };
}

/** Exact 64-bit product of two integers in [0, 2³²), as [high 32 bits, low 32 bits]. */
function mul32(x: number, n: number): [number, number] {
  const p1 = (x >>> 16) * n; // < 2⁴⁸, exact
  const p0 = (x & 0xffff) * n; // < 2⁴⁸, exact
  // x·n = p1·2¹⁶ + p0; split p1 = a·2¹⁶ + b.
  const a = Math.floor(p1 / 65536);
  const b = p1 - a * 65536;
  const rest = b * 65536 + p0; // < 2³² + 2⁴⁸, exact
  const carry = Math.floor(rest * INV_TWO32);
  return [a + carry, rest - carry * TWO32];
}
