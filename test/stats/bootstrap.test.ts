/**
 * bootstrapInterval: reference values for the mouse data (reference-values.md), recorded fields,
 * reproducibility, NaN exclusion, and the sufficient-statistic paths against materialised resamples.
 */
import { describe, expect, it } from 'vitest';
import { bootstrapInterval, type BootstrapOptions } from '../../src/stats/bootstrap.ts';
import { createRandom } from '../../src/stats/random.ts';

const MOUSE_TREATMENT = Float64Array.of(94, 197, 16, 38, 99, 141, 23);
const meanOf = (s: Float64Array) => s.reduce((a, b) => a + b, 0) / s.length;

function ar1(n: number, phi: number, seed: number): Float64Array {
  const r = createRandom(seed);
  const x = new Float64Array(n);
  x[0] = r.normal() / Math.sqrt(1 - phi * phi);
  for (let i = 1; i < n; i++) x[i] = phi * x[i - 1] + r.normal();
  return x;
}

const base: Omit<BootstrapOptions, 'statistic'> = {
  resampling: 'iid',
  resamplingUnit: 'units',
  method: 'bca',
  level: 0.9,
  resamples: 2000,
  seed: 11,
};

describe('bootstrapInterval: mouse treatment data (Efron & Tibshirani 1993)', () => {
  it('BCa acceleration = 0.0291205813 (reference-values.md: confirmed via SciPy _bca_interval + derived)', () => {
    const r = bootstrapInterval({ ...base, statistic: { kind: 'mean', values: MOUSE_TREATMENT } });
    expect(r.acceleration).toBeCloseTo(0.0291205813, 10);
    expect(r.estimate).toBeCloseTo(86.857142857, 8); // mean 86.857 (reference-values.md)
  });

  it('bootstrap SE approaches the ideal SE 23.36 = plug-in sd/√n (reference-values.md: memory + derived)', () => {
    // Derived here too: plug-in sd = √(Σ(x − x̄)²/n), ideal SE = sd/√7 = 23.3635…
    const n = 7;
    const m = meanOf(MOUSE_TREATMENT);
    const ideal = Math.sqrt(MOUSE_TREATMENT.reduce((s, v) => s + (v - m) ** 2, 0) / n) / Math.sqrt(n);
    expect(ideal).toBeCloseTo(23.36, 2);
    // Monte Carlo tolerance (Efron & Tibshirani 1993, eq. 6.9): sd(ŝe_B)/se ≈ √((Δ + 2)/(4B)),
    // Δ = excess kurtosis of the bootstrap distribution of the mean = (data excess kurtosis)/n
    // ≈ −1.01/7 ≈ −0.14, so with B = 200,000: √(1.86/800,000) = 0.0015 → 0.036 in SE units.
    // Allow 4 of those: 0.15.
    const B = 200_000;
    const r = bootstrapInterval({ ...base, method: 'percentile', resamples: B, statistic: { kind: 'mean', values: MOUSE_TREATMENT } });
    expect(Math.abs(r.se - ideal)).toBeLessThan(0.15);
    // The bootstrap mean of x̄* is x̄ exactly in expectation, so bias is MC noise: |bias| < 4·se/√B.
    expect(Math.abs(r.bias)).toBeLessThan((4 * ideal) / Math.sqrt(B));
  });
});

describe('bootstrapInterval: records and reproducibility', () => {
  const x = ar1(400, 0.5, 3);
  const opts: BootstrapOptions = {
    statistic: { kind: 'mean', values: x },
    resampling: 'moving-block',
    resamplingUnit: 'blocks-of-bins',
    blockLength: 'auto',
    method: 'bca',
    level: 0.95,
    resamples: 999,
    seed: 2024,
  };

  it('same seed → identical result; another seed → different bounds', () => {
    const a = bootstrapInterval(opts);
    const b = bootstrapInterval(opts);
    const c = bootstrapInterval({ ...opts, seed: 2025 });
    expect(b).toEqual(a);
    expect(c.lower).not.toBe(a.lower);
    expect(c.upper).not.toBe(a.upper);
    expect(c.estimate).toBe(a.estimate);
  });

  it('records method, level, resamples, resampling unit, block length and its choice, seed, n', () => {
    const a = bootstrapInterval(opts);
    expect(a).toMatchObject({
      method: 'bca',
      level: 0.95,
      resamples: 999,
      resampling: 'blocks-of-bins',
      scheme: 'moving-block',
      blockLengthChoice: 'auto',
      seed: 2024,
      n: 400,
      excluded: 0,
      undefinedResamples: 0,
    });
    expect(Number.isInteger(a.blockLength)).toBe(true);
    expect(a.blockLength).toBeGreaterThan(1);
    expect(a.lower).toBeLessThan(a.estimate);
    expect(a.upper).toBeGreaterThan(a.estimate);
    const set = bootstrapInterval({ ...opts, blockLength: 7, method: 'percentile' });
    expect(set).toMatchObject({ blockLength: 7, blockLengthChoice: 'set', method: 'percentile' });
    expect(set.acceleration).toBeUndefined();
    const iid = bootstrapInterval({ ...opts, resampling: 'iid', resamplingUnit: 'bins', blockLength: undefined });
    expect(iid).toMatchObject({ blockLength: null, blockLengthChoice: null, resampling: 'bins', scheme: 'iid' });
  });

  it('NaN items are excluded before resampling and counted (the result equals the run without them)', () => {
    const withNaN = Float64Array.from([NaN, ...x.slice(0, 200), NaN, NaN, ...x.slice(200)]);
    const a = bootstrapInterval({ ...opts, statistic: { kind: 'mean', values: withNaN } });
    const b = bootstrapInterval(opts);
    expect(a.excluded).toBe(3);
    expect(a.n).toBe(400);
    expect({ ...a, excluded: 0 }).toEqual(b);
    // Ratio: a NaN in either array drops the pair.
    const num = Float64Array.of(1, NaN, 3, 4, 2, 5);
    const den = Float64Array.of(2, 2, NaN, 4, 4, 6);
    const r = bootstrapInterval({ ...base, statistic: { kind: 'ratio', numerator: num, denominator: den } });
    expect(r.excluded).toBe(2);
    expect(r.estimate).toBeCloseTo(12 / 16, 15); // (1 + 4 + 2 + 5)/(2 + 4 + 4 + 6), by hand
  });

  it('rejects bad options with RangeError', () => {
    const bad: Partial<BootstrapOptions>[] = [
      { level: 1 },
      { level: 0 },
      { resamples: 1 },
      { resamples: 10.5 },
      { resamplingUnit: 'bins' }, // moving-block must be recorded as blocks-of-bins
      { blockLength: 0 },
      { blockLength: 401 },
      { blockLength: 300 }, // BCa with moving blocks needs ℓ ≤ n/2
      { statistic: { kind: 'mean', values: Float64Array.of(1, Infinity, 2) } },
      { statistic: { kind: 'mean', values: Float64Array.of(1, NaN) } }, // one defined item
      { statistic: { kind: 'ratio', numerator: Float64Array.of(1, 2), denominator: Float64Array.of(1) } },
    ];
    for (const b of bad) expect(() => bootstrapInterval({ ...opts, ...b } as BootstrapOptions)).toThrow(RangeError);
    expect(() => bootstrapInterval({ ...opts, resampling: 'iid', resamplingUnit: 'bins', blockLength: 5 })).toThrow(RangeError);
  });
});

