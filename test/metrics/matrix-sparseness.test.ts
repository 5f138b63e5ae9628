import { describe, expect, it } from 'vitest';
import { Matrix } from 'ml-matrix';
import { populationSparseness } from '../../src/metrics/population-sparseness.ts';
import { lifetimeSparseness } from '../../src/metrics/lifetime-sparseness.ts';
import type { DenseMatrix } from '../../src/types.ts';
import { hasScipy, runPython } from '../helpers/python.ts';
import { expectClose, makeRng, sample } from './random.ts';

// Hand-worked 3 units × 4 bins (rows = units, cols = bins):
//   unit 0: [0, 0, 0, 4]   lifetime S = 1        (reference-values row [0,0,0,4])
//   unit 1: [1, 2, 3, 4]   lifetime S = 2/9      (reference-values row [1,2,3,4])
//   unit 2: [0, 0, 0, 0]   silent → undefined
// Bins (columns, across the 3 units): [0,1,0], [0,2,0], [0,3,0] → one active of 3 → S = 1;
//   [4,4,0] → a = 64/(3·32) = 2/3, S = (1 − 2/3)/(1 − 1/3) = 1/2.
const HAND: DenseMatrix = { rows: 3, cols: 4, data: new Float64Array([0, 0, 0, 4, 1, 2, 3, 4, 0, 0, 0, 0]) };

describe('population vs lifetime sparseness (Willmore & Tolhurst 2001 axes; hand-worked)', () => {
  it('population: per bin across units', () => {
    const p = populationSparseness(HAND);
    expect(Array.from(p.perBin)).toHaveLength(4);
    [1, 1, 1, 0.5].forEach((v, j) => expectClose(p.perBin[j], v, 1e-14, 1e-15, `bin ${j}`));
    expectClose(p.mean, 3.5 / 4, 1e-14);
    expectClose(p.median, 1, 1e-14);
    expect(p).toMatchObject({ defined: 4, undefined: 0, negativeBins: 0 });
  });
  it('lifetime: per unit across bins; the silent unit is undefined (NaN) and left out of mean/median', () => {
    const l = lifetimeSparseness(HAND);
    expectClose(l.perUnit[0], 1, 1e-14);
    expectClose(l.perUnit[1], 2 / 9, 1e-14);
    expect(l.perUnit[2]).toBeNaN();
    expect(l).toMatchObject({ defined: 2, undefined: 1, negativeUnits: 0 });
    expectClose(l.mean, (1 + 2 / 9) / 2, 1e-14);
    expectClose(l.median, (1 + 2 / 9) / 2, 1e-14); // even count: mean of the middle two
  });
  it('lifetime of M equals population of Mᵀ (the axes are the only difference)', () => {
    const rng = makeRng(5);
    const rows = 13, cols = 29;
    const data = sample(rows * cols, () => (rng.uniform() < 0.5 ? 0 : rng.exponential()));
    const t = new Float64Array(rows * cols);
    for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) t[j * rows + i] = data[i * cols + j];
    const l = lifetimeSparseness({ rows, cols, data });
    const p = populationSparseness({ rows: cols, cols: rows, data: t });
    expect(Array.from(l.perUnit)).toEqual(Array.from(p.perBin));
  });
  it('no defined bins → mean and median null; one unit → every bin undefined', () => {
    const zeros = populationSparseness({ rows: 4, cols: 3, data: new Float32Array(12) });
    expect(zeros).toMatchObject({ mean: null, median: null, defined: 0, undefined: 3 });
    const oneUnit = populationSparseness({ rows: 1, cols: 3, data: new Float64Array([1, 2, 3]) });
    expect(oneUnit).toMatchObject({ mean: null, defined: 0, undefined: 3 });
  });
  it('negative cells are counted and not clipped (S > 1 possible)', () => {
    // bin 0 across units: [1, −1] → Σ = 0, a = 0, S = (1 − 0)/(1 − 1/2) = 2.
    const m = { rows: 2, cols: 2, data: new Float64Array([1, 3, -1, 3]) };
    const p = populationSparseness(m);
    expectClose(p.perBin[0], 2, 1e-15);
    expect(p.negativeBins).toBe(1);
    expect(lifetimeSparseness(m).negativeUnits).toBe(1);
  });
  it('non-finite cells throw naming row and column', () => {
    const m = { rows: 2, cols: 3, data: new Float64Array([0, 1, 2, 3, NaN, 5]) };
    expect(() => populationSparseness(m)).toThrow(/populationSparseness: matrix cell \[row 1, column 1\] \(data\[4\]\) is NaN/);
    expect(() => lifetimeSparseness(m)).toThrow(/lifetimeSparseness: matrix cell \[row 1, column 1\]/);
  });
  it('accepts an ml-matrix Matrix (same answer as the DenseMatrix)', () => {
    const ml = new Matrix([[0, 0, 0, 4], [1, 2, 3, 4], [0, 0, 0, 0]]);
    expect(Array.from(populationSparseness(ml).perBin)).toEqual(Array.from(populationSparseness(HAND).perBin));
    expect(Array.from(lifetimeSparseness(ml).perUnit)).toEqual(Array.from(lifetimeSparseness(HAND).perUnit));
  });
  it('extreme magnitudes (1e200 spikes) do not overflow', () => {
    const scaled = { ...HAND, data: HAND.data.map((v) => v * 1e200) };
    expectClose(populationSparseness(scaled).perBin[3], 0.5, 1e-14);
    expectClose(lifetimeSparseness(scaled).perUnit[1], 2 / 9, 1e-14);
  });
});

