/**
 * normalCdf / normalPpf against scipy.special.ndtr / ndtri (live), plus values that follow by hand.
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { normalCdf, normalPdf, normalPpf } from '../../src/stats/normal.ts';

describe('normal distribution, by hand', () => {
  it('Φ(0) = 1/2, Φ⁻¹(1/2) = 0, φ(0) = 1/√(2π), symmetry Φ(−x) = 1 − Φ(x)', () => {
    // Exact by symmetry of the density (derived).
    expect(normalCdf(0)).toBe(0.5);
    expect(normalPpf(0.5)).toBe(0);
    expect(normalPdf(0)).toBeCloseTo(1 / Math.sqrt(2 * Math.PI), 15);
    for (const x of [0.3, 1.7, 2.9, 3.1, 6]) expect(normalCdf(-x) + normalCdf(x)).toBeCloseTo(1, 14);
  });
  it('the two-sided 95% point 1.959963984540054 (value from memory, standard tables give 1.95996)', () => {
    expect(normalPpf(0.975)).toBeCloseTo(1.959963984540054, 13);
  });
  it('edges: 0 → −∞, 1 → +∞, outside [0, 1] or NaN → NaN', () => {
    expect(normalPpf(0)).toBe(-Infinity);
    expect(normalPpf(1)).toBe(Infinity);
    expect(normalPpf(1.2)).toBeNaN();
    expect(normalPpf(NaN)).toBeNaN();
    expect(normalCdf(NaN)).toBeNaN();
  });
  it('ppf inverts cdf (round trip, derived)', () => {
    for (const p of [1e-12, 1e-4, 0.01, 0.2, 0.5, 0.8, 0.99]) {
      expect(normalCdf(normalPpf(p)) / p).toBeCloseTo(1, 12);
    }
  });
});

describe.skipIf(!hasScipy)('normal distribution against scipy.special (live)', () => {
  it('Φ(x) agrees with ndtr to 1e−12 relative, tails included', () => {
    const xs = [-37, -20, -8.5, -5, -3.2, -3, -2.99, -2, -1, -0.4, 0.1, 0.9, 1.5, 2.5, 2.999, 3, 4.2, 8];
    const ref = runPython<number[]>('from scipy.special import ndtr\nprint(json.dumps([float(ndtr(x)) for x in inp]))', xs);
    xs.forEach((x, i) => expect(Math.abs(normalCdf(x) - ref[i]) / ref[i]).toBeLessThan(1e-12));
  });
  it('Φ⁻¹(p) agrees with ndtri to 1e−14 relative', () => {
    const ps = [1e-300, 1e-50, 1e-10, 1e-3, 0.02, 0.0749, 0.075, 0.3, 0.49, 0.51, 0.925, 0.975, 0.999, 1 - 1e-12];
    const ref = runPython<number[]>('from scipy.special import ndtri\nprint(json.dumps([float(ndtri(p)) for p in inp]))', ps);
    ps.forEach((p, i) => expect(Math.abs(normalPpf(p) - ref[i]) / Math.abs(ref[i])).toBeLessThan(1e-14));
  });
});
