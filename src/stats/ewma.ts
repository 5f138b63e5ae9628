/**
 * EWMA control chart with exact (time-varying) limits.
 *
 *   z_0 = μ₀,  z_t = λ·x_t + (1 − λ)·z_{t−1}                         (t = 1, 2, …)
 *   limits_t = μ₀ ± L·σ·√( λ/(2 − λ) · [1 − (1 − λ)^{2t}] )
 *   signal at t when z_t > upper_t or z_t < lower_t
 *
 * The bracket is the exact variance factor of z_t for independent in-control x with known μ₀
 * and σ; it grows to the asymptotic λ/(2 − λ), so early points get the narrower limits they
 * deserve. Sources: Roberts (1959), "Control chart tests based on geometric moving averages",
 * Technometrics 1:239–250; NIST/SEMATECH e-Handbook of Statistical Methods, §6.3.2.4.
 *
 * Estimated centre (option `baselineCount` = m): when μ₀ is not known but is the mean of the
 * first m observations of x itself (a short baseline), z_t − μ̂₀ has a larger variance than
 * Roberts's factor, and ignoring it inflates false alarms (Jensen et al. 2006, "Effects of
 * parameter estimation on control chart properties: a literature review", J. Qual. Technol.
 * 38:349–364). With z_0 = μ̂₀, z_t − μ̂₀ = Σ_i c_{t,i}·(x_i − μ) where
 *   c_{t,i} = λ(1 − λ)^{t−i}·[i ≤ t] − (1 − (1 − λ)^t)/m·[i ≤ m]
 * (derived: z_t = Σ_{i≤t} λ(1−λ)^{t−i}x_i + (1−λ)^t·μ̂₀), so for independent in-control x
 *   limits_t = μ̂₀ ± L·σ·√(Σ_i c_{t,i}²)
 * which tends to Roberts's limits as m → ∞. σ is still taken as known. A point whose variance
 * factor is below 1e−12 (e.g. t = 1 with m = 1, where z_1 = μ̂₀ by construction) is not tested.
 * Cost: O(n·(n + m)) with this option.
 *
 * Input: finite x (a `RangeError` naming the index otherwise), σ > 0, λ ∈ (0, 1], L > 0,
 * m an integer in [1, n] when given. Zeros and negative values are ordinary values. Cost: O(n).
 *
 * @example ewmaChart([11, 9, 12, 14], { mu0: 10, sigma: 1, lambda: 0.2, L: 3 }).firstSignal // → 3
 */

export interface EwmaOptions {
  mu0: number;
  sigma: number;
  lambda: number;
  L: number;
  /** μ₀ is the mean of the first `baselineCount` values of x: widen the limits for it (see above). */
  baselineCount?: number;
}

export interface EwmaChart {
  z: number[];
  upper: number[];
  lower: number[];
  signal: boolean[];
  /** Index of the first point outside its limits, or null. */
  firstSignal: number | null;
}

export function ewmaChart(x: readonly number[], options: EwmaOptions): EwmaChart {
  const { mu0, sigma, lambda, L, baselineCount: m } = options;
  if (m !== undefined && !(Number.isInteger(m) && m >= 1 && m <= x.length)) {
    throw new RangeError(`ewmaChart: baselineCount must be an integer in [1, ${x.length}], got ${m}`);
  }
  if (!Number.isFinite(mu0)) throw new RangeError(`ewmaChart: mu0 must be finite, got ${mu0}`);
  if (!(sigma > 0 && Number.isFinite(sigma))) throw new RangeError(`ewmaChart: sigma must be > 0, got ${sigma}`);
  if (!(lambda > 0 && lambda <= 1)) throw new RangeError(`ewmaChart: lambda must be in (0, 1], got ${lambda}`);
  if (!(L > 0 && Number.isFinite(L))) throw new RangeError(`ewmaChart: L must be > 0, got ${L}`);
  const z: number[] = [];
  const upper: number[] = [];
  const lower: number[] = [];
  const signal: boolean[] = [];
  let firstSignal: number | null = null;
  const q = 1 - lambda;
  const factor = lambda / (2 - lambda);
  let prev = mu0;
  let q2t = 1; // (1 − λ)^{2t}
  for (let t = 0; t < x.length; t++) {
    const v = x[t];
    if (!Number.isFinite(v)) throw new RangeError(`ewmaChart: x[${t}] is ${v}; only finite values are allowed`);
    prev = lambda * v + q * prev;
    q2t *= q * q;
    const vf = m === undefined ? factor * (1 - q2t) : estimatedCentreFactor(lambda, t + 1, m);
    const half = L * sigma * Math.sqrt(vf);
    z.push(prev);
    upper.push(mu0 + half);
    lower.push(mu0 - half);
    const s = vf >= 1e-12 && (prev > mu0 + half || prev < mu0 - half);
    signal.push(s);
    if (s && firstSignal === null) firstSignal = t;
  }
  return { z, upper, lower, signal, firstSignal };
}

/** Σ_i c_{t,i}² for a centre estimated from the first m points (t is 1-based). */
function estimatedCentreFactor(lambda: number, t: number, m: number): number {
  const q = 1 - lambda;
  const W = 1 - q ** t;
  let sum = 0;
  for (let i = 1; i <= Math.max(t, m); i++) {
    const c = (i <= t ? lambda * q ** (t - i) : 0) - (i <= m ? W / m : 0);
    sum += c * c;
  }
  return sum;
}
