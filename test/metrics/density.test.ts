import { describe, expect, it } from 'vitest';
import { Matrix } from 'ml-matrix';
import { density, densityCurve } from '../../src/metrics/density.ts';
import { graphDensity } from '../../src/metrics/graph-density.ts';
import { l0Count } from '../../src/metrics/norms.ts';
import { hasScipy, runPython } from '../helpers/python.ts';
import { makeRng, sample } from './random.ts';

describe('density = ℓ0 / n (hand-worked examples)', () => {
  it('counts |x| > tolerance; negatives by magnitude; empty → null, all-zero → 0', () => {
    expect(density([0, 0.5, 0, -2])).toBe(0.5); // 2 of 4 nonzero
    expect(density([0, 0.5, 0, -2], { tolerance: 0.5 })).toBe(0.25); // only |−2| > 0.5
    expect(density([0, -0, 0])).toBe(0); // defined: nothing active
    expect(density([])).toBeNull(); // 0/0
    expect(l0Count([1e-300, -1e-300, 0])).toBe(2);
    expect(() => density([1], { tolerance: -1 })).toThrow(RangeError);
  });
  it('densityCurve at the example thresholds (hand: |x| = 0, 0.5, 0, 2)', () => {
    expect(densityCurve([0, 0.5, 0, -2], [0, 0.5, 1, 2, -1, Infinity])).toEqual([0.5, 0.25, 0.25, 0, 1, 0]);
    expect(densityCurve([], [0, 1])).toEqual([null, null]);
    expect(() => densityCurve([1], [NaN])).toThrow(/thresholds\[0\]/);
  });
});

describe.skipIf(!hasScipy)('density and densityCurve against numpy (live)', () => {
  it('fraction with |x| > t for many thresholds, with ties at the thresholds', () => {
    const rng = makeRng(42);
    // Weights rounded to 3 decimals so many values tie exactly with the thresholds below.
    const x = Array.from(sample(20_000, () => (rng.uniform() < 0.6 ? 0 : Math.round(rng.laplace() * 1000) / 1000)));
    const thresholds = [-1, 0, 0.001, 0.01, 0.1, 0.25, 0.5, 1, 2, 5, 10];
    const ref = runPython<number[]>(
      'x = np.abs(np.array(inp["x"]))\nprint(json.dumps([float(np.mean(x > t)) for t in inp["t"]]))',
      { x, t: thresholds },
    );
    // Both are exact counts divided by n: equal to the last bit.
    expect(densityCurve(x, thresholds)).toEqual(ref);
    thresholds.filter((t) => t >= 0).forEach((t, i) => expect(density(x, { tolerance: t })).toBe(ref[i + 1]));
  });
});

describe('graphDensity: the NetworkX definition (reference-values "Density of graphs", confirmed)', () => {
  it('hand-worked 3-node graphs', () => {
    // Directed 3-cycle 0→1→2→0: E = 3, N(N − 1) = 6 → 0.5. Out- and in-degree 1 everywhere.
    const cycle = { rows: 3, cols: 3, data: new Float64Array([0, 1, 0, 0, 0, 1, 1, 0, 0]) };
    const d = graphDensity(cycle);
    expect(d).toMatchObject({ density: 0.5, edges: 3, nodes: 3, possible: 6 });
    expect(Array.from(d.outDegree)).toEqual([1, 1, 1]);
    expect(Array.from(d.inDegree)).toEqual([1, 1, 1]);
    // Undirected: every pair {i, j} has one direction → E = 3 of N(N − 1)/2 = 3 → 1 (= 2E/(N(N − 1))).
    const u = graphDensity(cycle, { directed: false });
    expect(u).toMatchObject({ density: 1, edges: 3, possible: 3 });
    expect(Array.from(u.outDegree)).toEqual([2, 2, 2]);
    // Star with hub 0 and a self-loop on 2: diagonal ignored by default.
    const star = { rows: 3, cols: 3, data: new Float64Array([0, -0.2, 0.3, 0, 0, 0, 0, 0, 5]) };
    expect(graphDensity(star)).toMatchObject({ density: 2 / 6, edges: 2 });
    // With selfLoops: E = 3 of N² = 9 (our denominator counts the N possible loops).
    expect(graphDensity(star, { selfLoops: true })).toMatchObject({ density: 3 / 9, edges: 3, possible: 9 });
    expect(graphDensity(star, { directed: false, selfLoops: true })).toMatchObject({ edges: 3, possible: 6, density: 0.5 });
    // tolerance: |−0.2| ≤ 0.25 drops one edge.
    expect(graphDensity(star, { tolerance: 0.25 })).toMatchObject({ edges: 1 });
  });
  it('undefined and invalid shapes', () => {
    expect(graphDensity({ rows: 1, cols: 1, data: new Float64Array([3]) }).density).toBeNull(); // 0 possible edges
    expect(graphDensity({ rows: 0, cols: 0, data: new Float64Array(0) }).density).toBeNull();
    expect(() => graphDensity({ rows: 2, cols: 3, data: new Float64Array(6) })).toThrow(/square.*2 × 3/);
    expect(() => graphDensity({ rows: 2, cols: 2, data: new Float64Array(3) })).toThrow(/expected rows × cols/);
  });
  it('accepts an ml-matrix Matrix', () => {
    expect(graphDensity(new Matrix([[0, 1], [0, 0]])).density).toBe(0.5); // E = 1 of 2
  });
});

describe.skipIf(!hasScipy)('graphDensity against the NetworkX formulas evaluated with numpy (live)', () => {
  it('random sparse weight matrices, directed and undirected, with degrees', () => {
    const rng = makeRng(77);
    for (const [N, p] of [[2, 0.5], [17, 0.1], [120, 0.03], [64, 0.9]]) {
      const data = sample(N * N, () => (rng.uniform() < p ? rng.normal() : 0));
      const ref = runPython<{ d: number; u: number; e: number; eu: number; out: number[]; inn: number[]; deg: number[] }>(
        `N = inp["N"]
A = np.array(inp["w"]).reshape(N, N) != 0
np.fill_diagonal(A, False)
U = A | A.T
E = int(A.sum()); EU = int(np.triu(U, 1).sum())
print(json.dumps(dict(d=E / (N * (N - 1)), u=2 * EU / (N * (N - 1)), e=E, eu=EU,
      out=A.sum(1).tolist(), inn=A.sum(0).tolist(), deg=U.sum(1).tolist())))`,
        { N, w: Array.from(data) },
      );
      const m = { rows: N, cols: N, data };
      const d = graphDensity(m);
      expect(d.edges).toBe(ref.e);
      expect(d.density).toBeCloseTo(ref.d, 15); // directed: E / (N(N − 1))
      expect(Array.from(d.outDegree)).toEqual(ref.out);
      expect(Array.from(d.inDegree)).toEqual(ref.inn);
      const u = graphDensity(m, { directed: false });
      expect(u.edges).toBe(ref.eu);
      expect(u.density).toBeCloseTo(ref.u, 15); // undirected: 2E / (N(N − 1))
      expect(Array.from(u.outDegree)).toEqual(ref.deg);
    }
  });
});
