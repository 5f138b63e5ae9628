/** quantileSorted: Hyndman & Fan type 7, by hand and against numpy.quantile (live, method 'linear'). */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { quantileSorted } from '../../src/stats/quantile.ts';

describe('quantileSorted', () => {
  it('by hand: [1, 2, 3, 4] at p = 0.5 → h = 1.5 → 2 + 0.5·(3 − 2) = 2.5; p = 0.1 → h = 0.3 → 1.3', () => {
    const x = Float64Array.of(1, 2, 3, 4);
    expect(quantileSorted(x, 0.5)).toBe(2.5);
    expect(quantileSorted(x, 0.1)).toBeCloseTo(1.3, 15);
    expect(quantileSorted(x, 0)).toBe(1);
    expect(quantileSorted(x, 1)).toBe(4);
  });
  it('rejects p outside [0, 1] and empty input', () => {
    expect(() => quantileSorted(Float64Array.of(1), 1.5)).toThrow(RangeError);
    expect(() => quantileSorted(new Float64Array(0), 0.5)).toThrow(RangeError);
  });
  it.skipIf(!hasScipy)('agrees with numpy.quantile (default linear method) on 101 levels', () => {
    const x = Float64Array.from([3.2, -1, 7, 7, 0, 2.5, 11, -4.25, 9, 0.5, 6]).sort();
    const ps = Array.from({ length: 101 }, (_, i) => i / 100);
    const ref = runPython<number[]>(
      'x = np.array(inp["x"]); print(json.dumps(np.quantile(x, inp["p"]).tolist()))',
      { x: Array.from(x), p: ps },
    );
    ps.forEach((p, i) => expect(quantileSorted(x, p)).toBeCloseTo(ref[i], 12));
  });
});
