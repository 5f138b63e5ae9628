/**
 * The drift stage on synthetic monthly datasets (test/audit/drift-fixture.ts, seeded).
 * Checks: a known step is flagged at its month or the next; the same series without the step
 * is not flagged; thin months are marked and kept; pooling, month indexing, group differences
 * and the multiple-testing bookkeeping against hand computations and simple-statistics.
 */
import { describe, expect, it } from 'vitest';
import { mean, median } from 'simple-statistics';
import { buildDrift } from '../../src/audit/drift.ts';
import type { DriftSettings } from '../../src/manifest/types.ts';
import type { ActivityChartData, DatasetResult, DriftSeries, MeasureResult } from '../../src/types.ts';
import { createRandom } from '../../src/stats/random.ts';
import { makeDataset, monthLabel, twelveMonths } from './drift-fixture.ts';

// The manifest's defaults (src/manifest/schema.ts).
const DEFAULTS: DriftSettings = { baseline_months: 3, chart: 'ewma', ewma_lambda: 0.2, ewma_L: 3, cusum_k: 0.5, cusum_h: 5, adjust: 'holm' };
const OPTS = { level: 0.95, seed: 12345, resamples: 400 };
const SEED = 20260301;

function series(d: ReturnType<typeof buildDrift>, measure: string, group: string | null = null): DriftSeries {
  const s = d?.series.find((x) => x.measure === measure && x.group === group);
  if (!s) throw new Error(`no series ${measure}/${group}`);
  return s;
}

describe('buildDrift: change screening on twelve months', () => {
  // Step of +0.12 in lifetime sparseness from 2024-08 (index 7); per-month SE ≈ 0.15/√60 ≈ 0.02,
  // so the step is about 6 SE — e.g. a change of sorting threshold, plausible and worth catching.
  // Allowance, stated per chart and measured over 300 seeds of this fixture (/tmp sweep, not a
  // test): EWMA (λ = 0.2) moves 1 − 0.8^k of a step after k months (20%, 36%, 49%), and its
  // limits with a 3-month estimated centre settle near ±3σ·√(1/9 + 1/3) ≈ ±2σ, so a 6σ step is
  // expected above the limit in the second month (2.2σ) and clearly by the third (2.9σ):
  // flagged in the step month or the next in 78% of seeds, within two months in 92%.
  // CUSUM (k = 0.5, h = 5) gains ≈ 5.5σ a month once the step is in: step month or the next in
  // 96% of seeds. So: EWMA within two months after the step, CUSUM within one.
  const stepped = twelveMonths(SEED, 0.12, 7);
  const flat = twelveMonths(SEED, 0, 7);

  const allowed = { ewma: ['2024-08', '2024-09', '2024-10'], cusum: ['2024-08', '2024-09'] };
  for (const chart of ['ewma', 'cusum'] as const) {
    it(`${chart}: the step is flagged in ${allowed[chart].join(' or ')}, nothing before`, () => {
      const s = series(buildDrift(stepped, { ...DEFAULTS, chart }, OPTS), 'lifetime_sparseness');
      expect(allowed[chart]).toContain(s.firstSignal);
      expect(s.points.slice(0, 7).some((p) => p.signal)).toBe(false);
      expect(s.chart).toBe(chart);
    });
    it(`${chart}: the same months without the step are not flagged (fixed seed)`, () => {
      const d = buildDrift(flat, { ...DEFAULTS, chart }, OPTS);
      expect(series(d, 'lifetime_sparseness').firstSignal).toBeNull();
      expect(series(d, 'lifetime_sparseness').points.every((p) => !p.signal)).toBe(true);
    });
  }

  it('CUSUM points carry S_H, S_L and the decision interval H = cusum_h·σ (Page 1954)', () => {
    const s = series(buildDrift(stepped, { ...DEFAULTS, chart: 'cusum' }, OPTS), 'lifetime_sparseness');
    const withValue = s.points.filter((p) => p.chartValue !== null);
    expect(withValue.length).toBeGreaterThan(0);
    for (const p of withValue) {
      expect(p.chartLimit).toBeCloseTo(DEFAULTS.cusum_h * s.baseline!.sd, 14);
      expect(p.chartValue).toBe(Math.max(p.chartUpper!, p.chartLower!));
      expect(p.signal).toBe(p.chartValue! > p.chartLimit!);
    }
  });

  it('EWMA points carry z and the limits; the baseline is the first three months', () => {
    const s = series(buildDrift(stepped, DEFAULTS, OPTS), 'lifetime_sparseness');
    expect(s.baselineMonths).toEqual(['2024-01', '2024-02', '2024-03']);
    const est = s.points.slice(0, 3).map((p) => p.estimate as number);
    expect(s.baseline?.mean).toBeCloseTo(mean(est), 14);
    // σ = max(SD of the 3 baseline estimates, median baseline SE): never below the sample SD.
    expect(s.baseline?.sd).toBeGreaterThanOrEqual(Math.sqrt(est.reduce((a, v) => a + (v - mean(est)) ** 2, 0) / 2) - 1e-15);
    for (const p of s.points) {
      expect(p.chartLower as number).toBeLessThanOrEqual(p.chartUpper as number);
      expect(p.signal).toBe((p.chartValue as number) > (p.chartUpper as number) || (p.chartValue as number) < (p.chartLower as number));
    }
    // z_1 = λ·x_1 + (1 − λ)·μ₀ (Roberts 1959).
    expect(s.points[0].chartValue).toBeCloseTo(0.2 * est[0] + 0.8 * mean(est), 14);
  });

  it('trend: Mann–Kendall over the months and a Theil–Sen slope per month; Holm over all series', () => {
    const d = buildDrift(stepped, DEFAULTS, OPTS);
    const s = series(d, 'lifetime_sparseness');
    expect(s.mannKendall?.n).toBe(12);
    expect(s.mannKendall?.S).toBeGreaterThan(0);
    expect(s.theilSen?.slope).toBeGreaterThan(0);
    expect(d?.testsRun).toBe(3); // population sparseness, lifetime sparseness, kurtosis
    // Holm can only raise p; with 3 tests the smallest p is multiplied by 3 (Holm 1979).
    const ps = d!.series.map((x) => x.mannKendall!.p);
    const smallest = ps.indexOf(Math.min(...ps));
    expect(d!.series[smallest].pAdjusted).toBeCloseTo(Math.min(1, 3 * ps[smallest]), 14);
    const none = buildDrift(stepped, { ...DEFAULTS, adjust: 'none' }, OPTS);
    none!.series.forEach((x) => expect(x.pAdjusted).toBe(x.mannKendall!.p));
    expect(d?.summary).toMatch(/Lifetime sparseness signalled first, in 2024-(08|09|10)/);
    expect(d?.summary).toMatch(/not proof/);
  });
});

