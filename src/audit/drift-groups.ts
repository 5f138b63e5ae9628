/**
 * Drift, step 5: differences between groups measured in the same month (e.g. rig A − rig B),
 * for every measure, each pair of groups (a − b, a before b in sorted order).
 *
 * - lifetime sparseness, when every dataset of both cells keeps per-unit values
 *   (`ActivityChartData.lifetimeSparseness`): the units of each cell are pooled and the
 *   difference of means gets a two-sample percentile bootstrap interval (`bootstrapDifference`,
 *   Efron & Tibshirani 1993 §8.3) — the monthly estimate is itself a mean over units.
 * - kurtosis, likewise from per-unit values (`ActivityChartData.kurtosis`): the estimate is a
 *   median over units, so the difference is median(a) − median(b) of the pooled units, with a
 *   two-sample percentile bootstrap of that difference of medians (same scheme: each group
 *   resampled independently with replacement, type-7 quantiles at α/2 and 1 − α/2).
 * - every other measure, or without per-unit values: the difference of the pooled monthly
 *   estimates with a normal interval, d ± z·√(SE_a² + SE_b²), SEs read from the monthly
 *   intervals (drift-pooling.ts); no interval when either month has none.
 *
 * Seeds: comparison k (in output order) uses seed + k, so each has its own reproducible stream.
 * Cost: O(B·(n_a + n_b)) per bootstrapped comparison (plus a sort per resample for medians).
 */
import type { ActivityChartData, DatasetResult, DriftResult, MeasureName } from '../types.ts';
import { bootstrapDifference } from '../stats/bootstrap-difference.ts';
import { quantileSorted } from '../stats/quantile.ts';
import { createRandom } from '../stats/random.ts';
import type { PooledPoint } from './drift-pooling.ts';
import { zFor } from './drift-pooling.ts';

type GroupDifference = DriftResult['groupDifferences'][number];

export interface GroupCell {
  measure: MeasureName;
  month: string;
  group: string;
  point: PooledPoint;
  datasets: DatasetResult[];
}

const PER_UNIT: Partial<Record<MeasureName, 'lifetimeSparseness' | 'kurtosis'>> = {
  lifetime_sparseness: 'lifetimeSparseness',
  kurtosis: 'kurtosis',
};

/** Pooled defined per-unit values of a cell, or null when any dataset lacks them. */
function unitValues(datasets: DatasetResult[], key: 'lifetimeSparseness' | 'kurtosis'): Float64Array | null {
  const out: number[] = [];
  for (const d of datasets) {
    const cd = d.chartData as Partial<ActivityChartData>;
    if (d.kind !== 'activity' || !Array.isArray(cd[key])) return null;
    for (const v of cd[key] as (number | null)[]) if (typeof v === 'number' && Number.isFinite(v)) out.push(v);
  }
  return out.length >= 2 ? Float64Array.from(out) : null;
}

function medianOf(x: Float64Array): number {
  return quantileSorted(Float64Array.from(x).sort(), 0.5);
}

/** Two-sample percentile bootstrap of median(a) − median(b). */
function medianDifference(a: Float64Array, b: Float64Array, level: number, resamples: number, seed: number): { estimate: number; lower: number; upper: number } {
  const rng = createRandom(seed);
  const ra = new Float64Array(a.length);
  const rb = new Float64Array(b.length);
  const dist = new Float64Array(resamples);
  for (let r = 0; r < resamples; r++) {
    for (let i = 0; i < a.length; i++) ra[i] = a[rng.int(a.length)];
    for (let i = 0; i < b.length; i++) rb[i] = b[rng.int(b.length)];
    ra.sort();
    rb.sort();
    dist[r] = quantileSorted(ra, 0.5) - quantileSorted(rb, 0.5);
  }
  dist.sort();
  const alpha = (1 - level) / 2;
  return { estimate: medianOf(a) - medianOf(b), lower: quantileSorted(dist, alpha), upper: quantileSorted(dist, 1 - alpha) };
}

/** All pairwise group differences; `cells` may come in any order. */
export function groupDifferences(cells: GroupCell[], options: { level: number; seed: number; resamples: number }): GroupDifference[] {
  const byKey = new Map<string, GroupCell[]>();
  for (const c of cells) {
    if (c.point.estimate === null) continue;
    const key = `${c.measure}\u0000${c.month}`;
    byKey.set(key, [...(byKey.get(key) ?? []), c]);
  }
  const keys = [...byKey.keys()].sort();
  const out: GroupDifference[] = [];
  for (const key of keys) {
    const group = (byKey.get(key) as GroupCell[]).sort((x, y) => (x.group < y.group ? -1 : x.group > y.group ? 1 : 0));
    for (let i = 0; i < group.length; i++) {
      for (let j = i + 1; j < group.length; j++) {
        out.push(difference(group[i], group[j], options, options.seed + out.length));
      }
    }
  }
  return out;
}

function difference(a: GroupCell, b: GroupCell, o: { level: number; resamples: number }, seed: number): GroupDifference {
  const base = { measure: a.measure, month: a.month, a: a.group, b: b.group };
  const key = PER_UNIT[a.measure];
  const ua = key ? unitValues(a.datasets, key) : null;
  const ub = key ? unitValues(b.datasets, key) : null;
  if (key && ua && ub) {
    if (key === 'lifetimeSparseness') {
      const r = bootstrapDifference({ a: ua, b: ub, level: o.level, resamples: o.resamples, seed });
      return { ...base, difference: r.estimate, interval: [r.lower, r.upper] };
    }
    const r = medianDifference(ua, ub, o.level, o.resamples, seed);
    return { ...base, difference: r.estimate, interval: [r.lower, r.upper] };
  }
  const d = (a.point.estimate as number) - (b.point.estimate as number);
  if (a.point.se === null || b.point.se === null) return { ...base, difference: d, interval: null };
  const half = zFor(o.level) * Math.sqrt(a.point.se ** 2 + b.point.se ** 2);
  return { ...base, difference: d, interval: [d - half, d + half] };
}
