/**
 * Exact binning of integer sample indices into time bins.
 *
 * A spike at sample s of a recording sampled at R Hz is at time s / R; with bins of w ms, bin b
 * covers [b·w, (b+1)·w) ms, so the spike's bin is ⌊s·1000 / (R·w)⌋. Both R and w are taken as the
 * exact decimals they are written as (30000, 29999.7, 10, 33.3…: the shortest decimal that reads
 * back as the same double, ECMAScript Number::toString), so samples per bin is an exact rational
 * P/Q and the bin is ⌊s·Q/P⌋, computed:
 *   - when P/Q is an integer (30 kHz and 10 ms: 300 samples), by integer division checked with
 *     exact products (s < 2^53, so every product that is compared is exact or decided in BigInt);
 *   - otherwise from the float quotient, recomputed in BigInt whenever it lies within 1e-6 of a
 *     bin edge (its rounding error is below 2^31 · 2^-52 ≈ 5e-7 for any bin below 2^31).
 * So no spike moves across a bin edge however long the recording: a spike one sample before an
 * edge stays in its bin, one on the edge starts the next bin.
 */

export interface SampleBinner {
  /** Samples per bin as a float (for messages). */
  samplesPerBin: number;
  /** Bin of sample s (an integer 0 ≤ s < 2^53). */
  binOf(s: number): number;
  /** True when sample s lies at or after `seconds` (exact). */
  atOrAfter(s: number, seconds: number): boolean;
  /** Bins that cover [0, seconds): ⌈seconds·1000 / w⌉ (exact). */
  binsFor(seconds: number): number;
}

/** A finite positive double as the exact decimal fraction of its shortest representation. */
export function decimalFraction(x: number): { num: bigint; den: bigint } {
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`expected a finite positive number, got ${x}`);
  const m = /^(\d+)(?:\.(\d+))?(?:e([+-]\d+))?$/.exec(String(x));
  if (!m) throw new RangeError(`cannot read ${x} as a decimal`);
  const frac = m[2] ?? '';
  const exp = Number(m[3] ?? 0) - frac.length;
  const digits = BigInt(m[1] + frac);
  return exp >= 0 ? { num: digits * 10n ** BigInt(exp), den: 1n } : { num: digits, den: 10n ** BigInt(-exp) };
}

function gcd(a: bigint, b: bigint): bigint {
  while (b) [a, b] = [b, a % b];
  return a;
}

/** Bins of `binMs` ms for a recording sampled at `rateHz`. */
export function sampleBinner(binMs: number, rateHz: number): SampleBinner {
  const w = decimalFraction(binMs);
  const r = decimalFraction(rateHz);
  // Samples per bin = (w ms / 1000) · R = (wN·rN) / (wD·rD·1000) = P / Q in lowest terms.
  let P = w.num * r.num;
  let Q = w.den * r.den * 1000n;
  const g = gcd(P, Q);
  P /= g;
  Q /= g;
  const samplesPerBin = Number(P) / Number(Q);
  const integer = Q === 1n && P <= BigInt(Number.MAX_SAFE_INTEGER);
  const p = Number(P);
  const q = Number(Q);
  const exactBin = (s: number) => Number((BigInt(s) * Q) / P);
  const binOf = integer
    ? (s: number) => {
        let b = Math.floor(s / p);
        // b·p and (b+1)·p are at most s + p < 2^53 + p: exact unless p is huge, where BigInt decides.
        if (b * p > s || (b + 1) * p <= s) b = exactBin(s);
        return b;
      }
    : (s: number) => {
        const x = (s * q) / p;
        const b = Math.floor(x);
        return x - b < 1e-6 || b + 1 - x < 1e-6 ? exactBin(s) : b;
      };
  return {
    samplesPerBin,
    binOf,
    atOrAfter(s, seconds) {
      // s / R ≥ D  ⇔  s·rD·dD ≥ dN·rN
      const d = decimalFraction(seconds);
      return BigInt(s) * r.den * d.den >= d.num * r.num;
    },
    binsFor(seconds) {
      // ⌈D·1000 / w⌉ = ⌈dN·1000·wD / (dD·wN)⌉
      const d = decimalFraction(seconds);
      const n = d.num * 1000n * w.den;
      const m = d.den * w.num;
      return Number((n + m - 1n) / m);
    },
  };
}