describe('bootstrapInterval: sufficient statistics against materialised resamples', () => {
  // The mean/ratio paths sum prefix-sum differences; the function path copies blocks and calls fn.
  // Both consume the generator identically, so the same seed must give the same distribution up to
  // rounding. Block layout by hand for n = 10, ℓ = 4: ⌈10/4⌉ = 3 blocks, starts in [0, 6], the last
  // block truncated to 10 − 2·4 = 2 items.
  const x = Float64Array.of(3, -1, 4, 1.5, 5, 9, -2, 6, 5, 3);
  for (const [resampling, unit, blockLength] of [
    ['moving-block', 'blocks-of-bins', 4],
    ['moving-block', 'blocks-of-bins', 3],
    ['iid', 'bins', undefined],
  ] as const) {
    it(`${resampling}${blockLength ? ` ℓ = ${blockLength}` : ''}: mean path = function path (percentile and BCa)`, () => {
      for (const method of ['percentile', 'bca'] as const) {
        const common = { resampling, resamplingUnit: unit, blockLength, method, level: 0.8, resamples: 500, seed: 5 };
        const viaSums = bootstrapInterval({ ...common, statistic: { kind: 'mean', values: x } });
        const viaFn = bootstrapInterval({ ...common, statistic: { kind: 'function', values: x, fn: meanOf } });
        expect(viaSums.lower).toBeCloseTo(viaFn.lower, 12);
        expect(viaSums.upper).toBeCloseTo(viaFn.upper, 12);
        expect(viaSums.se).toBeCloseTo(viaFn.se, 12);
        if (method === 'bca') expect(viaSums.acceleration).toBeCloseTo(viaFn.acceleration!, 12);
      }
    });
  }

  it('one block of length n reproduces the series: a zero-width interval at the estimate (derived)', () => {
    const r = bootstrapInterval({
      statistic: { kind: 'mean', values: x },
      resampling: 'moving-block',
      resamplingUnit: 'blocks-of-bins',
      blockLength: 10,
      method: 'percentile',
      level: 0.9,
      resamples: 50,
      seed: 1,
    });
    expect(r.lower).toBeCloseTo(3.35, 13);
    expect(r.upper).toBeCloseTo(3.35, 13);
    expect(r.se).toBeLessThan(1e-13);
  });

  it('moving blocks of length 1 are iid resampling: same seed, same distribution (percentile limits equal)', () => {
    // Derived: with ℓ = 1 each of the n blocks starts at rng.int(n − 1 + 1) = rng.int(n), as iid draws.
    const common = { method: 'percentile', level: 0.9, resamples: 300, seed: 4 } as const;
    const iid = bootstrapInterval({ ...common, statistic: { kind: 'mean', values: x }, resampling: 'iid', resamplingUnit: 'bins' });
    const mb1 = bootstrapInterval({
      ...common,
      statistic: { kind: 'function', values: x, fn: meanOf },
      resampling: 'moving-block',
      resamplingUnit: 'blocks-of-bins',
      blockLength: 1,
    });
    expect(mb1.lower).toBeCloseTo(iid.lower, 12);
    expect(mb1.upper).toBeCloseTo(iid.upper, 12);
  });

  it('ratio with unit denominators equals the mean, bit for bit (same draws, Σ1 = n exactly)', () => {
    const common = { ...base, resampling: 'moving-block', resamplingUnit: 'blocks-of-bins', blockLength: 3 } as const;
    const a = bootstrapInterval({ ...common, statistic: { kind: 'mean', values: x } });
    const b = bootstrapInterval({ ...common, statistic: { kind: 'ratio', numerator: x, denominator: new Float64Array(10).fill(1) } });
    expect(b.lower).toBe(a.lower);
    expect(b.upper).toBe(a.upper);
    expect(b.acceleration).toBeCloseTo(a.acceleration!, 14);
  });
});
