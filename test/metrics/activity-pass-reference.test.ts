/**
 * The fused pass against the project's reference scalar measures (src/metrics, each tested
 * against published values and scipy on its own): per unit on the policy-transformed defined
 * values, per bin on the column of non-refused units. Runs without python.
 */
import { describe, expect, it } from 'vitest';
import { activityRatio } from '../../src/metrics/activity-ratio.ts';
import { vinjeGallantSparseness } from '../../src/metrics/vinje-gallant.ts';
import { hoyerSparseness } from '../../src/metrics/hoyer.ts';
import { giniIndex } from '../../src/metrics/gini.ts';
import { excessKurtosis } from '../../src/metrics/kurtosis.ts';
import { skewness } from '../../src/metrics/skewness.ts';
import type { NegativesPolicy } from '../../src/manifest/types.ts';
import { close, mixedMatrix, runPass } from './activity-pass-fixtures.ts';

const m = mixedMatrix(3);
const MIN_NONZERO = 3;

function transformed(v: number[], policy: NegativesPolicy): number[] | null {
  const min = Math.min(...v);
  if (min >= 0 || policy === 'keep') return v;
  if (policy === 'rectify') return v.map((x) => Math.max(0, x));
  if (policy === 'shift') return v.map((x) => x - min);
  return null; // refused
}

describe('activity pass vs the reference scalar measures', () => {
  for (const policy of ['keep', 'rectify', 'shift', 'refuse'] as const) {
    for (const type of ['f64', 'f32'] as const) {
      it(`${policy}, ${type}`, () => {
        const mm = type === 'f32' ? { ...m, values: m.values.map((v) => Math.fround(v)) } : m;
        const r = runPass(mm, { zeroTolerance: 0, negatives: policy, events: null, minNonzero: MIN_NONZERO }, type, 4);
        const bad: string[] = [];
        const check = (name: string, i: number, got: number, want: number | null) => {
          if (!close(got, want, 1e-12)) bad.push(`${name}[${i}]: ${got} vs ${want}`);
        };
        const cols: number[][] = Array.from({ length: m.bins }, () => []);
        for (let u = 0; u < m.units; u++) {
          const v: number[] = [];
          const at: number[] = [];
          for (let j = 0; j < m.bins; j++) {
            if (mm.code[u * m.bins + j] === 0) {
              v.push(mm.values[u * m.bins + j]);
              at.push(j);
            }
          }
          if (v.length === 0) continue;
          const nonzero = v.filter((x) => x !== 0).length;
          check('skewness', u, r.unit.skewness[u], skewness(v));
          check('kurtosis', u, r.unit.kurtosis[u], nonzero >= MIN_NONZERO ? excessKurtosis(v) : null);
          const y = transformed(v, policy);
          if (y !== null) at.forEach((j, i) => cols[j].push(y[i]));
          const use = y !== null && nonzero > 0; // silent and refused units: no lifetime measures
          check('activityRatio', u, r.unit.activityRatio[u], use ? activityRatio(y) : null);
          check('lifetimeSparseness', u, r.unit.lifetimeSparseness[u], use ? vinjeGallantSparseness(y) : null);
          check('hoyer', u, r.unit.hoyer[u], use ? hoyerSparseness(y) : null);
          check('gini', u, r.unit.gini[u], use ? giniIndex(y) : null);
        }
        for (let j = 0; j < m.bins; j++) check('populationSparseness', j, r.bin.populationSparseness[j], vinjeGallantSparseness(cols[j]));
        expect(bad).toEqual([]);
      });
    }
  }
});
