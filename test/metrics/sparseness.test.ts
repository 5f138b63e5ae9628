import { describe, expect, it } from 'vitest';
import { activityRatio } from '../../src/metrics/activity-ratio.ts';
import { vinjeGallantSparseness } from '../../src/metrics/vinje-gallant.ts';
import { hoyerSparseness } from '../../src/metrics/hoyer.ts';
import { giniIndex } from '../../src/metrics/gini.ts';
import { expectClose, makeRng, sample } from './random.ts';

// Source for every row below: /work/shared/reference-values.md, "Sparseness measures" table
// (status: derived — a, S, Hoyer, Gini worked by hand from the published formulas of
// Treves & Rolls 1991, Vinje & Gallant 2000, Hoyer 2004, Hurley & Rickard 2009).
const TABLE: { r: number[]; a: number; S: number; H: number; G: number }[] = [
  { r: [0, 0, 0, 4], a: 0.25, S: 1, H: 1, G: 0.75 },
  { r: [1, 1, 1, 1], a: 1, S: 0, H: 0, G: 0 },
  { r: [1, 2, 3, 4], a: 5 / 6, S: 2 / 9, H: 2 - 10 / Math.sqrt(30), G: 0.25 },
  { r: [0, 0, 1, 1], a: 0.5, S: 2 / 3, H: 2 - Math.SQRT2, G: 0.5 },
];

describe('sparseness measures: reference-values table', () => {
  for (const row of TABLE) {
    it(`r = [${row.r}]`, () => {
      expectClose(activityRatio(row.r), row.a, 1e-14, 1e-15, 'a'); // reference-values, derived
      expectClose(vinjeGallantSparseness(row.r), row.S, 1e-14, 1e-15, 'S'); // reference-values, derived
      expectClose(hoyerSparseness(row.r), row.H, 1e-14, 1e-15, 'Hoyer'); // reference-values, derived
      expectClose(giniIndex(row.r), row.G, 1e-14, 1e-15, 'Gini'); // reference-values, derived
      // Hoyer's table value 2 − 10/√30 = 0.1742581416 (reference-values gives the decimal too).
      if (row.r[3] === 4 && row.r[0] === 1) expectClose(hoyerSparseness(row.r), 0.1742581416, 0, 1e-10);
    });
  }
});

describe('binary vectors with k of n active (reference-values identities, derived)', () => {
  // a = k/n, S = (n − k)/(n − 1), H = (√n − √k)/(√n − 1), G = 1 − k/n.
  const rng = makeRng(11);
  for (const [n, k] of [[2, 1], [10, 1], [10, 3], [57, 20], [1000, 999], [4096, 37]]) {
    it(`n = ${n}, k = ${k}, active positions shuffled, active value 1 and 7.5`, () => {
      for (const level of [1, 7.5]) {
        const x = new Float64Array(n);
        let placed = 0;
        while (placed < k) {
          const i = rng.int(n);
          if (x[i] === 0) { x[i] = level; placed++; }
        }
        expectClose(activityRatio(x), k / n, 1e-13, 1e-15, 'a');
        expectClose(vinjeGallantSparseness(x), (n - k) / (n - 1), 1e-12, 1e-13, 'S');
        expectClose(hoyerSparseness(x), (Math.sqrt(n) - Math.sqrt(k)) / (Math.sqrt(n) - 1), 1e-12, 1e-13, 'H');
        expectClose(giniIndex(x), 1 - k / n, 1e-12, 1e-13, 'G');
      }
    });
  }
});

describe('identities on random non-negative vectors (reference-values, derived)', () => {
  // S = n(1 − a)/(n − 1) and H = √n(1 − √a)/(√n − 1) for r ≥ 0. The second holds because
  // ‖r‖₁ = Σr when r ≥ 0, so ‖r‖₁/‖r‖₂ = √(n·a).
  const rng = makeRng(2024);
  for (const n of [2, 3, 17, 500, 10_000]) {
    it(`n = ${n}, exponential rates with a third silenced`, () => {
      const x = sample(n, () => (rng.uniform() < 1 / 3 ? 0 : rng.exponential() * 20));
      if (x.every((v) => v === 0)) x[0] = 1;
      const a = activityRatio(x)!;
      expectClose(vinjeGallantSparseness(x), (n * (1 - a)) / (n - 1), 1e-12, 1e-14, 'S');
      expectClose(hoyerSparseness(x), (Math.sqrt(n) * (1 - Math.sqrt(a))) / (Math.sqrt(n) - 1), 1e-12, 1e-14, 'H');
    });
  }
});

