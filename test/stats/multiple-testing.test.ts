/** Holm (1979) by hand; Benjamini–Hochberg (1995) by hand and live against scipy.stats.false_discovery_control. */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { benjaminiHochberg, holm } from '../../src/stats/multiple-testing.ts';
import { createRandom } from '../../src/stats/random.ts';

describe('holm', () => {
  it('worked by hand: p = [0.01, 0.04, 0.03, 0.005], m = 4', () => {
    // Sorted: 0.005 (#4), 0.01 (#1), 0.03 (#3), 0.04 (#2); multipliers 4, 3, 2, 1:
    // 0.02, 0.03, 0.06, 0.04 → running max 0.02, 0.03, 0.06, 0.06.
    const r = holm([0.01, 0.04, 0.03, 0.005]);
    [0.03, 0.06, 0.06, 0.02].forEach((v, i) => expect(r[i]).toBeCloseTo(v, 15));
  });
  it('caps at 1, keeps a single p, empty gives empty, refuses NaN and values outside [0, 1]', () => {
    // [0.4, 0.5]: 2·0.4 = 0.8, 1·0.5 = 0.5 → max 0.8 (derived).
    expect(holm([0.4, 0.5])).toEqual([0.8, 0.8]);
    // [0.3, 0.6, 0.9]: 3·0.3 = 0.9, 2·0.6 = 1.2 → capped 1, 1·0.9 → running max 1.
    const c = holm([0.3, 0.6, 0.9]);
    expect(c[0]).toBeCloseTo(0.9, 15);
    expect(c.slice(1)).toEqual([1, 1]);
    expect(holm([0.2])).toEqual([0.2]);
    expect(holm([])).toEqual([]);
    expect(() => holm([0.1, NaN])).toThrow(/p\[1\]/);
    expect(() => holm([1.2])).toThrow(RangeError);
  });
});

describe('benjaminiHochberg', () => {
  it('worked by hand: p = [0.01, 0.04, 0.03, 0.005], m = 4', () => {
    // Sorted 0.005, 0.01, 0.03, 0.04 with ranks 1..4: m·p/rank = 0.02, 0.02, 0.04, 0.04;
    // running min from the top: 0.04, 0.04, 0.02, 0.02.
    const r = benjaminiHochberg([0.01, 0.04, 0.03, 0.005]);
    [0.02, 0.04, 0.04, 0.02].forEach((v, i) => expect(r[i]).toBeCloseTo(v, 15));
  });
  it('is never above Holm (step-up FDR vs step-down FWER; Benjamini & Hochberg 1995 §3)', () => {
    const rng = createRandom(3);
    const p = Array.from({ length: 30 }, () => rng.next() ** 2);
    const h = holm(p);
    benjaminiHochberg(p).forEach((v, i) => expect(v).toBeLessThanOrEqual(h[i] + 1e-15));
  });
});

describe.skipIf(!hasScipy)('benjaminiHochberg against scipy.stats.false_discovery_control(method="bh") (live)', () => {
  it('agrees to 1e-15 on random p-values with ties, of several lengths', () => {
    const rng = createRandom(99);
    const sets = [5, 17, 100].map((m) => Array.from({ length: m }, () => Math.round(rng.next() ** 3 * 200) / 200));
    const ref = runPython<number[][]>(
      'from scipy import stats\nprint(json.dumps([stats.false_discovery_control(np.array(p), method="bh").tolist() for p in inp]))',
      sets,
    );
    sets.forEach((p, k) => benjaminiHochberg(p).forEach((v, i) => expect(v).toBeCloseTo(ref[k][i], 15)));
  });
});
