import { describe, expect, it } from 'vitest';
import {
  emptyMoments,
  kurtosisFromMoments,
  mergeMoments,
  momentsOf,
  skewnessFromMoments,
  varianceFromMoments,
  type Moments,
} from '../../src/metrics/moments.ts';
import { fsum } from '../../src/metrics/fsum.ts';
import { hasScipy, runPython } from '../helpers/python.ts';
import { expectClose, makeRng, sample } from './random.ts';

/** NIST StRD NumAcc4 (Simon & Lesage 1989), as described in reference-values. */
function numAcc4(): Float64Array {
  const x = new Float64Array(1001);
  x[0] = 10000000.2;
  for (let i = 0; i < 500; i++) {
    x[1 + 2 * i] = 10000000.1;
    x[2 + 2 * i] = 10000000.3;
  }
  return x;
}

describe('NIST StRD univariate certified values (reference-values, confirmed)', () => {
  it('NumAcc1: mean 10000002, s = 1', () => {
    const m = momentsOf([10000001, 10000003, 10000002]);
    expect(m.mean).toBe(10000002);
    expect(Math.sqrt(varianceFromMoments(m)!)).toBe(1);
  });
  it('NumAcc4: mean 10000000.2 and s = 0.1 to 1e-8 relative', () => {
    const m = momentsOf(numAcc4());
    expectClose(m.mean, 10000000.2, 1e-15, 0, 'mean');
    // The residual error is decimal-to-binary rounding of the inputs (reference-values).
    expectClose(Math.sqrt(varianceFromMoments(m)!), 0.1, 1e-8, 0, 's');
  });
  it('the naive one-pass Σx² − n·x̄² variance is badly wrong on NumAcc4', () => {
    // The textbook one-pass formula, written out here only to show it failing.
    const x = numAcc4();
    let sx = 0;
    let sxx = 0;
    for (const v of x) { sx += v; sxx += v * v; }
    const naive = (sxx - (sx * sx) / x.length) / (x.length - 1);
    const good = varianceFromMoments(momentsOf(x))!;
    // True s² = 0.01. The naive result is negative or off by far more than 100 %.
    expect(naive < 0 || Math.abs(naive - 0.01) > 0.01).toBe(true);
    expectClose(good, 0.01, 2e-8, 0);
  });
});

