import { describe, expect, it } from 'vitest';
import { activityRatio } from '../../src/metrics/activity-ratio.ts';
import { vinjeGallantSparseness } from '../../src/metrics/vinje-gallant.ts';
import { hoyerSparseness } from '../../src/metrics/hoyer.ts';
import { giniIndex } from '../../src/metrics/gini.ts';
import { excessKurtosis } from '../../src/metrics/kurtosis.ts';
import { skewness } from '../../src/metrics/skewness.ts';
import { density, densityCurve } from '../../src/metrics/density.ts';
import { l0Count, l1Norm, l2Norm } from '../../src/metrics/norms.ts';
import { momentsOf, mergeMoments } from '../../src/metrics/moments.ts';
import { fsum } from '../../src/metrics/fsum.ts';
import { scanValues } from '../../src/metrics/scan-values.ts';
import { populationSparseness } from '../../src/metrics/population-sparseness.ts';
import { lifetimeSparseness } from '../../src/metrics/lifetime-sparseness.ts';
import { graphDensity } from '../../src/metrics/graph-density.ts';
import { makeRng, sample } from './random.ts';

// Project convention (common practice, no source): non-finite input is a caller error, thrown as
// a RangeError that names the function, the index and the value.
const VECTOR_FUNCTIONS: [string, (x: ArrayLike<number>) => unknown][] = [
  ['activityRatio', activityRatio],
  ['vinjeGallantSparseness', vinjeGallantSparseness],
  ['hoyerSparseness', hoyerSparseness],
  ['giniIndex', giniIndex],
  ['excessKurtosis', (x) => excessKurtosis(x)],
  ['skewness', (x) => skewness(x)],
  ['density', (x) => density(x)],
  ['densityCurve', (x) => densityCurve(x, [0, 1])],
  ['l0Count', (x) => l0Count(x)],
  ['l1Norm', l1Norm],
  ['l2Norm', l2Norm],
  ['momentsOf', momentsOf],
  ['fsum', fsum],
];

describe('non-finite input throws with the function, index and value in the message', () => {
  for (const [name, f] of VECTOR_FUNCTIONS) {
    it(name, () => {
      expect(() => f([1, 2, 3, NaN, 5])).toThrow(new RangeError(`${name}: x[3] is NaN; count and remove non-finite values first (scanValues)`));
      expect(() => f(new Float32Array([0, Infinity]))).toThrow(`${name}: x[1] is Infinity`);
      expect(() => f([-Infinity])).toThrow(`${name}: x[0] is -Infinity`);
      // A hole in a plain array is not a number either.
      expect(() => f([1, , 2] as number[])).toThrow(`${name}: x[1] is undefined`);
    });
  }
  it('graphDensity names the cell', () => {
    const m = { rows: 2, cols: 2, data: new Float64Array([0, 1, Infinity, 0]) };
    expect(() => graphDensity(m)).toThrow('graphDensity: matrix cell [row 1, column 0] (data[2]) is Infinity');
  });
});

describe('inputs are never modified', () => {
  const rng = makeRng(1);
  it('frozen plain arrays are accepted (a write would throw in strict-mode ESM)', () => {
    const x = Object.freeze([3, 0, 1, 0, 2, 2, 0.5, -1]);
    for (const [, f] of VECTOR_FUNCTIONS) expect(() => f(x)).not.toThrow();
    expect(() => scanValues(x)).not.toThrow();
  });
  it('typed arrays (cannot be frozen) are unchanged, element for element', () => {
    // Gini and densityCurve sort, momentsOf reads twice: all must work on copies or read-only.
    for (const x of [sample(1000, () => rng.int(5)), sample(1000, rng.normal), Float32Array.from(sample(999, rng.exponential))]) {
      const before = Array.from(x);
      for (const [, f] of VECTOR_FUNCTIONS) f(x);
      expect(Array.from(x)).toEqual(before);
    }
  });
  it('matrices and moment states are unchanged', () => {
    const data = sample(60, () => rng.int(3));
    const before = Array.from(data);
    const m = Object.freeze({ rows: 6, cols: 10, data });
    populationSparseness(m);
    lifetimeSparseness(m);
    graphDensity({ rows: 6, cols: 6, data: data.subarray(0, 36) }, { directed: false });
    expect(Array.from(data)).toEqual(before);
    const a = Object.freeze(momentsOf([1, 2, 3]));
    const b = Object.freeze(momentsOf([10, 20]));
    expect(() => mergeMoments(a, b)).not.toThrow();
  });
});

describe('scanValues counts (hand-counted)', () => {
  it('every category, with and without a tolerance', () => {
    const x = [0, -0, 1, -2, NaN, Infinity, -Infinity, 1e-9, -1e-9, 3];
    // finite: 0, −0, 1, −2, 1e-9, −1e-9, 3 (7); negatives: −2, −1e-9 (−0 is not < 0).
    expect(scanValues(x)).toEqual({ n: 10, nan: 1, posInf: 1, negInf: 1, negative: 2, zero: 2, nonzero: 5 });
    expect(scanValues(x, 1e-6)).toEqual({ n: 10, nan: 1, posInf: 1, negInf: 1, negative: 2, zero: 4, nonzero: 3 });
    expect(scanValues(new Float32Array(0))).toEqual({ n: 0, nan: 0, posInf: 0, negInf: 0, negative: 0, zero: 0, nonzero: 0 });
    expect(() => scanValues(x, NaN)).toThrow(/tolerance/);
  });
});

describe('norms (hand-worked)', () => {
  it('l0, l1, l2 of a small vector and an overflow-prone one', () => {
    expect(l0Count([0, 3, -4, 0])).toBe(2);
    expect(l1Norm([0, 3, -4, 0])).toBe(7);
    expect(l2Norm([0, 3, -4, 0])).toBe(5);
    expect(l2Norm([3e200, -4e200])).toBeCloseTo(5e200, -186); // naive Σx² overflows to Infinity
    expect(l2Norm([3e-200, 4e-200]) / 5e-200).toBeCloseTo(1, 14); // naive Σx² underflows to 0
    expect(l2Norm([])).toBe(0);
  });
});
