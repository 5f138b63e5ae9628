/**
 * politisWhiteBlockLength against the published behaviour of the rule (Politis & White 2004;
 * Patton, Politis & White 2009): on long AR(1) series it must approach the theoretical optimal
 * moving-block length, and on iid data it must give 1.
 *
 * Theory (derived from the PW formulas with AR(1) autocovariances γ(k) = σ²φ^|k|/(1 − φ²)):
 *   G = Σ_k |k|γ(k) = 2γ(0)·φ/(1 − φ)²,   g = Σ_k γ(k) = γ(0)·(1 + φ)/(1 − φ),
 *   so G/g = 2φ/(1 − φ²) and b_MBB = (3n/2 · G²/g²)^{1/3} = (6nφ² / (1 − φ²)²)^{1/3}.
 *   φ = 0.5, n = 100,000: b = (266,666.7)^{1/3} = 64.37; φ = 0.8: 143.63; φ = −0.5: 64.37.
 *
 * Tolerances: measured spread of b̂ over 40 seeded series (seeds 1000–1039, during development):
 * φ = 0.5: mean 63.4, SD 2.1 (3.2%); φ = 0.8: mean 142.2, SD 9.1 (6.3%); φ = −0.5: mean 64.7,
 * SD 3.8 (5.8%). Each series must fall within ~4 SD (+ the small bias) of theory; the mean of
 * the seeds within ~2.5 SD/√seeds + bias.
 */
import { describe, expect, it } from 'vitest';
import { politisWhiteBlockLength, politisWhiteDetails } from '../../src/stats/block-length.ts';
import { createRandom } from '../../src/stats/random.ts';

function ar1(n: number, phi: number, seed: number): Float64Array {
  const r = createRandom(seed);
  const x = new Float64Array(n);
  let prev = r.normal() / Math.sqrt(1 - phi * phi); // stationary start
  x[0] = prev;
  for (let i = 1; i < n; i++) {
    prev = phi * prev + r.normal();
    x[i] = prev;
  }
  return x;
}

const theory = (n: number, phi: number) => Math.cbrt((6 * n * phi * phi) / (1 - phi * phi) ** 2);

describe('politisWhiteBlockLength on AR(1) series', () => {
  const n = 100_000;
  it.each([
    [0.5, 0.15, 0.06],
    [0.8, 0.27, 0.12],
    [-0.5, 0.25, 0.1],
  ])('φ = %d: within the stated tolerance of (6nφ²/(1 − φ²)²)^{1/3}', (phi, eachTol, meanTol) => {
    const b = theory(n, phi);
    const raws = [1, 2, 3, 4].map((s) => politisWhiteDetails(ar1(n, phi, 500 + s)).raw);
    for (const r of raws) expect(Math.abs(r / b - 1)).toBeLessThan(eachTol);
    const m = raws.reduce((a, c) => a + c, 0) / raws.length;
    expect(Math.abs(m / b - 1)).toBeLessThan(meanTol);
  });

  it('the rounded block length is the rounded raw value, inside [1, ⌈min(3√n, n/3)⌉]', () => {
    const d = politisWhiteDetails(ar1(n, 0.5, 77));
    expect(d.blockLength).toBe(Math.round(d.raw));
    expect(d.maxBlockLength).toBe(Math.ceil(3 * Math.sqrt(n)));
    // Short, strongly dependent series: the lag window is cut at m_max = ⌈√n⌉ + 5, and the result
    // stays inside the bounds (the cap is a safety net; these series do not reach it).
    for (const [len, phi] of [[30, 0.99], [60, 0.9], [300, 0.97]]) {
      const e = politisWhiteDetails(ar1(len, phi, 3));
      expect(e.maxBlockLength).toBe(Math.ceil(Math.min(3 * Math.sqrt(len), len / 3)));
      expect(e.M).toBeLessThanOrEqual(Math.ceil(Math.sqrt(len)) + 5);
      expect(e.blockLength).toBeGreaterThanOrEqual(1);
      expect(e.blockLength).toBeLessThanOrEqual(e.maxBlockLength);
    }
  });
});

describe('politisWhiteBlockLength on iid and degenerate series', () => {
  it('iid normal noise gives 1 (no significant autocorrelation, M = 0)', () => {
    for (const seed of [1, 2, 3, 4, 5]) {
      const r = createRandom(seed);
      const x = Float64Array.from({ length: 5000 }, () => r.normal());
      expect(politisWhiteBlockLength(x)).toBe(1);
    }
  });
  it('a constant series and a very short one give 1; NaN or Infinity throws', () => {
    expect(politisWhiteBlockLength(new Float64Array(100).fill(2))).toBe(1);
    expect(politisWhiteBlockLength(Float64Array.of(1, 2, 3))).toBe(1);
    expect(() => politisWhiteBlockLength(Float64Array.of(1, NaN, 3, 4, 5))).toThrow(RangeError);
    expect(() => politisWhiteBlockLength(Float64Array.of(1, Infinity, 3, 4, 5))).toThrow(RangeError);
  });
});
