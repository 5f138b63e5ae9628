/**
 * Findings from the activity pass: each code is raised by a small crafted matrix, with the
 * level and count worked out from how the matrix was made, and none by a clean matrix.
 * Thresholds (saturation 1% and 5 cells, min_nonzero) are the project's stated rules
 * (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { createActivityPass, finishActivityPass, type ActivityPassOptions } from '../../src/metrics/activity-pass.ts';
import { activityFindings } from '../../src/metrics/activity-findings.ts';
import type { Finding } from '../../src/types.ts';
import { mulberry32 } from './activity-pass-fixtures.ts';

const UNITS = 8, BINS = 200;
const labels = Array.from({ length: UNITS }, (_, u) => `n${u}`);

/** Clean: exponential values (continuous, no ties), 30% zeros, no negatives, no duplicates. */
function clean(): Float64Array {
  const rand = mulberry32(99);
  const d = new Float64Array(UNITS * BINS);
  for (let i = 0; i < d.length; i++) d[i] = rand() < 0.3 ? 0 : -Math.log(1 - rand());
  return d;
}

function findings(data: Float64Array, opts: Partial<ActivityPassOptions> = {}, mask?: Uint8Array, units = UNITS): Finding[] {
  const options: ActivityPassOptions = { zeroTolerance: 0, negatives: 'keep', events: null, minNonzero: 5, ...opts };
  const pass = createActivityPass({ units, bins: BINS }, options);
  pass.addBlock({ unitStart: 0, units, bins: BINS, data, missing: mask });
  return activityFindings(finishActivityPass(pass.state()), { unitLabels: labels });
}

const summary = (fs: Finding[]) => fs.map((f) => `${f.level} ${f.code} ${f.count}`);

describe('activity findings', () => {
  it('a clean matrix raises none (also with events on)', () => {
    expect(findings(clean())).toEqual([]);
    expect(findings(clean(), { events: { k: 3 } })).toEqual([]);
  });

  const row = (d: Float64Array, u: number) => d.subarray(u * BINS, (u + 1) * BINS);
  const cases: { name: string; make: (d: Float64Array) => Uint8Array | void; opts?: Partial<ActivityPassOptions>; want: string[]; where?: string[] }[] = [
    { name: 'NaN cells', make: (d) => { d[2 * BINS + 5] = NaN; d[2 * BINS + 6] = NaN; }, want: ['exclude nan-values 2'], where: ['n2'] },
    { name: '±Inf cells', make: (d) => { d[3 * BINS] = Infinity; d[4 * BINS] = -Infinity; }, want: ['exclude infinite-values 2'], where: ['n3', 'n4'] },
    { name: 'missing cells', make: () => { const m = new Uint8Array(UNITS * BINS); m[BINS + 3] = 1; return m; }, want: ['notice missing-values 1'], where: ['n1'] },
    // An all-NaN unit is empty; its 200 NaN cells are counted as such.
    { name: 'an empty unit', make: (d) => { row(d, 6).fill(NaN); }, want: ['exclude nan-values 200', 'exclude empty-units 1'] },
    // A silent unit has 0 nonzero bins < min_nonzero 5, so its kurtosis is withheld too.
    { name: 'a silent unit', make: (d) => { row(d, 1).fill(0); }, want: ['exclude silent-units 1', 'notice kurtosis-too-few-nonzero 1'], where: ['n1'] },
    // Every cell at the max, but constant units are not judged saturated (binary-like rule).
    { name: 'a constant unit', make: (d) => { row(d, 5).fill(3); }, want: ['caution constant-units 1'], where: ['n5'] },
    { name: 'negatives, rectify', make: (d) => { d[7] = -0.5; }, opts: { negatives: 'rectify' }, want: ['caution negative-values 1'], where: ['n0'] },
    { name: 'negatives, refuse', make: (d) => { d[7] = -0.5; }, opts: { negatives: 'refuse' }, want: ['caution negative-values 1', 'exclude negative-units-refused 1'] },
    // 10 of 200 cells (5%, ≥ 5) clipped at the unit's max of 4: saturated.
    { name: 'a clipped unit', make: (d) => { const r = row(d, 3); for (let j = 0; j < 10; j++) r[j * 7] = 4; for (let j = 0; j < BINS; j++) r[j] = Math.min(r[j], 4); }, want: ['caution saturated-units 1'], where: ['n3'] },
    { name: 'a duplicated unit', make: (d) => { row(d, 7).set(row(d, 2)); }, want: ['caution duplicate-units 1'], where: ['n2 = n7'] },
    { name: 'a unit with 3 nonzero bins', make: (d) => { const r = row(d, 4); r.fill(0); r[1] = 1; r[50] = 2; r[99] = 0.5; }, want: ['notice kurtosis-too-few-nonzero 1'], where: ['n4'] },
    { name: 'no noise estimate for events', make: (d) => { const r = row(d, 2); r.fill(0); for (let j = 0; j < 10; j++) r[j * 20] = 1; }, opts: { events: { k: 3 } }, want: ['exclude events-undefined-units 1'], where: ['n2'] },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const d = clean();
      const mask = c.make(d) ?? undefined;
      const fs = findings(d, c.opts, mask);
      expect(summary(fs)).toEqual(c.want);
      if (c.where) expect(fs[fs.length - 1].where).toEqual(c.where);
      for (const f of fs) expect(f.message.length).toBeGreaterThan(20);
    });
  }

  it('S above 1 under keep: one unit and the bins where (Σy)² < Σy²', () => {
    // Unit 0 alternates sign with distinct magnitudes 1 + j/1000 (no ties, so not saturated):
    // Σy = 100 · 0.001 = 0.1, so a ≈ 2.5e-7 and S ≈ n/(n − 1) > 1. For a bin (n = 8 units),
    // S > 1 ⟺ a < 1/n ⟺ (Σy)² < Σy² (derived from S = (1 − a)/(1 − 1/n)); the test counts such
    // bins directly from the data.
    const d = clean();
    for (let j = 0; j < BINS; j++) d[j] = (j % 2 ? 1 : -1) * (1 + j / 1000);
    let bins = 0;
    for (let j = 0; j < BINS; j++) {
      let s = 0, q = 0;
      for (let u = 0; u < UNITS; u++) { s += d[u * BINS + j]; q += d[u * BINS + j] ** 2; }
      if (s * s < q) bins++;
    }
    expect(bins).toBeGreaterThan(0);
    const fs = findings(d);
    expect(summary(fs)).toEqual(['caution negative-values 100', `caution sparseness-out-of-range ${1 + bins}`]);
    expect(fs[1].where[0]).toBe('n0');
    expect(fs[1].where.slice(1).every((w) => w.startsWith('bin '))).toBe(true);
    // The same matrix under rectify: no S above 1, so no such finding.
    expect(summary(findings(d, { negatives: 'rectify' }))).toEqual(['caution negative-values 100']);
  });

  it('where lists at most 20 units; count holds the total', () => {
    const units = 30;
    const d = new Float64Array(units * BINS); // all silent
    const pass = createActivityPass({ units, bins: BINS }, { zeroTolerance: 0, negatives: 'keep', events: null, minNonzero: 0 });
    pass.addBlock({ unitStart: 0, units, bins: BINS, data: d });
    const [f] = activityFindings(finishActivityPass(pass.state()));
    expect(f.code).toBe('silent-units');
    expect(f.count).toBe(30);
    expect(f.where.length).toBe(20);
    expect(f.where[19]).toBe('unit 19');
  });
});
