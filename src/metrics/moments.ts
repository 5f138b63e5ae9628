/**
 * Central-moment sums that can be computed per chunk and merged: the basis of kurtosis and
 * skewness for data too large to hold at once, and of per-worker partial results.
 *
 * A `Moments` value is `{ n, mean, m2, m3, m4 }` with m_K = Σ (x_i − mean)^K — SUMS, not
 * averages (so the merge formulas stay simple). Divide by n for the plug-in moments.
 *
 *  - `momentsOf(x)`: two passes over in-memory data — a Neumaier-compensated sum for the mean,
 *    then compensated sums of the centred powers. Stable where the one-pass Σx² − n·x̄² is not
 *    (NIST StRD NumAcc4: the naive formula gives a negative variance; this gives s = 0.1).
 *    When every element is equal the result is exact: mean = x[0], m2 = m3 = m4 = 0.
 *    The mean is kept as a double-double (`mean` + `meanLo`) so that merges stay exact for data
 *    with a large offset; callers may ignore `meanLo`.
 *  - `mergeMoments(a, b)`: the moments of the concatenation, from the pairwise update of
 *    Chan, Golub & LeVeque (1979) for m2 and its extension to m3 and m4 by Pébay (2008).
 *    With δ = mean_b − mean_a and n = n_a + n_b:
 *        m2 = m2a + m2b + δ² n_a n_b / n
 *        m3 = m3a + m3b + δ³ n_a n_b (n_a − n_b) / n² + 3δ (n_a m2b − n_b m2a) / n
 *        m4 = m4a + m4b + δ⁴ n_a n_b (n_a² − n_a n_b + n_b²) / n³
 *             + 6δ² (n_a² m2b + n_b² m2a) / n² + 4δ (n_a m3b − n_b m3a) / n
 *    Merging `{ n: 1, mean: v, m2: 0, m3: 0, m4: 0 }` is the one-value (Welford-style) update.
 *  - `varianceFromMoments`, `skewnessFromMoments`, `kurtosisFromMoments`: the statistics.
 *
 * Sources: T. F. Chan, G. H. Golub & R. J. LeVeque (1979), "Updating formulae and a pairwise
 * algorithm for computing sample variances", Stanford CS report STAN-CS-79-773 (and Amer. Stat.
 * 37:242–247, 1983); P. Pébay (2008), "Formulas for robust, one-pass parallel computation of
 * covariances and arbitrary-order statistical moments", Sandia report SAND2008-6212;
 * D. N. Joanes & C. A. Gill (1998), The Statistician 47:183–189 (g1, G1, g2, G2).
 *
 * Non-finite input throws a `RangeError` naming the index. Zeros and negative values are data.
 */
import { nonFiniteError } from './check.ts';

export interface Moments {
  n: number;
  mean: number;
  /**
   * Low-order part of the mean (a double-double): the mean is `mean + meanLo` to about 2⁻¹⁰⁰
   * relative. Optional on input (absent = 0). It keeps merges exact where each chunk's rounded
   * mean would not be: with data at 1e7 ± 1e-3 the rounding of a chunk mean (ulp 1.9e-9) alone
   * would cost m2 about 1e-8 of its value.
   */
  meanLo?: number;
  /** Σ (x − mean)² */
  m2: number;
  /** Σ (x − mean)³ */
  m3: number;
  /** Σ (x − mean)⁴ */
  m4: number;
}

/** The moments of no data (the identity of `mergeMoments`). */
export function emptyMoments(): Moments {
  return { n: 0, mean: 0, meanLo: 0, m2: 0, m3: 0, m4: 0 };
}

/** Two-pass moments of in-memory data. Cost: two passes, O(n), no allocation. */
export function momentsOf(x: ArrayLike<number>): Moments {
  return momentsChecked('momentsOf', x);
}

/** `momentsOf` with the calling function's name in its error messages (internal). */
export function momentsChecked(fn: string, x: ArrayLike<number>): Moments {
  const n = x.length;
  if (n === 0) return emptyMoments();
  const first = x[0];
  let allEqual = true;
  let s = 0;
  let c = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError(fn, i, v);
    if (v !== first) allEqual = false;
    const t = s + v;
    c += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    s = t;
  }
  if (allEqual) return { n, mean: first, meanLo: 0, m2: 0, m3: 0, m4: 0 };
  // Pass 2: power sums of d = x − h about the rounded mean h, all compensated. S1 = Σd is the
  // mean's rounding error times n; the moments are then shifted to h + S1/n (the "corrected
  // two-pass" idea of Chan, Golub & LeVeque, carried to m3 and m4 by the binomial theorem).
  const h = (s + c) / n;
  let s1 = 0, c1 = 0, s2 = 0, c2 = 0, s3 = 0, c3 = 0, s4 = 0, c4 = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i] - h;
    let t = s1 + d;
    c1 += Math.abs(s1) >= Math.abs(d) ? s1 - t + d : d - t + s1;
    s1 = t;
    const q = d * d;
    t = s2 + q;
    c2 += s2 >= q ? s2 - t + q : q - t + s2;
    s2 = t;
    const k = q * d;
    t = s3 + k;
    c3 += Math.abs(s3) >= Math.abs(k) ? s3 - t + k : k - t + s3;
    s3 = t;
    const f = q * q;
    t = s4 + f;
    c4 += s4 >= f ? s4 - t + f : f - t + s4;
    s4 = t;
  }
  const S2 = s2 + c2, S3 = s3 + c3, S4 = s4 + c4;
  const e = (s1 + c1) / n;
  const mean = h + e;
  return {
    n,
    mean,
    meanLo: e - (mean - h),
    m2: S2 - n * e * e,
    m3: S3 - 3 * e * S2 + 2 * n * e * e * e,
    m4: S4 - 4 * e * S3 + 6 * e * e * S2 - 3 * n * e * e * e * e,
  };
}

