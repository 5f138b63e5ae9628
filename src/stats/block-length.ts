/**
 * Automatic block length for the moving-block bootstrap of a mean.
 *
 * Politis & White (2004), "Automatic block-length selection for the dependent bootstrap",
 * Econometric Reviews 23(1):53–70, with the correction of Patton, Politis & White (2009),
 * Econometric Reviews 28(4):372–375 (which fixes the constant for the circular/moving block
 * bootstrap). With sample autocovariances R̂(k) = (1/n) Σₜ (xₜ − x̄)(xₜ₊ₖ − x̄):
 *
 *   Ĝ = Σ_{|k|≤M} λ(k/M)·|k|·R̂(k),   ĝ = Σ_{|k|≤M} λ(k/M)·R̂(k),   D̂ = (4/3)·ĝ²
 *   b̂ = (2Ĝ²/D̂)^{1/3} · n^{1/3} = (3n·Ĝ² / (2ĝ²))^{1/3}
 *
 * λ is the flat-top (trapezoid) lag window of Politis & Romano (1995, J. Time Ser. Anal.
 * 16:67–103): λ(t) = 1 for |t| ≤ ½, 2(1 − |t|) for ½ < |t| ≤ 1, 0 beyond.
 * M = 2m̂, where m̂ is the smallest lag after which K_n consecutive sample autocorrelations are
 * all below c·√(log₁₀ n / n) in absolute value (Politis 2003, J. Nonparametric Stat.
 * 15:517–533), with c = 2, K_n = max(5, ⌈√log₁₀ n⌉); lags are searched up to
 * m_max = ⌈√n⌉ + K_n and M is capped at m_max (M = m_max when no such run is found).
 *
 * Bounds (a project choice, as in the authors' published code): b̂ is rounded to the nearest
 * integer and clamped to [1, ⌈min(3√n, n/3)⌉]. A constant series, M = 0 (no significant
 * autocorrelation at lag 1…K_n: iid-like data) or ĝ ≤ 0 gives 1.
 *
 * NaN or ±Infinity in `x` is a `RangeError` (remove undefined items first); n < 4 gives 1.
 * Zeros and negative values are ordinary values. Cost: O(n·(m̂ + K_n)) when the lags the rule
 * needs stay below DIRECT_LAGS (direct sums, the same sums in the same order as before), else
 * O(n log n) time and 32·n bytes or so for the remaining lags by FFT (autocovariance.ts); never
 * the O(n·√n) of direct sums up to m_max.
 */

import { DIRECT_LAGS, autocovariancesDirect, autocovariancesFft } from './autocovariance.ts';

/** Everything the rule computed, for reports and tests. */
export interface BlockLengthDetails {
  /** The block length to use: round(b̂) clamped to [1, maxBlockLength]. */
  blockLength: number;
  /** The unrounded, unclamped b̂ (0 when Ĝ = 0; NaN when ĝ ≤ 0 or the series is constant). */
  raw: number;
  /** Lag-window bandwidth M = min(2m̂, m_max). */
  M: number;
  mHat: number;
  G: number;
  g: number;
  maxBlockLength: number;
  n: number;
}

/** Flat-top lag window (Politis & Romano 1995). */
function flatTop(t: number): number {
  const a = Math.abs(t);
  if (a <= 0.5) return 1;
  if (a <= 1) return 2 * (1 - a);
  return 0;
}

/** The Politis–White–Patton rule with everything it computed (see the module comment). */
export function politisWhiteDetails(x: Float64Array): BlockLengthDetails {
  const n = x.length;
  let mean = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) {
      throw new RangeError(`politisWhiteBlockLength: x[${i}] is ${v}; remove undefined items first`);
    }
    mean += v;
  }
  const maxBlockLength = Math.max(1, Math.ceil(Math.min(3 * Math.sqrt(n), n / 3)));
  const result = (raw: number, M: number, mHat: number, G: number, g: number): BlockLengthDetails => ({
    blockLength: Number.isFinite(raw) ? Math.max(1, Math.min(maxBlockLength, Math.round(raw))) : 1,
    raw,
    M,
    mHat,
    G,
    g,
    maxBlockLength,
    n,
  });
  if (n < 4) return result(NaN, 0, 0, 0, 0);
  mean /= n;
  const Kn = Math.max(5, Math.ceil(Math.sqrt(Math.log10(n))));
  const mMax = Math.min(n - 1, Math.ceil(Math.sqrt(n)) + Kn);
  const e = new Float64Array(n);
  for (let i = 0; i < n; i++) e[i] = x[i] - mean;
  // Lags by direct sums as the search reaches them, up to L0; past L0, every lag up to m_max by
  // FFT at once (the direct values already computed are kept).
  const L0 = Math.min(mMax, DIRECT_LAGS - 1);
  let R: Float64Array = new Float64Array(mMax + 1);
  let computed = 0;
  autocovariancesDirect(e, 0, 0, R);
  const lag = (k: number): number => {
    if (k <= computed) return R[k];
    if (k <= L0) {
      autocovariancesDirect(e, computed + 1, k, R);
      computed = k;
    } else {
      const all = autocovariancesFft(e, mMax);
      all.set(R.subarray(0, computed + 1));
      R = all;
      computed = mMax;
    }
    return R[k];
  };
  if (!(R[0] > 0)) return result(NaN, 0, 0, 0, 0);

  // m̂: smallest m with |ρ̂(m+1)|, …, |ρ̂(m+Kn)| all below the threshold.
  const threshold = 2 * Math.sqrt(Math.log10(n) / n);
  let mHat = -1;
  let run = 0;
  for (let k = 1; k <= mMax; k++) {
    run = Math.abs(lag(k) / R[0]) < threshold ? run + 1 : 0;
    if (run === Kn) {
      mHat = k - Kn;
      break;
    }
  }
  const M = mHat < 0 ? mMax : Math.min(2 * mHat, mMax);
  if (mHat < 0) mHat = mMax;

  let G = 0;
  let g = R[0];
  for (let k = 1; k <= M; k++) {
    const w = flatTop(k / M);
    const r = lag(k);
    G += 2 * w * k * r;
    g += 2 * w * r;
  }
  if (!(g > 0)) return result(NaN, M, mHat, G, g);
  const raw = Math.cbrt((3 * n * G * G) / (2 * g * g));
  return result(raw, M, mHat, G, g);
}

/**
 * Automatic moving-block bootstrap block length (Politis & White 2004; Patton, Politis &
 * White 2009): an integer in [1, ⌈min(3√n, n/3)⌉]. See the module comment.
 *
 * @example politisWhiteBlockLength(iidNoise) // → 1 (usually)
 */
export function politisWhiteBlockLength(x: Float64Array): number {
  return politisWhiteDetails(x).blockLength;
}
