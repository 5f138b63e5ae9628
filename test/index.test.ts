/**
 * The library entry exports the fixed names other code and outside checks call (issue list of
 * names), and they compute: one published value each, from ../shared/reference-values.md.
 */
import { describe, it, expect } from 'vitest';
import * as lacuna from '../src/index.ts';

describe('src/index.ts', () => {
  it('exports the fixed names', () => {
    for (const name of ['activityRatio', 'vinjeGallantSparseness', 'hoyerSparseness', 'giniIndex', 'excessKurtosis', 'density', 'populationSparseness', 'lifetimeSparseness', 'graphDensity', 'bootstrapInterval', 'createRandom']) {
      expect(typeof (lacuna as Record<string, unknown>)[name], name).toBe('function');
    }
  });
  it('computes through the entry: r = [1, 2, 3, 4] (reference-values.md, sparseness table, derived)', () => {
    const r = [1, 2, 3, 4];
    expect(lacuna.activityRatio(r)).toBeCloseTo(5 / 6, 15);
    expect(lacuna.vinjeGallantSparseness(r)).toBeCloseTo(2 / 9, 15);
    expect(lacuna.hoyerSparseness(r)).toBeCloseTo(0.1742581416, 10);
    expect(lacuna.giniIndex(r)).toBeCloseTo(0.25, 15);
    // g2 of [1, 2, 3, 4] = −1.36, G2 = −1.2 (reference-values.md, SciPy test suite / derived).
    expect(lacuna.excessKurtosis(r)).toBeCloseTo(-1.36, 14);
    expect(lacuna.excessKurtosis(r, { adjusted: true })).toBeCloseTo(-1.2, 14);
  });
});
