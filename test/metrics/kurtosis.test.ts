import { describe, expect, it } from 'vitest';
import { sampleKurtosis, sampleSkewness } from 'simple-statistics';
import { excessKurtosis } from '../../src/metrics/kurtosis.ts';
import { skewness } from '../../src/metrics/skewness.ts';
import { hasScipy, runPython } from '../helpers/python.ts';
import { expectClose, makeRng, sample } from './random.ts';

describe('excess kurtosis: reference-values "Moments and kurtosis" table', () => {
  it('SciPy TestKurtosis data (confirmed): g2 and G2', () => {
    const x = [1.165, 0.6268, 0.0751, 0.3516, -0.6965];
    expectClose(excessKurtosis(x), -0.8341143197027, 0, 1e-12, 'g2'); // SciPy test suite, confirmed
    expectClose(excessKurtosis(x, { adjusted: true }), 0.663542721189047, 0, 1e-12, 'G2'); // SciPy test suite, confirmed
  });
  it('[1, 2, 3, 4]: g2 = −1.36 (SciPy test suite vs R, confirmed), G2 = −1.2 (derived)', () => {
    expectClose(excessKurtosis([1, 2, 3, 4]), -1.36, 0, 1e-14);
    expectClose(excessKurtosis([1, 2, 3, 4], { adjusted: true }), -1.2, 0, 1e-14);
  });
  it('[2, 4, 5, 4, 5]: g2 = −0.5, G2 = 2.0 exactly (derived by hand)', () => {
    // mean 4, deviations −2, 0, 1, 0, 1: m2 = 6/5 = 1.2, m4 = 18/5 = 3.6, g2 = 3.6/1.44 − 3 = −0.5;
    // G2 = ((6)(−0.5) + 6)(4)/((3)(2)) = 2.
    expectClose(excessKurtosis([2, 4, 5, 4, 5]), -0.5, 0, 1e-14);
    expectClose(excessKurtosis([2, 4, 5, 4, 5], { adjusted: true }), 2, 0, 1e-14);
  });
  it('any evenly spaced sample, n ≥ 4: G2 = −1.2 exactly (derived)', () => {
    for (const n of [4, 5, 10, 101, 1000]) {
      const x = Array.from({ length: n }, (_, i) => -7 + 0.25 * i);
      expectClose(excessKurtosis(x, { adjusted: true }), -1.2, 0, 1e-12, `n=${n}`);
    }
  });
  it('Bernoulli(p): g2 of a 0/1 vector with k of n ones is exactly 1/(p(1−p)) − 6, p = k/n', () => {
    // reference-values (SciPy binom n=1, confirmed): the plug-in moments of a 0/1 vector are the
    // moments of the two-point distribution with p = k/n, so the population formula holds exactly.
    for (const [n, k] of [[10, 1], [10, 5], [1000, 37], [999, 998]]) {
      const x = new Float64Array(n).fill(0, 0, n - k).fill(1, n - k);
      const p = k / n;
      expectClose(excessKurtosis(x), 1 / (p * (1 - p)) - 6, 1e-12, 1e-12, `n=${n} k=${k}`);
    }
  });
});

describe('undefined kurtosis and skewness → null', () => {
  it('zero variance (constant, all-zero), too few points', () => {
    expect(excessKurtosis([0, 0, 0, 0, 0])).toBeNull();
    expect(excessKurtosis(new Float32Array(8).fill(0.1))).toBeNull(); // constant in float32, mean not exact in binary
    expect(excessKurtosis([0.1, 0.1, 0.1])).toBeNull();
    expect(excessKurtosis([])).toBeNull();
    expect(excessKurtosis([5])).toBeNull();
    expect(excessKurtosis([1, 2, 3], { adjusted: true })).toBeNull(); // G2 needs n ≥ 4
    expect(excessKurtosis([1, 2, 3])).toBe(-1.5); // g2 defined: m2 = 2/3, m4 = 2/3 → 1.5 − 3 (hand)
    expect(skewness([1, 2], { adjusted: true })).toBeNull(); // G1 needs n ≥ 3
    expect(skewness([7, 7, 7])).toBeNull();
  });
});

describe('simple-statistics (npm) cross-check', () => {
  // simple-statistics 7 `sampleKurtosis`: its code computes
  //   (n−1)/((n−2)(n−3)) · (n(n+1)·Σd⁴/(Σd²)² − 3(n−1)),
  // which is algebraically G2 (adjusted, Joanes & Gill's G2) — so we compare with { adjusted: true }.
  // `sampleSkewness(x)` computes n·Σd³/((n−1)(n−2)s³) with s the n−1 standard deviation, i.e. G1
  // (adjusted Fisher–Pearson); `sampleSkewness(x, true)` is the plug-in g1 = m3/m2^{3/2}.
  const rng = makeRng(99);
  for (const n of [4, 7, 30, 1000, 20_000]) {
    it(`n = ${n}, normal, exponential and uniform samples`, () => {
      for (const draw of [rng.normal, rng.exponential, rng.uniform]) {
        const x = Array.from(sample(n, draw));
        expectClose(excessKurtosis(x, { adjusted: true }), sampleKurtosis(x), 1e-10, 1e-12, 'G2');
        expectClose(skewness(x, { adjusted: true }), sampleSkewness(x), 1e-10, 1e-12, 'G1');
        expectClose(skewness(x), sampleSkewness(x, true), 1e-10, 1e-12, 'g1');
      }
    });
  }
});

