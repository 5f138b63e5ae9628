/** Theil–Sen slope and Sen's (1968) interval: by hand and live against scipy.stats.theilslopes. */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { theilSen } from '../../src/stats/theil-sen.ts';
import { createRandom } from '../../src/stats/random.ts';

describe('theilSen', () => {
  it('by hand: t = 0..3, x = [1, 3, 2, 5]', () => {
    // Slopes: (0,1) 2, (0,2) ½, (0,3) 4/3, (1,2) −1, (1,3) 1, (2,3) 3 → sorted −1, ½, 1, 4/3, 2, 3;
    // median (1 + 4/3)/2 = 7/6. Intercept = median(x) − 7/6·median(t) = 2.5 − 7/6·1.5 = 0.75.
    // Interval at 95%: Var(S) = 4·3·13/18 = 26/3, C = 1.959964·√(26/3) = 5.770 → M1 = round(0.115)
    // = 0 → clamped to the smallest slope −1; M2 = round(5.885) = 6 → clamped to the largest, 3.
    const r = theilSen([0, 1, 2, 3], [1, 3, 2, 5], 0.95);
    expect(r.slope).toBeCloseTo(7 / 6, 14);
    expect(r.intercept).toBeCloseTo(0.75, 14);
    expect(r.lower).toBe(-1);
    expect(r.upper).toBe(3);
  });

  it('an exact line gives its slope and intercept, with a zero-width interval', () => {
    // x = 2 + 0.5 t: every pairwise slope is 0.5 (derived).
    const t = Array.from({ length: 12 }, (_, i) => i);
    const r = theilSen(t, t.map((v) => 2 + 0.5 * v), 0.9);
    expect(r).toMatchObject({ slope: 0.5, intercept: 2, lower: 0.5, upper: 0.5, level: 0.9 });
  });

  it('refuses mismatched lengths, non-finite values, one distinct t, a bad level', () => {
    expect(() => theilSen([0, 1], [1], 0.95)).toThrow(RangeError);
    expect(() => theilSen([0, 1], [1, NaN], 0.95)).toThrow(/value 1/);
    expect(() => theilSen([3, 3], [1, 2], 0.95)).toThrow(/distinct/);
    expect(() => theilSen([0, 1], [1, 2], 1)).toThrow(/level/);
  });
});

describe.skipIf(!hasScipy)('theilSen against scipy.stats.theilslopes(x, t, alpha=level) (live)', () => {
  // scipy's theilslopes: slope = median of pairwise slopes over pairs with Δt > 0, intercept
  // (method='separate', the default) = median(x) − slope·median(t), and the interval from
  // Sen (1968) eq. 2.6 (ties in both t and x subtracted from Var) with indices
  // round((N ∓ C)/2) as ours. So slope, intercept and both bounds should agree exactly
  // (to rounding in the medians: 1e-12).
  const rng = createRandom(4242);
  const cases: { t: number[]; x: number[]; level: number }[] = [];
  for (const [n, level, tied] of [[6, 0.95, false], [12, 0.95, true], [12, 0.9, false], [25, 0.8, true], [60, 0.95, true]] as const) {
    // Months with a gap (t not evenly spaced) and, where `tied`, x rounded to create ties and
    // one repeated t to exercise the tie terms in Var(S).
    const t = Array.from({ length: n }, (_, i) => i + (i > n / 2 ? 2 : 0));
    if (tied) t[1] = t[0];
    const x = t.map((v) => {
      const y = 0.3 + 0.01 * v + 0.05 * rng.normal();
      return tied ? Math.round(y * 50) / 50 : y;
    });
    cases.push({ t, x, level });
  }
  const ref = runPython<{ slope: number; intercept: number; low: number; high: number }[]>(
    `
from scipy import stats
out = []
for c in inp:
    r = stats.theilslopes(np.array(c["x"]), np.array(c["t"], dtype=float), alpha=c["level"])
    out.append({"slope": float(r.slope), "intercept": float(r.intercept), "low": float(r.low_slope), "high": float(r.high_slope)})
print(json.dumps(out))
`,
    cases,
  );
  it('slope, intercept and Sen bounds agree', () => {
    cases.forEach((c, i) => {
      const r = theilSen(c.t, c.x, c.level);
      expect(r.slope).toBeCloseTo(ref[i].slope, 12);
      expect(r.intercept).toBeCloseTo(ref[i].intercept, 12);
      expect(r.lower).toBeCloseTo(ref[i].low, 12);
      expect(r.upper).toBeCloseTo(ref[i].high, 12);
      expect(r.lower).toBeLessThanOrEqual(r.slope);
      expect(r.upper).toBeGreaterThanOrEqual(r.slope);
    });
  });
});