describe('buildDrift: thin months, pooling, month index, nulls', () => {
  it('a month with few units and a month with a too-few-units finding are thin, shown, and keep their estimate', () => {
    const rng = createRandom(5);
    const ds = Array.from({ length: 8 }, (_, i) =>
      makeDataset(rng, {
        month: monthLabel(i), id: `d${i}`, lifetime: 0.6,
        units: i === 4 ? 12 : 60, // 12 < half the median n (60)
        findings: i === 6 ? [{ level: 'caution', code: 'too-few-units', message: 'few', where: [], count: 2 }] : [],
      }),
    );
    const s = series(buildDrift(ds, DEFAULTS, OPTS), 'lifetime_sparseness');
    expect(s.points).toHaveLength(8);
    expect(s.points.map((p) => p.thin)).toEqual([false, false, false, false, true, false, true, false]);
    expect(s.points[4].estimate).not.toBeNull();
    expect(s.points[4].n).toBe(12);
    expect(buildDrift(ds, DEFAULTS, OPTS)?.summary).toMatch(/Thin months.*2024-05.*2024-07/);
  });

  it('pools two datasets of one month: n-weighted mean, half-widths combined as independent SEs', () => {
    // a: 0.6 [0.56, 0.64], n 30; b: 0.7 [0.66, 0.74], n 10 → w = 0.75, 0.25; estimate 0.625.
    // SE_i = 0.04/z; SE = √(0.75² + 0.25²)·0.04/z → half-width z·SE = 0.04·√0.625 (z cancels).
    const m = (e: number, n: number): MeasureResult => ({ estimate: e, interval: [e - 0.04, e + 0.04], level: 0.95, method: 'bca', n, excluded: 0, summary: '' });
    const base = (id: string, month: string, e: number, n: number): DatasetResult => ({
      ...makeDataset(createRandom(1), { month, id, units: 10, lifetime: 0.5 }),
      measures: { lifetime_sparseness: m(e, n) },
    });
    const d = buildDrift([base('a', '2024-01', 0.6, 30), base('b', '2024-01', 0.7, 10), base('c', '2024-02', 0.6, 40), base('d', '2024-03', 0.6, 40)], DEFAULTS, OPTS);
    const p = series(d, 'lifetime_sparseness').points[0];
    expect(p.datasets).toEqual(['a', 'b']);
    expect(p.n).toBe(40);
    expect(p.estimate).toBeCloseTo(0.625, 14);
    expect(p.interval![0]).toBeCloseTo(0.625 - 0.04 * Math.sqrt(0.625), 12);
    expect(p.interval![1]).toBeCloseTo(0.625 + 0.04 * Math.sqrt(0.625), 12);
    expect(d?.pooling).toMatch(/weighted by each one’s n/);
  });

  it('Theil–Sen counts calendar months, gaps included (exact line over 2024-01, -02, -04)', () => {
    // Estimates 0.50, 0.51, 0.53 at t = 0, 1, 3 lie on 0.50 + 0.01·t: every pairwise slope is 0.01.
    const rng = createRandom(2);
    const ds = [['2024-01', 0.5], ['2024-02', 0.51], ['2024-04', 0.53]].map(([month, e], i) => {
      const d = makeDataset(rng, { month: month as string, id: `g${i}`, units: 40, lifetime: 0.5 });
      d.measures = { lifetime_sparseness: { ...(d.measures.lifetime_sparseness as MeasureResult), estimate: e as number } };
      return d;
    });
    const s = series(buildDrift(ds, DEFAULTS, OPTS), 'lifetime_sparseness');
    expect(s.theilSen?.slope).toBeCloseTo(0.01, 14);
    expect(s.theilSen?.intercept).toBeCloseTo(0.5, 14); // median 0.51 − 0.01·median t (1)
  });

  it('null with fewer than three months; datasets without a month are ignored and counted', () => {
    const rng = createRandom(3);
    const two = [0, 1].map((i) => makeDataset(rng, { month: monthLabel(i), id: `x${i}`, units: 30, lifetime: 0.6 }));
    const undated = { ...makeDataset(rng, { month: '2024-05', id: 'nomonth', units: 30, lifetime: 0.6 }), month: null };
    expect(buildDrift([...two, undated], DEFAULTS, OPTS)).toBeNull();
    const three = [...two, makeDataset(rng, { month: monthLabel(2), id: 'x2', units: 30, lifetime: 0.6 }), undated];
    const d = buildDrift(three, DEFAULTS, OPTS);
    expect(d?.months).toEqual(['2024-01', '2024-02', '2024-03']);
    expect(d?.series.flatMap((s) => s.points.flatMap((p) => p.datasets))).not.toContain('nomonth');
    expect(d?.summary).toMatch(/1 dataset\(s\) without a month/);
  });
});