describe.skipIf(!hasScipy)('scipy.stats live cross-check (kurtosis bias=True/False, skew bias=True/False)', () => {
  const rng = makeRng(31337);
  const sets: { name: string; x: number[] }[] = [];
  for (const n of [4, 5, 12, 100, 2500, 50_000]) {
    sets.push({ name: `normal n=${n}`, x: Array.from(sample(n, rng.normal)) });
    sets.push({ name: `exponential×40 n=${n}`, x: Array.from(sample(n, () => 40 * rng.exponential())) });
    sets.push({ name: `Poisson-like counts n=${n}`, x: Array.from(sample(n, () => Math.floor(3 * rng.exponential()))) });
  }
  it('agrees with scipy to ~1e-10 on seeded data of several sizes', () => {
    const ref = runPython<{ g2: number; G2: number; g1: number; G1: number }[]>(
      `from scipy import stats
out = []
for x in inp:
    a = np.array(x, dtype=np.float64)
    out.append(dict(g2=float(stats.kurtosis(a, bias=True)), G2=float(stats.kurtosis(a, bias=False)),
                    g1=float(stats.skew(a, bias=True)), G1=float(stats.skew(a, bias=False))))
print(json.dumps(out))`,
      sets.map((s) => s.x),
    );
    // Tolerance: both sides are two-pass float64; scipy's mean uses numpy's pairwise sum, ours a
    // compensated sum, so they differ by rounding only (observed < 1e-13); 1e-10 relative + 1e-12
    // absolute leaves room for that and would still catch any formula slip (those are O(1/n)).
    sets.forEach((s, i) => {
      expectClose(excessKurtosis(s.x), ref[i].g2, 1e-10, 1e-12, `${s.name} g2`);
      expectClose(excessKurtosis(s.x, { adjusted: true }), ref[i].G2, 1e-10, 1e-12, `${s.name} G2`);
      expectClose(skewness(s.x), ref[i].g1, 1e-10, 1e-12, `${s.name} g1`);
      expectClose(skewness(s.x, { adjusted: true }), ref[i].G1, 1e-10, 1e-12, `${s.name} G1`);
    });
  });
});

describe('population excess kurtosis of large seeded samples (reference-values: uniform −1.2, Laplace 3, exponential 6)', () => {
  // Tolerance: 4 asymptotic standard errors of g2, by the delta method. With d = X − μ and central
  // moments μ_k, g2's influence function is IF(d) = (d⁴ − μ4 − 4μ3·d)/μ2² − 2μ4(d² − μ2)/μ2³, and
  // n·Var(g2) → E[IF²] (derived; for the normal it gives 24, the familiar √(24/n) floor). The
  // E[IF²] below are computed from each distribution's exact central moments. Heavy tails make it
  // far larger than 24: 8064 for the exponential, so √(24/n) alone would be too tight.
  function asymptoticVar(mu: number[]): number {
    // mu[k] = μ_k for k = 0..8 (mu[0] = 1, mu[1] = 0). IF = a4 d⁴ + a2 d² + a1 d + a0.
    const [m2, m3, m4] = [mu[2], mu[3], mu[4]];
    // a0 = −μ4/μ2² + 2μ4·μ2/μ2³ = μ4/μ2²; a1 = −4μ3/μ2²; a2 = −2μ4/μ2³; a3 = 0; a4 = 1/μ2².
    const c = [m4 / (m2 * m2), (-4 * m3) / (m2 * m2), (-2 * m4) / (m2 * m2 * m2), 0, 1 / (m2 * m2)];
    let e = 0;
    for (let i = 0; i <= 4; i++) for (let j = 0; j <= 4; j++) e += c[i] * c[j] * mu[i + j];
    return e;
  }
  const n = 2_000_000;
  const rng = makeRng(5);
  const cases = [
    // uniform on [0,1): μ_{2k} = 1/((2k+1)·4^k), odd ones 0.
    { name: 'uniform', draw: rng.uniform, target: -1.2, mu: [1, 0, 1 / 12, 0, 1 / 80, 0, 1 / 448, 0, 1 / 2304] },
    // Laplace(0, 1): μ_{2k} = (2k)!.
    { name: 'Laplace', draw: rng.laplace, target: 3, mu: [1, 0, 2, 0, 24, 0, 720, 0, 40320] },
    // exponential(1): μ_k = !k (subfactorials) 1, 0, 1, 2, 9, 44, 265, 1854, 14833.
    { name: 'exponential', draw: rng.exponential, target: 6, mu: [1, 0, 1, 2, 9, 44, 265, 1854, 14833] },
  ];
  it('the delta-method variance reproduces 24 for the normal (check of the helper)', () => {
    expect(asymptoticVar([1, 0, 1, 0, 3, 0, 15, 0, 105])).toBeCloseTo(24, 12);
  });
  for (const c of cases) {
    it(`${c.name}: g2 within 4 SE of ${c.target} (n = ${n})`, () => {
      const se = Math.sqrt(asymptoticVar(c.mu) / n);
      const x = sample(n, c.draw);
      expectClose(excessKurtosis(x), c.target, 0, 4 * se, `${c.name} (SE ${se.toFixed(4)})`);
    });
  }
});
