/**
 * Per-unit moments of the fused pass on values sitting on a large offset (noise sd 2 on 1e7 and
 * 1e9, as in calcium traces with a baseline or counts on a pedestal). Reference: the exact
 * rational mean, skewness g1 and excess kurtosis g2 of the same float64 values, computed with
 * Python's `fractions` (g1 and g2 as defined by Joanes & Gill 1998: biased moments m_r = Σ(x − x̄)^r / n).
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { mulberry32, normal, runPass, type Matrix } from './activity-pass-fixtures.ts';

const BINS = 3000;
const OFFSETS = [1e3, 1e7, 1e9, -1e9, 1e9];

function offsetMatrix(): Matrix {
  const gauss = normal(mulberry32(17));
  const values: number[] = [];
  const code: number[] = [];
  for (const c of OFFSETS) for (let j = 0; j < BINS; j++) { values.push(c + 2 * gauss()); code.push(0); }
  // The last row has a NaN cell, so it takes the classifying loop (and the moments loop with checks).
  code[(OFFSETS.length - 1) * BINS + 5] = 1;
  return { units: OFFSETS.length, bins: BINS, values, code } as Matrix;
}

const EXACT = `
from fractions import Fraction as F
out = []
for row in inp:
    x = [F(v) for v in row]
    n = len(x)
    mean = sum(x) / n
    d = [v - mean for v in x]
    m2 = sum(t * t for t in d) / n
    m3 = sum(t ** 3 for t in d) / n
    m4 = sum(t ** 4 for t in d) / n
    out.append([float(mean), float(m4 / (m2 * m2) - 3), float(m3 * m3 / (m2 ** 3))])
print(json.dumps(out))
`;

describe.skipIf(!hasScipy)('fused pass moments at large offsets (exact rationals, Python fractions)', () => {
  it('mean, skewness and kurtosis of each unit match the exact values', () => {
    const m = offsetMatrix();
    const rows = OFFSETS.map((_, u) => m.values.slice(u * BINS, (u + 1) * BINS).filter((_, j) => m.code[u * BINS + j] === 0));
    // [mean, g2, g1²] exactly; g1 from g1² keeps the reference rational until the end.
    const exact = runPython<[number, number, number][]>(EXACT, rows);
    const r = runPass(m, { zeroTolerance: 0, negatives: 'keep', events: null, minNonzero: 3 }, 'f64', 2);
    const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
    const errs = OFFSETS.map((c, u) => ({
      offset: c,
      mean: rel(r.unit.mean[u], exact[u][0]),
      g2: rel(r.unit.kurtosis[u], exact[u][1]),
      g1: Math.abs(Math.abs(r.unit.skewness[u]) - Math.sqrt(exact[u][2])),
    }));
    // Bounds: with the mean corrected by Σ(x − x̄) the exact d = x − x̄ leave only rounding in the
    // power sums; g2 of Gaussian noise is near 0, so its relative error is large for its size
    // (measured ≤ 2.4e-12; with the plain Σx/n mean 1.7e-8 at 1e7 and 6.4e-7 at 1e9). g1 is near
    // 0 too and is compared in absolute terms (measured ≤ 3e-16; before, up to 2.5e-6).
    for (const e of errs) {
      expect(e.mean, `mean at offset ${e.offset}`).toBeLessThan(1e-15);
      expect(e.g2, `g2 at offset ${e.offset}`).toBeLessThan(1e-10);
      expect(e.g1, `g1 at offset ${e.offset}`).toBeLessThan(1e-12);
    }
  });
});
