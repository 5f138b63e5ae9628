/**
 * Event bins (x > median + k · 1.4826 · MAD): against numpy live, on planted events, and by hand.
 */
import { describe, expect, it } from 'vitest';
import { errorFunction } from 'simple-statistics';
import { hasScipy, runPython } from '../helpers/python.ts';
import { createActivityPass, finishActivityPass, type ActivityPassOptions } from '../../src/metrics/activity-pass.ts';
import { close, mixedMatrix, mulberry32, normal, runPass } from './activity-pass-fixtures.ts';

describe.skipIf(!hasScipy)('event detection vs numpy (live)', () => {
  // numpy's median (mean of the two middle values for even counts) and median(|x − median|),
  // scaled by 1.4826 as the module states; counts of defined cells above the threshold.
  const PY = `
U, B, k, w = inp['units'], inp['bins'], inp['k'], inp['window']
vals = np.array(inp['values'], dtype=float).reshape(U, B)
code = np.array(inp['code']).reshape(U, B)
defined = code == 0
med, sd, cnt = [], [], []
bev = np.zeros(B, int); bdef = np.zeros(B, int)
for u in range(U):
    win = np.zeros(B, bool); win[w[0]:w[1]] = True
    v = vals[u][defined[u] & win]
    if len(v) == 0:
        med.append(None); sd.append(None); cnt.append(-1); continue
    m = float(np.median(v)); s = 1.4826 * float(np.median(np.abs(v - m)))
    med.append(m); sd.append(s)
    if s == 0: cnt.append(-1); continue
    ev = defined[u] & (vals[u] > m + k * s)
    cnt.append(int(ev.sum())); bev += ev; bdef += defined[u]
print(json.dumps({'med': med, 'sd': sd, 'cnt': cnt, 'bev': bev.tolist(), 'bdef': bdef.tolist()}))
`;
  const m = mixedMatrix(5);
  for (const window of [null, [50, 201]] as const) {
    it(`median, robust SD and event bins per unit and per bin, window ${window ? window.join('–') : 'whole row'}`, () => {
      const opts: ActivityPassOptions = { zeroTolerance: 0, negatives: 'keep', minNonzero: 3, events: window ? { k: 2.5, baselineBins: [window[0], window[1]] } : { k: 2.5 } };
      const r = runPass(m, opts, 'f64', 6);
      const ref = runPython<{ med: (number | null)[]; sd: (number | null)[]; cnt: number[]; bev: number[]; bdef: number[] }>(PY, {
        ...m, k: 2.5, window: window ?? [0, m.bins],
      });
      const ev = r.events!;
      const bad: string[] = [];
      for (let u = 0; u < m.units; u++) {
        if (!close(ev.unitMedian[u], ref.med[u])) bad.push(`median[${u}] ${ev.unitMedian[u]} vs ${ref.med[u]}`);
        if (!close(ev.unitRobustSd[u], ref.sd[u])) bad.push(`sd[${u}] ${ev.unitRobustSd[u]} vs ${ref.sd[u]}`);
      }
      expect(bad).toEqual([]);
      expect(Array.from(ev.unitEvents)).toEqual(ref.cnt);
      expect(Array.from(ev.binEvents)).toEqual(ref.bev);
      expect(Array.from(ev.binDefined)).toEqual(ref.bdef);
      expect(ev.undefinedUnits).toBe(ref.cnt.filter((c) => c < 0).length);
    });
  }
});