describe('Gini index: both code paths against the pairwise form', () => {
  // Derived: Hurley & Rickard's G = 1 − 2Σ c_(k)(N − k + ½)/(N‖c‖₁) rearranges to
  // Σ c_(k)(2k − N − 1)/(N‖c‖₁), the sorted form of the classical Gini coefficient, which equals
  // Σ_i Σ_j |c_i − c_j| / (2N Σc) (mean absolute difference over twice the mean). The O(N²)
  // pairwise form shares no code or sorting with the implementation.
  function pairwiseGini(x: ArrayLike<number>): number {
    const c = Array.from(x, Math.abs);
    let num = 0;
    let total = 0;
    for (const ci of c) {
      total += ci;
      for (const cj of c) num += Math.abs(ci - cj);
    }
    return num / (2 * c.length * total);
  }
  const rng = makeRng(7);
  it('small-range integer counts (counting-sort path) and the same data halved (sort path)', () => {
    for (const n of [1, 5, 64, 700]) {
      const counts = sample(n, () => rng.int(12));
      counts[0] = 3; // never all zero
      const expected = pairwiseGini(counts);
      expectClose(giniIndex(counts), expected, 1e-12, 1e-14, `counts n=${n}`);
      // Halving makes most values non-integers, so the sort path runs; G is scale-invariant.
      expectClose(giniIndex(counts.map((v) => v / 2)), expected, 1e-12, 1e-14, `halved n=${n}`);
    }
  });
  it('large integers beyond the counting cut-over and signed floats', () => {
    const big = sample(300, () => rng.int(1e9));
    expectClose(giniIndex(big), pairwiseGini(big), 1e-12, 0, 'big ints');
    const signed = sample(301, () => rng.normal() * 3);
    expectClose(giniIndex(signed), pairwiseGini(signed), 1e-12, 0, 'signed (magnitudes)');
  });
  it('one nonzero among N gives 1 − 1/N (reference-values, confirmed)', () => {
    const x = new Float64Array(9);
    x[4] = -2.5;
    expectClose(giniIndex(x), 1 - 1 / 9, 1e-14, 0);
  });
});

describe('undefined cases return null, never 0 or 1 (project convention, reference-values "Decisions")', () => {
  const measures = { activityRatio, vinjeGallantSparseness, hoyerSparseness, giniIndex };
  for (const [name, f] of Object.entries(measures)) {
    it(`${name}: all-zero and empty input → null`, () => {
      expect(f([0, 0, 0, 0])).toBeNull();
      expect(f(new Float32Array(5))).toBeNull();
      expect(f([])).toBeNull();
    });
  }
  it('S and Hoyer are undefined for n = 1 (1 − 1/n = 0; √n − 1 = 0)', () => {
    expect(vinjeGallantSparseness([3])).toBeNull();
    expect(hoyerSparseness([3])).toBeNull();
    expect(activityRatio([3])).toBe(1); // a = 9/9, defined
  });
});

describe('negative values are not clipped', () => {
  it('S exceeds 1 for baseline-subtracted responses (hand derivation)', () => {
    // r = [1, −1, 2, −2]: Σr = 0 so a = 0 and S = (1 − 0)/(1 − 1/4) = 4/3 > 1.
    expect(activityRatio([1, -1, 2, -2])).toBe(0);
    expectClose(vinjeGallantSparseness([1, -1, 2, -2]), 4 / 3, 1e-15);
    // Hoyer and Gini use magnitudes by definition: same as for [1, 1, 2, 2].
    expectClose(hoyerSparseness([1, -1, 2, -2]), hoyerSparseness([1, 1, 2, 2])!, 1e-15);
    expectClose(giniIndex([1, -1, 2, -2]), giniIndex([1, 1, 2, 2])!, 1e-15);
  });
});

describe('extreme magnitudes (scale invariance, derived)', () => {
  it('values near the float64 limits give the same a, S, H, G as moderate ones', () => {
    const base = [0, 1, 2, 3, 4, 0, 0.5];
    for (const scale of [1e-300, 1e300, 2 ** -1070]) {
      const x = base.map((v) => v * scale);
      for (const f of [activityRatio, vinjeGallantSparseness, hoyerSparseness, giniIndex]) {
        expectClose(f(x), f(base)!, 1e-13, 0, `${f.name} × ${scale}`);
      }
    }
  });
});
