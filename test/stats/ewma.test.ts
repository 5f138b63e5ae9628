/** EWMA chart: a worked example by hand from Roberts (1959) / NIST e-Handbook §6.3.2.4 formulas. */
import { describe, expect, it } from 'vitest';
import { ewmaChart } from '../../src/stats/ewma.ts';
import { createRandom } from '../../src/stats/random.ts';

describe('ewmaChart', () => {
  it('worked by hand: μ₀ = 10, σ = 1, λ = 0.2, L = 3, x = [11, 9, 12, 14]', () => {
    // z_t = 0.2·x_t + 0.8·z_{t−1}, z_0 = 10:
    //   z1 = 2.2 + 8 = 10.2; z2 = 1.8 + 8.16 = 9.96; z3 = 2.4 + 7.968 = 10.368; z4 = 2.8 + 8.2944 = 11.0944.
    // Half-width_t = 3·√(0.2/1.8·(1 − 0.8^{2t})) = 3·√((1 − 0.64^t)/9) = √(1 − 0.64^t):
    //   t=1 √0.36 = 0.6; t=2 √0.5904 = 0.768375; t=3 √0.737856 = 0.858985; t=4 √0.83222784 = 0.912265.
    // z4 = 11.0944 > 10.912265 → first signal at index 3; z1..z3 are inside.
    const r = ewmaChart([11, 9, 12, 14], { mu0: 10, sigma: 1, lambda: 0.2, L: 3 });
    [10.2, 9.96, 10.368, 11.0944].forEach((v, i) => expect(r.z[i]).toBeCloseTo(v, 12));
    expect(r.upper[0]).toBeCloseTo(10.6, 12);
    expect(r.lower[0]).toBeCloseTo(9.4, 12);
    expect(r.upper[1]).toBeCloseTo(10 + Math.sqrt(0.5904), 12);
    expect(r.upper[2]).toBeCloseTo(10 + Math.sqrt(0.737856), 12);
    expect(r.upper[3]).toBeCloseTo(10 + Math.sqrt(0.83222784), 12);
    expect(r.lower[3]).toBeCloseTo(10 - Math.sqrt(0.83222784), 12);
    expect(r.signal).toEqual([false, false, false, true]);
    expect(r.firstSignal).toBe(3);
  });

  it('limits approach the asymptotic μ₀ ± Lσ√(λ/(2−λ)) (NIST §6.3.2.4) and a downward shift signals low', () => {
    // Asymptote with σ = 2, λ = 0.1, L = 2.7: 2.7·2·√(0.1/1.9) = 1.238868 (derived).
    const x = Array.from({ length: 200 }, () => 0);
    const r = ewmaChart(x, { mu0: 0, sigma: 2, lambda: 0.1, L: 2.7 });
    expect(r.upper[199]).toBeCloseTo(5.4 * Math.sqrt(0.1 / 1.9), 12);
    expect(r.firstSignal).toBeNull();
    // λ = 1 is a Shewhart chart: z_t = x_t, limits ±Lσ from t = 1 (1 − 0^{2t} = 1).
    const s = ewmaChart([0.5, -3.5], { mu0: 0, sigma: 1, lambda: 1, L: 3 });
    expect(s.z).toEqual([0.5, -3.5]);
    expect(s.lower).toEqual([-3, -3]);
    expect(s.firstSignal).toBe(1);
  });

  it('estimated centre, worked by hand: λ = 0.5, m = 2 (μ̂₀ = mean of x₁, x₂), σ = 1, L = 2', () => {
    // c_{t,i} = 0.5·0.5^{t−i}[i ≤ t] − (1 − 0.5^t)/2·[i ≤ 2]  (derivation in ewma.ts):
    //   t=1: c = [0.5 − 0.25, −0.25] = [0.25, −0.25]            → Σc² = 0.125
    //   t=2: c = [0.25 − 0.375, 0.5 − 0.375] = [−0.125, 0.125]  → Σc² = 0.03125
    //   t=3: c = [0.125 − 0.4375, 0.25 − 0.4375, 0.5]           → 0.09765625 + 0.03515625 + 0.25 = 0.3828125
    // x = [1, 3, 4]: μ̂₀ = 2; z = [1.5, 2.25, 3.125]; limits 2 ± 2·√Σc²; z3 − 2 = 1.125 < 2·√0.3828 = 1.2374.
    const r = ewmaChart([1, 3, 4], { mu0: 2, sigma: 1, lambda: 0.5, L: 2, baselineCount: 2 });
    expect(r.z).toEqual([1.5, 2.25, 3.125]);
    [0.125, 0.03125, 0.3828125].forEach((v, i) => expect(r.upper[i]).toBeCloseTo(2 + 2 * Math.sqrt(v), 12));
    expect(r.firstSignal).toBeNull();
    // m = 1, t = 1: z₁ = μ̂₀ = x₁ exactly in theory, variance 0 → not tested (no spurious signal).
    const one = ewmaChart([0.3, 0.3], { mu0: 0.3, sigma: 1, lambda: 0.2, L: 3, baselineCount: 1 });
    expect(one.signal[0]).toBe(false);
    expect(() => ewmaChart([1, 2], { mu0: 0, sigma: 1, lambda: 0.2, L: 3, baselineCount: 3 })).toThrow(/baselineCount/);
  });

  it('estimated centre: the variance factor matches a seeded simulation of z_t − μ̂₀ (derivation check)', () => {
    // 40,000 in-control series N(0, 1), λ = 0.2, m = 3; SD of (z_t − μ̂₀)/(half-width/L) should be 1.
    // Monte Carlo SE of an SD estimate with 40,000 draws ≈ 1/√(2·40,000) = 0.0035; tolerance 4 SE = 0.014.
    const rng = createRandom(11);
    const n = 8;
    const reps = 40000;
    const ss = new Float64Array(n);
    let half: number[] = [];
    for (let r = 0; r < reps; r++) {
      const x = Array.from({ length: n }, () => rng.normal());
      const mu = (x[0] + x[1] + x[2]) / 3;
      const c = ewmaChart(x, { mu0: mu, sigma: 1, lambda: 0.2, L: 1, baselineCount: 3 });
      c.z.forEach((z, t) => (ss[t] += (z - mu) ** 2));
      half = c.upper.map((u) => u - mu);
    }
    for (let t = 0; t < n; t++) expect(Math.abs(Math.sqrt(ss[t] / reps) / half[t] - 1)).toBeLessThan(0.014);
  });

  it('refuses non-finite x and bad parameters', () => {
    const o = { mu0: 0, sigma: 1, lambda: 0.2, L: 3 };
    expect(() => ewmaChart([1, Infinity], o)).toThrow(/x\[1\]/);
    expect(() => ewmaChart([1], { ...o, sigma: 0 })).toThrow(/sigma/);
    expect(() => ewmaChart([1], { ...o, lambda: 0 })).toThrow(/lambda/);
  });
});
