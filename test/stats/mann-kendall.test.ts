/** Mann–Kendall: reference-values.md "Trend and drift", hand-worked examples, live scipy.stats.kendalltau. */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { mannKendall } from '../../src/stats/mann-kendall.ts';
import { createRandom } from '../../src/stats/random.ts';

describe('mannKendall', () => {
  it('x = 1..100: S = 4950, Var = 112750, Z = 14.73869998208331 (reference-values.md, Gilbert 1987 ch. 16; confirmed)', () => {
    const r = mannKendall(Array.from({ length: 100 }, (_, i) => i + 1));
    expect(r.S).toBe(4950);
    expect(r.varS).toBe(112750);
    expect(r.z).toBeCloseTo(14.73869998208331, 12);
    expect(r.n).toBe(100);
  });

  it('by hand, no ties: [1, 3, 2, 4]', () => {
    // Pairs: (1,3)+ (1,2)+ (1,4)+ (3,2)− (3,4)+ (2,4)+ → S = 5 − 1 = 4.
    // Var = 4·3·13/18 = 156/18; Z = (4 − 1)/√(156/18) (continuity correction).
    const r = mannKendall([1, 3, 2, 4]);
    expect(r.S).toBe(4);
    expect(r.varS).toBeCloseTo(156 / 18, 14);
    expect(r.z).toBeCloseTo(3 / Math.sqrt(156 / 18), 14);
  });

  it('by hand, one tie group and a falling series: [3, 2, 2, 1]', () => {
    // Pairs: (3,2)− (3,2)− (3,1)− (2,2)0 (2,1)− (2,1)− → S = −5.
    // Tie group of size 2: Var = (4·3·13 − 2·1·9)/18 = 138/18; Z = (−5 + 1)/√(138/18).
    const r = mannKendall([3, 2, 2, 1]);
    expect(r.S).toBe(-5);
    expect(r.varS).toBeCloseTo(138 / 18, 14);
    expect(r.z).toBeCloseTo(-4 / Math.sqrt(138 / 18), 14);
  });

  it('S = 0 gives z = 0 and p = 1; all tied gives Var = 0, p = 1; bad input is refused', () => {
    // [1, 2, 1]: (1,2)+ (1,1)0 (2,1)− → S = 0.
    expect(mannKendall([1, 2, 1])).toMatchObject({ S: 0, z: 0, p: 1 });
    expect(mannKendall([5, 5, 5])).toMatchObject({ S: 0, varS: 0, z: 0, p: 1 });
    expect(() => mannKendall([1])).toThrow(RangeError);
    expect(() => mannKendall([1, NaN, 2])).toThrow(/x\[1\]/);
  });

  it('does not change its input', () => {
    const x = Object.freeze([4, 1, 3, 3, 2]);
    expect(() => mannKendall(x)).not.toThrow();
  });
});

describe.skipIf(!hasScipy)('mannKendall against scipy.stats.kendalltau(t, x) (live)', () => {
  // scipy's tau-b between the time index t (no ties) and x: tau_b = S / √(n0·(n0 − n1)),
  // n0 = n(n−1)/2, n1 = Σ t_p(t_p−1)/2 over tie groups of x — so S = tau_b·√(n0(n0 − n1)).
  // scipy's method='asymptotic' uses z = S/√Var with the same tie-corrected Var (its extra
  // terms vanish when t has no ties) and no continuity correction, so Var = (S/z_scipy)².
  const rng = createRandom(20260501);
  const tied = [8, 12, 20, 37].map((n) =>
    // Rounded to one decimal so that ties occur.
    Array.from({ length: n }, (_, i) => Math.round((0.05 * i + rng.normal()) * 10) / 10),
  );
  // No ties (continuous draws), n = 10 and 20, for the exact null distribution.
  const untied = [10, 10, 10, 20, 20, 20].map((n) => Array.from({ length: n }, (_, i) => 0.08 * i + rng.normal()));
  const ref = runPython<{ tau: number; z: number; pAsym: number; pExact: number | null; ties: number }[]>(
    `
from scipy import stats
out = []
for x in inp:
    x = np.array(x); t = np.arange(len(x))
    a = stats.kendalltau(t, x, method="asymptotic")
    _, counts = np.unique(x, return_counts=True)
    ties = int((counts * (counts - 1) // 2).sum())
    exact = float(stats.kendalltau(t, x, method="exact").pvalue) if ties == 0 else None
    n0 = len(x) * (len(x) - 1) / 2
    S = a.statistic * np.sqrt(n0 * (n0 - ties))
    z = float(stats.norm.isf(a.pvalue / 2) * np.sign(S))
    out.append({"tau": float(a.statistic), "z": z, "pAsym": float(a.pvalue), "pExact": exact, "ties": ties})
print(json.dumps(out))
`,
    [...tied, ...untied],
  );

  it('S = tau_b·√(n0(n0 − n1)) exactly, and Var(S) = (S/z_scipy)² with ties', () => {
    tied.forEach((x, i) => {
      const r = mannKendall(x);
      const n0 = (x.length * (x.length - 1)) / 2;
      expect(ref[i].ties).toBeGreaterThan(0);
      expect(ref[i].tau).toBeCloseTo(r.S / Math.sqrt(n0 * (n0 - ref[i].ties)), 12);
      // z_scipy recovered from scipy's p via norm.isf (accurate to ~1e-10 relative for these p).
      expect((r.S / ref[i].z) ** 2 / r.varS - 1).toBeLessThan(1e-8);
      expect((r.S / ref[i].z) ** 2 / r.varS - 1).toBeGreaterThan(-1e-8);
      // With the continuity correction our p is the larger (more conservative) one.
      expect(r.p).toBeGreaterThan(ref[i].pAsym);
    });
  });

  it('no ties, n = 10 and 20: continuity-corrected p within the worst case of the approximation', () => {
    // Tolerances: the largest |p_cc − p_exact| over EVERY possible S (no ties), computed once
    // with scipy's exact null distribution (scipy.stats._mstats_basic._kendall_p_exact(n, c)
    // for c = 0..n(n−1)/2, S = 2c − n(n−1)/2): 0.01004 at n = 10 (S = ±9), 0.00499 at n = 20.
    // scipy's uncorrected asymptotic p is off by up to 0.073 (n = 10) and 0.028 (n = 20) on the
    // same scan, so the continuity correction is the better approximation; neither is exact.
    const tol: Record<number, number> = { 10: 0.0101, 20: 0.005 };
    untied.forEach((x, j) => {
      const i = tied.length + j;
      const r = mannKendall(x);
      expect(ref[i].pExact).not.toBeNull();
      expect(Math.abs(r.p - (ref[i].pExact as number))).toBeLessThanOrEqual(tol[x.length]);
    });
  });
});
