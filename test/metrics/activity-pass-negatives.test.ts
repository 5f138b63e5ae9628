/**
 * The four negatives policies on a 3 × 4 matrix worked by hand. Density is of the raw values
 * under every policy (README, `negatives`: the policy is for the measures that assume
 * non-negative responses; density counts |x| > tol over every unit, refused ones too).
 *
 *   u0 = [−1, 0, 1, 2]   u1 = [1, 0, 0, 4]   u2 = [0, 3, 0, 0]      (tol 0, min_nonzero 3)
 *
 * Formulas (Vinje & Gallant 2000; Treves & Rolls 1991; Hoyer 2004; Hurley & Rickard 2009, as
 * restated in /work/shared/reference-values.md): a = (Σy/n)²/(Σy²/n), S = (1 − a)/(1 − 1/n),
 * H = (√n − ‖y‖₁/‖y‖₂)/(√n − 1), G = 1 − 2 Σ_k (c_(k)/‖c‖₁)(n − k + ½)/n with c = sorted |y|.
 *
 * u0, n = 4:
 *   keep    y = [−1,0,1,2]: Σ=2, Σ²=6, a = 0.25/1.5 = 1/6, S = (5/6)/(3/4) = 10/9 (> 1),
 *           ‖y‖₁ = 4 → H = 2 − 4/√6; c = [0,1,1,2]: Σ = (1/4)(2.5/4)+(1/4)(1.5/4)+(2/4)(0.5/4) = 0.3125 → G = 3/8.
 *   rectify y = [0,0,1,2]: Σ=3, Σ²=5, a = 0.5625/1.25 = 9/20, S = (11/20)/(3/4) = 11/15,
 *           H = 2 − 3/√5; c: (1/3)(1.5/4)+(2/3)(0.5/4) = 5/24 → G = 7/12. One value changed.
 *   shift   y = [0,1,2,3]: Σ=6, Σ²=14, a = 2.25/3.5 = 9/14, S = (5/14)/(3/4) = 10/21,
 *           H = 2 − 6/√14; c: (1/6)(2.5/4)+(2/6)(1.5/4)+(3/6)(0.5/4) = 7/24 → G = 5/12. Four values changed.
 *   refuse  left out: S, a, H, G undefined.
 *   Raw kurtosis of an evenly spaced 4-sample: g2 = −1.36 (reference-values.md, [1,2,3,4], shift-invariant), skewness 0.
 * u1 (no negatives, same under every policy): Σ=5, Σ²=17, a = 25/68, S = (43/68)/(3/4) = 43/51,
 *   H = 2 − 5/√17; c = [0,0,1,4]: (1/5)(1.5/4)+(4/5)(0.5/4) = 0.175 → G = 0.65. 2 nonzero < 3: no kurtosis.
 * u2 one-hot: a = 1/4, S = 1, H = 1, G = 3/4 (reference-values.md row [0,0,0,4]). 1 nonzero: no kurtosis.
 *
 * Bins (across u0, u1, u2), binary/one-hot S from reference-values.md, others as above with n = 3:
 *   keep    c0 = (−1,1,0): Σ=0 → a=0 → S = 1/(2/3) = 3/2 (> 1); c1 = (0,0,3): 1; c2 = (1,0,0): 1;
 *           c3 = (2,4,0): a = 36/60 = 0.6 → S = 0.4/(2/3) = 0.6.
 *   rectify c0 = (0,1,0): 1; c1: 1; c2: 1; c3: 0.6.
 *   shift   c0 = (0,1,0): 1; c1 = (1,0,3): a = 16/30 → S = (7/15)/(2/3) = 7/10; c2 = (2,0,0): 1;
 *           c3 = (3,4,0): a = 49/75 → S = (26/75)(3/2) = 13/25.
 *   refuse  u0 left out, n = 2: c0 = (1,0): a = 1/2 → S = (1/2)/(1/2) = 1; c1 = (0,3): 1; c2 = (0,0): 0/0, undefined;
 *           c3 = (4,0): 1.
 *   Density, every policy, raw columns (−1,1,0), (0,0,3), (1,0,0), (2,4,0): 2/3, 1/3, 1/3, 2/3.
 */