/** Moments of the concatenation of the data behind `a` and `b` (Chan et al. 1979; Pébay 2008). O(1). */
export function mergeMoments(a: Moments, b: Moments): Moments {
  if (b.n === 0) return { meanLo: 0, ...a };
  if (a.n === 0) return { meanLo: 0, ...b };
  const na = a.n;
  const nb = b.n;
  const n = na + nb;
  const aLo = a.meanLo ?? 0;
  const bLo = b.meanLo ?? 0;
  const delta = b.mean - a.mean + (bLo - aLo);
  const dn = delta / n;
  const nanb = na * nb;
  // New mean as a double-double: the larger part's mean plus a small step (Knuth's TwoSum).
  const [base, baseLo, step] = na >= nb ? [a.mean, aLo, dn * nb] : [b.mean, bLo, -dn * na];
  const hi = base + step;
  const bv = hi - base;
  const lo = baseLo + (base - (hi - bv)) + (step - bv);
  const mean = hi + lo;
  const m2 = a.m2 + b.m2 + delta * dn * nanb;
  const m3 = a.m3 + b.m3 + delta * dn * dn * nanb * (na - nb) + 3 * dn * (na * b.m2 - nb * a.m2);
  const m4 =
    a.m4 + b.m4 +
    delta * dn * dn * dn * nanb * (na * na - nanb + nb * nb) +
    6 * dn * dn * (na * na * b.m2 + nb * nb * a.m2) +
    4 * dn * (na * b.m3 - nb * a.m3);
  return { n, mean, meanLo: lo - (mean - hi), m2, m3, m4 };
}

/** Variance m2/(n − ddof); ddof = 1 (default) is the sample variance s². null when n ≤ ddof. */
export function varianceFromMoments(m: Moments, options: { ddof?: number } = {}): number | null {
  const ddof = options.ddof ?? 1;
  return m.n - ddof > 0 ? m.m2 / (m.n - ddof) : null;
}

/**
 * Skewness from moment sums (Joanes & Gill 1998):
 *   g1 = √n · m3 / m2^{3/2}                      (adjusted = false, default; scipy `skew(bias=True)`)
 *   G1 = g1 · √(n(n − 1)) / (n − 2)              (adjusted = true;  scipy `skew(bias=False)`)
 * null when m2 = 0 (zero variance) or n < 2 (g1) / n < 3 (G1).
 */
export function skewnessFromMoments(m: Moments, options: { adjusted?: boolean } = {}): number | null {
  const { n, m2, m3 } = m;
  if (n < 2 || !(m2 > 0)) return null;
  const g1 = (Math.sqrt(n) * m3) / (m2 * Math.sqrt(m2));
  if (!options.adjusted) return g1;
  if (n < 3) return null;
  return (g1 * Math.sqrt(n * (n - 1))) / (n - 2);
}

/**
 * Excess kurtosis from moment sums (Joanes & Gill 1998); kurtosis is the FOURTH standardized
 * central moment, and "excess" subtracts 3 so that a normal distribution scores 0:
 *   g2 = n · m4 / m2² − 3                                  (adjusted = false, default; scipy `kurtosis(bias=True)`)
 *   G2 = ((n + 1) g2 + 6) (n − 1) / ((n − 2)(n − 3))       (adjusted = true; scipy `kurtosis(bias=False)`)
 * null when m2 = 0 (zero variance) or n < 2 (g2) / n < 4 (G2).
 */
export function kurtosisFromMoments(m: Moments, options: { adjusted?: boolean } = {}): number | null {
  const { n, m2, m4 } = m;
  if (n < 2 || !(m2 > 0)) return null;
  const g2 = (n * (m4 / m2)) / m2 - 3;
  if (!options.adjusted) return g2;
  if (n < 4) return null;
  return (((n + 1) * g2 + 6) * (n - 1)) / ((n - 2) * (n - 3));
}
