/**
 * Jackknife: law school correlation SE and the mouse-data acceleration from
 * /work/shared/reference-values.md, the mean's closed forms (derived), and the block layout.
 */
import { describe, expect, it } from 'vitest';
import { sampleCorrelation, sampleStandardDeviation, sampleSkewness } from 'simple-statistics';
import { blockJackknife, jackknife, jackknifeBlocks } from '../../src/stats/jackknife.ts';

const mean = (s: Float64Array) => s.reduce((a, b) => a + b, 0) / s.length;

// Law school data (Efron & Tibshirani 1993), as in reference-values.md.
const LSAT = [576, 635, 558, 578, 666, 580, 555, 661, 651, 605, 653, 575, 545, 572, 594];
const GPA = [3.39, 3.3, 2.81, 3.03, 3.44, 3.07, 3.0, 3.43, 3.36, 3.13, 3.12, 2.74, 2.76, 2.88, 2.96];
const MOUSE_TREATMENT = Float64Array.of(94, 197, 16, 38, 99, 141, 23);

describe('jackknife', () => {
  it('law school: r = 0.776374491289407 and jackknife SE of r = 0.142519 (reference-values.md: confirmed + derived)', () => {
    // A `function` statistic over paired indices: values are item indices, fn closes over the data.
    const idx = Float64Array.from(LSAT, (_, i) => i);
    const r = (s: Float64Array) => sampleCorrelation(Array.from(s, (i) => LSAT[i]), Array.from(s, (i) => GPA[i]));
    const jk = jackknife(idx, r);
    expect(jk.estimate).toBeCloseTo(0.776374491289407, 12);
    expect(jk.se).toBeCloseTo(0.142519, 6);
    expect(jk.replicates.length).toBe(15);
  });

  it('mouse treatment group: acceleration 0.0291205813 (reference-values.md: confirmed, SciPy _bca_interval)', () => {
    const jk = jackknife(MOUSE_TREATMENT, mean);
    expect(jk.acceleration).toBeCloseTo(0.0291205813, 10);
    // Derived: for the mean, â = g1/(6√n) with g1 the plug-in skewness m3/m2^{3/2}.
    // simple-statistics' sampleSkewness is the adjusted G1 = g1·√(n(n−1))/(n−2); undo it.
    const n = 7;
    const g1 = (sampleSkewness(Array.from(MOUSE_TREATMENT)) * (n - 2)) / Math.sqrt(n * (n - 1));
    expect(jk.acceleration).toBeCloseTo(g1 / (6 * Math.sqrt(n)), 12);
  });

  it('for the mean, SE_jack = s/√n and bias_jack = 0 (derived: θ̂₍ᵢ₎ = (nx̄ − xᵢ)/(n − 1))', () => {
    const x = Float64Array.of(2.5, -1, 4, 4, 0.25, 9, 3);
    const jk = jackknife(x, mean);
    expect(jk.se).toBeCloseTo(sampleStandardDeviation(Array.from(x)) / Math.sqrt(x.length), 13);
    expect(jk.bias).toBeCloseTo(0, 13);
  });

  it('does not change its input, and fn may sort its scratch argument (median)', () => {
    const x = Float64Array.of(5, 1, 4, 2, 3);
    const frozen = Float64Array.from(x);
    const median = (s: Float64Array) => {
      s.sort();
      const m = s.length >> 1;
      return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
    };
    const jk = jackknife(x, median);
    // By hand: leaving out 5,1,4,2,3 leaves {1,2,3,4}→2.5, {2,3,4,5}→3.5, {1,2,3,5}→2.5, {1,3,4,5}→3.5, {1,2,4,5}→3.
    expect(Array.from(jk.replicates)).toEqual([2.5, 3.5, 2.5, 3.5, 3]);
    expect(x).toEqual(frozen);
  });

  it('delete-one-block with ℓ = 1 is the delete-one jackknife; blocks tile the series', () => {
    const x = Float64Array.of(3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5);
    expect(blockJackknife(x, 1, mean).se).toBeCloseTo(jackknife(x, mean).se, 14);
    const { starts, lengths } = jackknifeBlocks(11, 3);
    // By hand: ⌊11/3⌋ = 3 blocks [0,3), [3,6), [6,11) — the last takes the remainder.
    expect(Array.from(starts)).toEqual([0, 3, 6]);
    expect(Array.from(lengths)).toEqual([3, 3, 5]);
    // Block replicate j = mean of the series without block j, by hand for j = 0: (44 − 8)/8 = 4.5.
    expect(blockJackknife(x, 3, mean).replicates[0]).toBeCloseTo(4.5, 14);
    expect(() => jackknifeBlocks(11, 6)).toThrow(RangeError);
  });
});
