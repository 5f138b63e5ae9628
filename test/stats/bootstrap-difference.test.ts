/**
 * bootstrapDifference: mouse treatment vs control (Efron & Tibshirani 1993, data as in
 * reference-values.md), ideal SE derived by hand, and percentile limits against
 * scipy.stats.bootstrap with two independent samples (live).
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { bootstrapDifference } from '../../src/stats/bootstrap-difference.ts';
import { normalPdf, normalPpf } from '../../src/stats/normal.ts';

const TREATMENT = Float64Array.of(94, 197, 16, 38, 99, 141, 23);
const CONTROL = Float64Array.of(52, 104, 146, 10, 50, 31, 40, 27, 46);

/** Plug-in variance of the mean, Σ(x − x̄)²/n², the ideal bootstrap variance of x̄* (derived). */
const idealVar = (x: Float64Array) => {
  const m = x.reduce((a, b) => a + b, 0) / x.length;
  return x.reduce((s, v) => s + (v - m) ** 2, 0) / x.length ** 2;
};

describe('bootstrapDifference', () => {
  it('estimate 86.857 − 56.222 = 30.635 (reference-values.md means); SE → √(Var*(x̄ₐ) + Var*(x̄ᵦ))', () => {
    const B = 200_000;
    const r = bootstrapDifference({ a: TREATMENT, b: CONTROL, level: 0.9, resamples: B, seed: 8 });
    expect(r.estimate).toBeCloseTo(86.857142857 - 56.222222222, 8);
    // Independent groups: the ideal bootstrap variance of the difference is the sum (derived).
    const ideal = Math.sqrt(idealVar(TREATMENT) + idealVar(CONTROL)); // = 26.899
    // MC tolerance as in bootstrap.test.ts: sd(ŝe_B)/se ≈ √((Δ + 2)/(4B)) ≤ √(3/(4B)) = 0.0019
    // for |Δ| ≤ 1 → 0.05; allow 4 of those: 0.2.
    expect(Math.abs(r.se - ideal)).toBeLessThan(0.2);
    expect(r).toMatchObject({ nA: 7, nB: 9, excludedA: 0, excludedB: 0, method: 'percentile', level: 0.9, seed: 8, resamples: B });
  });

  it('same seed → same interval; NaN items are excluded and counted; bad options throw', () => {
    const a = bootstrapDifference({ a: TREATMENT, b: CONTROL, level: 0.95, resamples: 999, seed: 1 });
    const b = bootstrapDifference({ a: Float64Array.of(NaN, ...TREATMENT), b: CONTROL, level: 0.95, resamples: 999, seed: 1 });
    expect(b).toEqual({ ...a, excludedA: 1 });
    const c = bootstrapDifference({ a: TREATMENT, b: CONTROL, level: 0.95, resamples: 999, seed: 2 });
    expect(c.lower).not.toBe(a.lower);
    expect(() => bootstrapDifference({ a: Float64Array.of(1), b: CONTROL, level: 0.9, resamples: 99, seed: 1 })).toThrow(RangeError);
    expect(() => bootstrapDifference({ a: TREATMENT, b: CONTROL, level: 1.1, resamples: 99, seed: 1 })).toThrow(RangeError);
    expect(() => bootstrapDifference({ a: TREATMENT, b: Float64Array.of(1, -Infinity), level: 0.9, resamples: 99, seed: 1 })).toThrow(
      RangeError,
    );
  });

  it.skipIf(!hasScipy)('percentile limits agree with scipy.stats.bootstrap (independent samples, live)', () => {
    const B = 50_000;
    const level = 0.95;
    const [lo, hi] = runPython<[number, number]>(
      `from scipy import stats
r = stats.bootstrap((np.array(inp["a"]), np.array(inp["b"])),
                    lambda a, b, axis=-1: a.mean(axis=axis) - b.mean(axis=axis), vectorized=True,
                    n_resamples=inp["B"], confidence_level=inp["level"], method="percentile",
                    rng=np.random.default_rng(7))
print(json.dumps([float(r.confidence_interval.low), float(r.confidence_interval.high)]))`,
      { a: Array.from(TREATMENT), b: Array.from(CONTROL), B, level },
    );
    const r = bootstrapDifference({ a: TREATMENT, b: CONTROL, level, resamples: B, seed: 3 });
    // Tolerance as in bootstrap-scipy.test.ts: 4·√2·se·√(α(1 − α)/B)/φ(z_α).
    const alpha = (1 - level) / 2;
    const tol = (4 * Math.SQRT2 * r.se * Math.sqrt((alpha * (1 - alpha)) / B)) / normalPdf(normalPpf(alpha));
    expect(Math.abs(r.lower - lo)).toBeLessThan(tol);
    expect(Math.abs(r.upper - hi)).toBeLessThan(tol);
  });
});