describe('chunked equals whole: mergeMoments (Chan, Golub & LeVeque 1979; Pébay 2008)', () => {
  /** Split x into random-length chunks (some of length 0 or 1) and merge their moments. */
  function mergedOverChunks(x: Float64Array, rng: ReturnType<typeof makeRng>): Moments {
    let acc = emptyMoments();
    let i = 0;
    while (i < x.length) {
      const len = rng.uniform() < 0.1 ? rng.int(2) : 1 + rng.int(Math.max(1, x.length / 5));
      acc = mergeMoments(acc, momentsOf(x.subarray(i, i + len)));
      i += len;
    }
    return acc;
  }
  /** m2 relative; m3, m4 relative to the scale they are built from (m3 can be near 0 for symmetric data). */
  function expectSameMoments(a: Moments, b: Moments, label: string): void {
    expect(a.n).toBe(b.n);
    const sd = Math.sqrt(b.m2 / b.n);
    expectClose(a.mean, b.mean, 1e-15, 1e-13 * sd, `${label} mean`);
    expectClose(a.m2, b.m2, 1e-12, 0, `${label} m2`);
    expectClose(a.m3, b.m3, 1e-12, 1e-12 * b.n * sd ** 3, `${label} m3`);
    expectClose(a.m4, b.m4, 1e-12, 0, `${label} m4`);
    expectClose(kurtosisFromMoments(a), kurtosisFromMoments(b)!, 1e-11, 1e-12, `${label} g2`);
    expectClose(skewnessFromMoments(a), skewnessFromMoments(b)!, 1e-11, 1e-12, `${label} g1`);
  }
  const rng = makeRng(1979);
  const datasets: [string, Float64Array][] = [
    ['normal', sample(10_000, rng.normal)],
    ['1e7 + normal noise', sample(10_000, () => 1e7 + rng.normal())],
    ['1e7 + exponential noise × 1e-3', sample(5_000, () => 1e7 + 1e-3 * rng.exponential())],
    ['sparse counts (70 % zeros)', sample(20_000, () => (rng.uniform() < 0.7 ? 0 : 1 + rng.int(9)))],
    ['Laplace, short', sample(37, rng.laplace)],
  ];
  for (const [name, x] of datasets) {
    it(`${name}: random chunks merged = momentsOf(whole) to ~1e-12`, () => {
      for (let rep = 0; rep < 3; rep++) expectSameMoments(mergedOverChunks(x, rng), momentsOf(x), name);
    });
    it(`${name}: two "workers'" halves, each merged over its chunks, then merged`, () => {
      const cut = rng.int(x.length);
      const left = mergedOverChunks(x.subarray(0, cut), rng);
      const right = mergedOverChunks(x.subarray(cut), rng);
      expectSameMoments(mergeMoments(left, right), momentsOf(x), name);
      expectSameMoments(mergeMoments(right, left), momentsOf(x), `${name} (reversed)`);
    });
  }
  it('one value at a time (n = 1 states) equals the two-pass result', () => {
    const x = sample(3000, () => 1e7 + rng.normal());
    let acc = emptyMoments();
    for (const v of x) acc = mergeMoments(acc, { n: 1, mean: v, m2: 0, m3: 0, m4: 0 });
    expectSameMoments(acc, momentsOf(x), 'one-at-a-time');
  });
  it('the empty state is the identity, and constant chunks merge to exactly zero variance', () => {
    const m = momentsOf([1, 2, 4]);
    expect(mergeMoments(emptyMoments(), m)).toEqual(m);
    expect(mergeMoments(m, emptyMoments())).toEqual(m);
    const c = mergeMoments(momentsOf([0.1, 0.1]), momentsOf([0.1, 0.1, 0.1]));
    expect(c).toEqual({ n: 5, mean: 0.1, meanLo: 0, m2: 0, m3: 0, m4: 0 });
    expect(kurtosisFromMoments(c)).toBeNull();
  });
});

describe.skipIf(!hasScipy)('momentsOf against numpy/scipy (live)', () => {
  it('mean, m2, m3, m4 as sums agree with scipy.stats.moment × n', () => {
    const rng = makeRng(8);
    const x = Array.from(sample(4000, () => 250 + 30 * rng.exponential()));
    const ref = runPython<number[]>(
      `from scipy import stats
a = np.array(inp)
print(json.dumps([float(a.mean())] + [float(stats.moment(a, k) * a.size) for k in (2, 3, 4)]))`,
      x,
    );
    const m = momentsOf(x);
    expectClose(m.mean, ref[0], 1e-14, 0, 'mean');
    expectClose(m.m2, ref[1], 1e-12, 0, 'm2');
    expectClose(m.m3, ref[2], 1e-12, 0, 'm3');
    expectClose(m.m4, ref[3], 1e-12, 0, 'm4');
  });
});

describe('fsum (Neumaier 1974)', () => {
  it('recovers what a naive loop loses (derived by hand)', () => {
    // 1e100 + 1 rounds to 1e100, then − 1e100 gives 0 naively; the compensation keeps the 1.
    expect(fsum([1e100, 1, -1e100])).toBe(1);
    expect(fsum([1, 1e100, 1, -1e100])).toBe(2);
    expect(fsum(new Float64Array(10).fill(0.1))).toBe(1); // naive left-to-right gives 0.9999999999999999
  });
  it.skipIf(!hasScipy)('matches Python math.fsum (Shewchuk, exactly rounded) on ill-conditioned data (live)', () => {
    const rng = makeRng(3);
    const x = Array.from(sample(5000, () => (rng.uniform() - 0.5) * 10 ** rng.int(12)));
    const ref = runPython<number>('import math\nprint(json.dumps(math.fsum(inp)))', x);
    expectClose(fsum(x), ref, 4e-16, 0);
  });
});
