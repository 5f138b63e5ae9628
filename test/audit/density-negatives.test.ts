/**
 * Density under each `negatives` policy, on ΔF/F-like traces (baseline noise around 0, so about
 * half the values are negative, with a few positive transients). The README defines density on
 * the values: the fraction of defined elements with |x| above the zero tolerance, whatever the
 * policy (the policy applies to the measures that assume non-negative responses). Reference:
 * numpy at test time on the same matrix.
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { createRandom } from '../../src/stats/random.ts';
import { activityDataset } from './one-dataset.ts';

const UNITS = 8;
const BINS = 120;
const TOL = 0.05;

function dffLike(): Float64Array {
  const rng = createRandom(5);
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rng.next())) * Math.cos(2 * Math.PI * rng.next());
  const x = new Float64Array(UNITS * BINS);
  for (let i = 0; i < x.length; i++) x[i] = 0.1 * gauss() + (rng.next() < 0.05 ? 1 + rng.next() : 0);
  for (let u = 0; u < UNITS; u++) x[u * BINS + 3] = 0; // exact zeros, which shift would make nonzero
  x[2 * BINS + 9] = NaN;
  return x;
}

describe.skipIf(!hasScipy)('density is of the raw values under every negatives policy (numpy)', () => {
  it('keep, rectify, shift and refuse give numpy\'s raw density and the same n', async () => {
    const x = dffLike();
    const ref = runPython<[number, number]>(
      `x = np.array([np.nan if v is None else v for v in inp["x"]])\nf = x[np.isfinite(x)]\n` +
      `print(json.dumps([float((np.abs(f) > inp["tol"]).sum() / f.size), int(f.size)]))`,
      { x: Array.from(x, (v) => (Number.isFinite(v) ? v : null)), tol: TOL },
    );
    for (const policy of ['keep', 'rectify', 'shift', 'refuse'] as const) {
      const d = await activityDataset(x, [UNITS, BINS], `zero_tolerance: ${TOL}\nnegatives: ${policy}`);
      const m = d.measures.density!;
      expect(m.estimate, policy).toBeCloseTo(ref[0], 14);
      expect(m.n, policy).toBe(ref[1]);
    }
  });
});
