/**
 * What `n` and `excluded` count for each activity measure: the items its estimate is over.
 * Per-unit measures: units with a defined value / units without one. Per-bin means: bins.
 * Density: elements (defined cells in the denominator / NaN, ±Infinity and missing cells).
 * Reference: numpy at test time, from the definitions in the README's measure table.
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { createRandom } from '../../src/stats/random.ts';
import { activityDataset } from './one-dataset.ts';

const UNITS = 6;
const BINS = 40;

/** Counts with a silent unit (3), an all-NaN bin (7), scattered NaN and ±Infinity cells. */
function matrix(): { values: Float64Array; code: number[] } {
  const rng = createRandom(11);
  const values = new Float64Array(UNITS * BINS);
  const code: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const u = Math.floor(i / BINS), j = i % BINS;
    let c = 0;
    if (j === 7) c = 1;
    else if (rng.next() < 0.05) c = 1;
    else if (rng.next() < 0.02) c = rng.next() < 0.5 ? 2 : 3;
    values[i] = c === 1 ? NaN : c === 2 ? Infinity : c === 3 ? -Infinity : u === 3 ? 0 : rng.next() < 0.3 ? 1 + rng.int(3) : 0;
    code.push(c);
  }
  return { values, code };
}

const REF = `
v = np.array(inp["values"], dtype=float)
c = np.array(inp["code"])
v[c == 1] = np.nan; v[c == 2] = np.inf; v[c == 3] = -np.inf
x = v.reshape(${UNITS}, ${BINS})
fin = np.isfinite(x)
# density: over elements
dn = int(fin.sum())
dens = float((np.abs(x[fin]) > 0).sum() / dn)
# per unit: Hoyer defined when the unit has a nonzero finite value and n >= 2
hoyer_units = sum(1 for u in range(x.shape[0]) if fin[u].sum() >= 2 and (np.abs(x[u][fin[u]]) > 0).any())
# per bin: population S defined when >= 2 defined units and a nonzero among them
pop_bins = sum(1 for j in range(x.shape[1]) if fin[:, j].sum() >= 2 and (np.abs(x[:, j][fin[:, j]]) > 0).any())
print(json.dumps({"density": [dens, dn, int(x.size - dn)], "hoyer": [hoyer_units, x.shape[0] - hoyer_units], "pop": [pop_bins, x.shape[1] - pop_bins]}))
`;

describe.skipIf(!hasScipy)('n and excluded count the items each estimate is over (numpy)', () => {
  it('density counts elements; per-unit and per-bin measures count units and bins', async () => {
    const { values, code } = matrix();
    const ref = runPython<{ density: [number, number, number]; hoyer: [number, number]; pop: [number, number] }>(REF, { values: Array.from(values, (v) => (Number.isFinite(v) ? v : 0)), code });
    const d = await activityDataset(values, [UNITS, BINS]);
    const dens = d.measures.density!;
    expect(dens.estimate).toBeCloseTo(ref.density[0], 14);
    expect([dens.n, dens.excluded]).toEqual([ref.density[1], ref.density[2]]);
    expect([d.measures.hoyer!.n, d.measures.hoyer!.excluded]).toEqual(ref.hoyer);
    expect([d.measures.population_sparseness!.n, d.measures.population_sparseness!.excluded]).toEqual(ref.pop);
  });
});
