/**
 * Theil–Sen slope with Sen's confidence interval.
 *
 *   slope     = median of the N pairwise slopes (x_j − x_i)/(t_j − t_i) over pairs with t_j > t_i
 *   intercept = median(x) − slope·median(t)      (Conover 1980; scipy's `theilslopes` default)
 *   C         = z_{(1+level)/2} · √Var(S),  Var(S) = [n(n−1)(2n+5) − Σ ties in t − Σ ties in x] / 18
 *   M1 = (N − C)/2, M2 = (N + C)/2, each rounded to the nearest integer;
 *   lower = the M1-th smallest slope, upper = the (M2 + 1)-th smallest (clamped to [1, N]).
 *
 * Sources: Theil (1950), Proc. Kon. Ned. Akad. Wet. 53; Sen (1968), "Estimates of the regression
 * coefficient based on Kendall's tau", JASA 63:1379–1389 (eq. 2.6 for Var(S) with ties);
 * Gilbert (1987) ch. 16 for the order-statistic form of the interval. Same rule as
 * `scipy.stats.theilslopes` (which rounds M1, M2 half-to-even; ties of C at exactly .5 do not
 * occur in practice since C is irrational for any usual level).
 *
 * Input: equal-length arrays of finite numbers, at least 2 distinct t values, level in (0, 1)
 * (a `RangeError` otherwise). Zeros and negatives are ordinary values. Cost: O(n² log n) (sort
 * of the n(n−1)/2 slopes); fine for monthly series (n ≤ a few hundred).
 *
 * @example theilSen([0, 1, 2, 3], [1, 3, 2, 5], 0.95).slope // → 7/6 (median of slopes −1, ½, 1, 4/3, 2, 3)
 */
import { tieTerm } from './mann-kendall.ts';
import { normalPpf } from './normal.ts';

export interface TheilSenResult {
  slope: number;
  intercept: number;
  lower: number;
  upper: number;
  level: number;
}

function median(sorted: Float64Array): number {
  const n = sorted.length;
  const h = n >> 1;
  return n % 2 ? sorted[h] : (sorted[h - 1] + sorted[h]) / 2;
}

export function theilSen(t: readonly number[], x: readonly number[], level: number): TheilSenResult {
  const n = x.length;
  if (t.length !== n) throw new RangeError(`theilSen: t has ${t.length} values, x has ${n}`);
  if (!(level > 0 && level < 1)) throw new RangeError(`theilSen: level must be in (0, 1), got ${level}`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(t[i]) || !Number.isFinite(x[i])) {
      throw new RangeError(`theilSen: value ${i} is (t ${t[i]}, x ${x[i]}); only finite values are allowed`);
    }
  }
  const slopes: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const dt = t[j] - t[i];
      if (dt > 0) slopes.push((x[j] - x[i]) / dt);
    }
  }
  const N = slopes.length;
  if (N === 0) throw new RangeError('theilSen: needs at least 2 distinct t values');
  const s = Float64Array.from(slopes).sort();
  const slope = median(s);
  const intercept = median(Float64Array.from(x).sort()) - slope * median(Float64Array.from(t).sort());
  const varS = (n * (n - 1) * (2 * n + 5) - tieTerm(t) - tieTerm(x)) / 18;
  const C = normalPpf((1 + level) / 2) * Math.sqrt(Math.max(0, varS));
  const m1 = roundHalfEven((N - C) / 2);
  const m2 = roundHalfEven((N + C) / 2);
  const lower = s[Math.min(N - 1, Math.max(0, m1 - 1))];
  const upper = s[Math.min(N - 1, Math.max(0, m2))];
  return { slope, intercept, lower, upper, level };
}

/** Round to the nearest integer, halves to even (numpy's `round`), so limits match scipy's. */
function roundHalfEven(v: number): number {
  const f = Math.floor(v);
  const d = v - f;
  if (d > 0.5) return f + 1;
  if (d < 0.5) return f;
  return f % 2 === 0 ? f : f + 1;
}