describe.skipIf(!hasScipy)('population and lifetime sparseness against numpy (live)', () => {
  it('Vinje–Gallant S per column and per row, and nanmean / nanmedian of the defined values', () => {
    const rng = makeRng(2000);
    const rows = 40, cols = 300;
    // Poisson-like spike counts, 80 % of bins silent for every unit, unit 3 silent throughout.
    const data = sample(rows * cols, () => (rng.uniform() < 0.8 ? 0 : 1 + Math.floor(rng.exponential() * 2)));
    data.fill(0, 3 * cols, 4 * cols);
    const ref = runPython<{ pop: (number | null)[]; life: (number | null)[]; pm: number; pmed: number; lm: number; lmed: number }>(
      `x = np.array(inp["x"], dtype=np.float64).reshape(inp["r"], inp["c"])
def S(x, axis):
    n = x.shape[axis]
    with np.errstate(invalid="ignore", divide="ignore"):
        a = x.sum(axis) ** 2 / (n * (x ** 2).sum(axis))
        return (1 - a) / (1 - 1 / n)
p, l = S(x, 0), S(x, 1)
nul = lambda v: [None if np.isnan(t) else float(t) for t in v]
print(json.dumps(dict(pop=nul(p), life=nul(l), pm=float(np.nanmean(p)), pmed=float(np.nanmedian(p)),
                      lm=float(np.nanmean(l)), lmed=float(np.nanmedian(l)))))`,
      { x: Array.from(data), r: rows, c: cols },
    );
    const p = populationSparseness({ rows, cols, data });
    const l = lifetimeSparseness({ rows, cols, data });
    ref.pop.forEach((v, j) => (v === null ? expect(p.perBin[j]).toBeNaN() : expectClose(p.perBin[j], v, 1e-12, 1e-14, `bin ${j}`)));
    ref.life.forEach((v, i) => (v === null ? expect(l.perUnit[i]).toBeNaN() : expectClose(l.perUnit[i], v, 1e-12, 1e-14, `unit ${i}`)));
    expect(l.undefined).toBe(1);
    expectClose(p.mean, ref.pm, 1e-12);
    expectClose(p.median, ref.pmed, 1e-12);
    expectClose(l.mean, ref.lm, 1e-12);
    expectClose(l.median, ref.lmed, 1e-12);
  });
});
