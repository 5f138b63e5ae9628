/**
 * Tabular (two-sided) CUSUM chart.
 *
 *   K = k·σ,  H = h·σ,  S_H(0) = S_L(0) = 0
 *   S_H(t) = max(0, x_t − (μ₀ + K) + S_H(t−1))
 *   S_L(t) = max(0, (μ₀ − K) − x_t + S_L(t−1))
 *   signal at t when S_H(t) > H or S_L(t) > H
 *
 * The sums are not reset after a signal (the chart shows how far the series has moved).
 * Usual choices: k = ½ (tuned to a one-σ shift) and h = 4 or 5. Sources: Page (1954),
 * "Continuous inspection schemes", Biometrika 41:100–115; the tabular form with K = kσ and
 * H = hσ as restated in Montgomery, Introduction to Statistical Quality Control, ch. 9.
 *
 * Input: finite x (a `RangeError` naming the index otherwise), σ > 0, k ≥ 0, h > 0.
 * Zeros and negative values are ordinary values. Cost: O(n).
 *
 * @example cusumChart([10.5, 12, 11, 13], { mu0: 10, sigma: 1, k: 0.5, h: 4 }).high // → [0, 1.5, 2, 4.5]
 */

export interface CusumOptions {
  mu0: number;
  sigma: number;
  k: number;
  h: number;
}

export interface CusumChart {
  /** S_H(t), in the units of x. */
  high: number[];
  /** S_L(t), in the units of x. */
  low: number[];
  /** Decision interval H = h·σ, in the units of x. */
  H: number;
  signal: boolean[];
  firstSignal: number | null;
}

export function cusumChart(x: readonly number[], options: CusumOptions): CusumChart {
  const { mu0, sigma, k, h } = options;
  if (!Number.isFinite(mu0)) throw new RangeError(`cusumChart: mu0 must be finite, got ${mu0}`);
  if (!(sigma > 0 && Number.isFinite(sigma))) throw new RangeError(`cusumChart: sigma must be > 0, got ${sigma}`);
  if (!(k >= 0 && Number.isFinite(k))) throw new RangeError(`cusumChart: k must be >= 0, got ${k}`);
  if (!(h > 0 && Number.isFinite(h))) throw new RangeError(`cusumChart: h must be > 0, got ${h}`);
  const K = k * sigma;
  const H = h * sigma;
  const high: number[] = [];
  const low: number[] = [];
  const signal: boolean[] = [];
  let firstSignal: number | null = null;
  let sh = 0;
  let sl = 0;
  for (let t = 0; t < x.length; t++) {
    const v = x[t];
    if (!Number.isFinite(v)) throw new RangeError(`cusumChart: x[${t}] is ${v}; only finite values are allowed`);
    sh = Math.max(0, v - (mu0 + K) + sh);
    sl = Math.max(0, mu0 - K - v + sl);
    high.push(sh);
    low.push(sl);
    const s = sh > H || sl > H;
    signal.push(s);
    if (s && firstSignal === null) firstSignal = t;
  }
  return { high, low, H, signal, firstSignal };
}