describe('buildDrift: groups', () => {
  const rng = createRandom(17);
  const ds: DatasetResult[] = [];
  for (let i = 0; i < 4; i++) {
    for (const group of ['rig B', 'rig A']) {
      ds.push(makeDataset(rng, { month: monthLabel(i), id: `${group}-${i}`, group, units: 40, lifetime: group === 'rig A' ? 0.65 : 0.55, kurtosis: group === 'rig A' ? 5 : 3 }));
    }
  }
  const d = buildDrift(ds, DEFAULTS, OPTS);

  it('one series per group and measure, no pooled series', () => {
    expect(d?.series.map((s) => s.group)).toEqual(['rig A', 'rig B', 'rig A', 'rig B', 'rig A', 'rig B']);
  });

  it('lifetime: mean difference of per-unit values with a bootstrap interval; kurtosis: difference of medians', () => {
    const cell = (g: string, i: number) => ds.find((x) => x.id === `${g}-${i}`)!.chartData as ActivityChartData;
    for (let i = 0; i < 4; i++) {
      const a = cell('rig A', i);
      const b = cell('rig B', i);
      const life = d!.groupDifferences.find((g) => g.measure === 'lifetime_sparseness' && g.month === monthLabel(i))!;
      expect([life.a, life.b]).toEqual(['rig A', 'rig B']);
      // simple-statistics (external) means and medians of the per-unit values.
      expect(life.difference).toBeCloseTo(mean(a.lifetimeSparseness as number[]) - mean(b.lifetimeSparseness as number[]), 12);
      expect(life.interval![0]).toBeLessThan(life.difference);
      expect(life.interval![1]).toBeGreaterThan(life.difference);
      const k = d!.groupDifferences.find((g) => g.measure === 'kurtosis' && g.month === monthLabel(i))!;
      expect(k.difference).toBeCloseTo(median(a.kurtosis as number[]) - median(b.kurtosis as number[]), 12);
      expect(k.interval![0]).toBeLessThan(k.interval![1]);
      // Population sparseness has no per-unit values: normal approximation, half-width
      // z·√(SE_a² + SE_b²) with SE = 0.02/z each → 0.02·√2 (z cancels).
      const pop = d!.groupDifferences.find((g) => g.measure === 'population_sparseness' && g.month === monthLabel(i))!;
      expect(pop.interval![1] - pop.difference).toBeCloseTo(0.02 * Math.SQRT2, 12);
    }
  });

  it('is reproducible: the same inputs and seed give the same result', () => {
    expect(buildDrift(ds, DEFAULTS, OPTS)).toEqual(d);
  });
});