import { describe, expect, it } from 'vitest';
import { createActivityPass, finishActivityPass } from '../../src/metrics/activity-pass.ts';
import type { NegativesPolicy } from '../../src/manifest/types.ts';

const rows = [
  [-1, 0, 1, 2],
  [1, 0, 0, 4],
  [0, 3, 0, 0],
];

function run(negatives: NegativesPolicy) {
  const pass = createActivityPass({ units: 3, bins: 4 }, { zeroTolerance: 0, negatives, events: null, minNonzero: 3 });
  pass.addBlock({ unitStart: 0, units: 3, bins: 4, data: Float64Array.from(rows.flat()) });
  return finishActivityPass(pass.state());
}

const N = NaN;
const u1 = { S: 43 / 51, a: 25 / 68, H: 2 - 5 / Math.sqrt(17), G: 0.65 };
const u2 = { S: 1, a: 0.25, H: 1, G: 0.75 };
const RAW_DENSITY = [2 / 3, 1 / 3, 1 / 3, 2 / 3];
const expected: Record<NegativesPolicy, { u0: { S: number; a: number; H: number; G: number }; changed: number; pop: number[]; density: number[] }> = {
  keep: { u0: { S: 10 / 9, a: 1 / 6, H: 2 - 4 / Math.sqrt(6), G: 3 / 8 }, changed: 0, pop: [1.5, 1, 1, 0.6], density: RAW_DENSITY },
  rectify: { u0: { S: 11 / 15, a: 9 / 20, H: 2 - 3 / Math.sqrt(5), G: 7 / 12 }, changed: 1, pop: [1, 1, 1, 0.6], density: RAW_DENSITY },
  shift: { u0: { S: 10 / 21, a: 9 / 14, H: 2 - 6 / Math.sqrt(14), G: 5 / 12 }, changed: 4, pop: [1, 0.7, 1, 13 / 25], density: RAW_DENSITY },
  refuse: { u0: { S: N, a: N, H: N, G: N }, changed: 0, pop: [1, 1, N, 1], density: RAW_DENSITY },
};

const near = (got: ArrayLike<number>, want: number[]) => {
  expect(got.length).toBe(want.length);
  for (let i = 0; i < want.length; i++) {
    if (Number.isNaN(want[i])) expect(got[i], `index ${i}`).toBeNaN();
    else expect(got[i], `index ${i}`).toBeCloseTo(want[i], 13);
  }
};

describe('negatives policies, worked by hand (derivation in the file header)', () => {
  for (const policy of ['keep', 'rectify', 'shift', 'refuse'] as const) {
    it(policy, () => {
      const r = run(policy);
      const e = expected[policy];
      near(r.unit.lifetimeSparseness, [e.u0.S, u1.S, u2.S]);
      near(r.unit.activityRatio, [e.u0.a, u1.a, u2.a]);
      near(r.unit.hoyer, [e.u0.H, u1.H, u2.H]);
      near(r.unit.gini, [e.u0.G, u1.G, u2.G]);
      near(r.bin.populationSparseness, e.pop);
      near(r.bin.density, e.density);
      expect(Array.from(r.unit.changed)).toEqual([e.changed, 0, 0]);
      expect(Array.from(r.unit.refused)).toEqual(policy === 'refuse' ? [1, 0, 0] : [0, 0, 0]);
      expect(Array.from(r.bin.defined)).toEqual(policy === 'refuse' ? [2, 2, 2, 2] : [3, 3, 3, 3]);
      expect(Array.from(r.bin.negative)).toEqual([1, 0, 0, 0]);
      // Raw moments whatever the policy: g2 = −1.36 for an evenly spaced 4-sample (reference-values.md), g1 = 0 by symmetry.
      near(r.unit.kurtosis, [-1.36, N, N]);
      near(r.unit.skewness.subarray(0, 1), [0]);
      expect(Array.from(r.unit.kurtosisTooFew)).toEqual([0, 1, 1]);
      // Out-of-range counts only under keep: u0's S = 10/9 and bin 0's S = 3/2.
      expect([r.totals.lifetimeOutOfRangeUnits, r.totals.populationOutOfRangeBins]).toEqual(policy === 'keep' ? [1, 1] : [0, 0]);
    });
  }
});