describe('planted events in Gaussian noise are found at the planted rate', () => {
  // 40 units × 5,000 bins of N(0, 1) noise (seeded), 2% of cells raised by +8 (8 σ).
  const units = 40, bins = 5000, p = 0.02, amp = 8, k = 3;
  const rand = mulberry32(2024);
  const gauss = normal(rand);
  const data = new Float64Array(units * bins);
  const planted = new Uint8Array(units * bins);
  for (let i = 0; i < data.length; i++) {
    data[i] = gauss();
    if (rand() < p) {
      planted[i] = 1;
      data[i] += amp;
    }
  }
  const pass = createActivityPass({ units, bins }, { zeroTolerance: 0, negatives: 'keep', minNonzero: 3, events: { k } });
  for (let u = 0; u < units; u += 8) pass.addBlock({ unitStart: u, units: 8, bins, data: data.subarray(u * bins, (u + 8) * bins) });
  const ev = finishActivityPass(pass.state()).events!;

  it('every planted event is detected (a miss needs noise below −4.9 σ, P ≈ 5e-7 a cell)', () => {
    let plantedN = 0, hit = 0;
    for (let u = 0; u < units; u++) {
      const thr = ev.unitMedian[u] + k * ev.unitRobustSd[u];
      for (let j = 0; j < bins; j++) {
        const i = u * bins + j;
        if (planted[i]) {
          plantedN++;
          if (data[i] > thr) hit++;
        }
      }
    }
    expect(plantedN).toBeGreaterThan(3500); // ≈ 0.02 × 200,000 = 4,000
    expect(hit).toBe(plantedN);
  });

  it('event density = planted + expected false positives, within 4 binomial SDs', () => {
    // Derivation. Given unit u's threshold t_u = m_u + 3σ̂_u, each of its n_u unplanted cells is
    // N(0, 1) and exceeds t_u with q_u = P(Z > t_u) = ½(1 − erf(t_u/√2)) (errorFunction from
    // simple-statistics, error < 1.2e-7). The cells are independent, so the number of false
    // positives has mean Σ n_u q_u and variance Σ n_u q_u(1 − q_u); thresholds depend on each
    // cell only through the median and MAD of 5,000 values (weight ~1/5,000), which we neglect.
    // With every planted cell detected (above), the event density over all cells must lie within
    // 4 SDs (two-sided chance of a false failure ≈ 6e-5) of (planted + Σ n_u q_u) / N.
    let plantedN = 0, mean = 0, variance = 0;
    for (let u = 0; u < units; u++) {
      let unplanted = 0;
      for (let j = 0; j < bins; j++) if (planted[u * bins + j]) plantedN++;
      else unplanted++;
      const t = ev.unitMedian[u] + k * ev.unitRobustSd[u];
      const q = 0.5 * (1 - errorFunction(t / Math.SQRT2));
      mean += unplanted * q;
      variance += unplanted * q * (1 - q);
    }
    const N = units * bins;
    let detected = 0;
    for (let j = 0; j < bins; j++) detected += ev.binEvents[j];
    const density = detected / N;
    const expectedDensity = (plantedN + mean) / N;
    const tol = (4 * Math.sqrt(variance)) / N;
    expect(Math.abs(density - expectedDensity)).toBeLessThanOrEqual(tol);
    // Sanity of the derivation's inputs: σ̂ ≈ 1 (slightly above: the 2% planted cells widen the MAD).
    for (let u = 0; u < units; u++) expect(ev.unitRobustSd[u]).toBeGreaterThan(0.95);
    for (let u = 0; u < units; u++) expect(ev.unitRobustSd[u]).toBeLessThan(1.1);
    // Per bin, density = events / defined units (every unit defined in every bin here).
    for (let j = 0; j < 5; j++) expect(ev.binDensity[j]).toBe(ev.binEvents[j] / units);
  });
});

describe('event density and event population sparseness, by hand', () => {
  // Row [−1, 0, 1, 0.5, 10]: sorted [−1, 0, 0.5, 1, 10] → median 0.5; |x − 0.5| sorted
  // [0.5, 0.5, 0.5, 1.5, 9.5] → MAD 0.5, σ̂ = 0.7413; k = 3 → threshold 2.7239: only the 10.
  // u1 and u2 hold the same values with the 10 in bin 0; u3 = [0, 0, 0, 0, 5] has MAD 0 → no
  // threshold, left out. Per bin, n = 3 units: events [2, 0, 0, 0, 1] → density [2/3, 0, 0, 0, 1/3];
  // binary S = (n − k)/(n − 1) (reference-values.md): bin 0 → 1/2, bin 4 → 1, others k = 0 → undefined.
  const rows = [
    [-1, 0, 1, 0.5, 10],
    [10, 0, 1, 0.5, -1],
    [10, 0, 1, 0.5, -1],
    [0, 0, 0, 0, 5],
  ];
  it('counts, density and S', () => {
    const pass = createActivityPass({ units: 4, bins: 5 }, { zeroTolerance: 0, negatives: 'keep', minNonzero: 0, events: { k: 3 } });
    pass.addBlock({ unitStart: 0, units: 4, bins: 5, data: Float32Array.from(rows.flat()) });
    const ev = finishActivityPass(pass.state()).events!;
    expect(Array.from(ev.unitMedian)).toEqual([0.5, 0.5, 0.5, 0]);
    expect(ev.unitRobustSd[0]).toBeCloseTo(0.7413, 12);
    expect(Array.from(ev.unitEvents)).toEqual([1, 1, 1, -1]);
    expect(ev.undefinedUnits).toBe(1);
    expect(Array.from(ev.binDefined)).toEqual([3, 3, 3, 3, 3]);
    expect(Array.from(ev.binEvents)).toEqual([2, 0, 0, 0, 1]);
    expect(Array.from(ev.binDensity)).toEqual([2 / 3, 0, 0, 0, 1 / 3]);
    expect(Array.from(ev.binPopulationSparseness)).toEqual([0.5, NaN, NaN, NaN, 1]);
  });
});
