/**
 * Synthetic monthly `DatasetResult`s for the drift tests, from a seeded generator (never from
 * the audit code): per-unit lifetime sparseness and kurtosis values are drawn, the month's
 * estimates are their mean (lifetime) and median (kurtosis), and the intervals are the usual
 * normal ones around the mean, mean ± 1.96·sd/√n (kurtosis: median ± 1.96·1.2533·sd/√n, the
 * large-sample SE of a normal median). Population sparseness gets a plain value ± 0.02.
 */
import type { DatasetResult, MeasureResult } from '../../src/types.ts';
import { createRandom, type Random } from '../../src/stats/random.ts';

export function monthLabel(i: number): string {
  return `${2024 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}`;
}

function measure(estimate: number, half: number, n: number): MeasureResult {
  return { estimate, interval: [estimate - half, estimate + half], level: 0.95, method: 'percentile', n, excluded: 0, summary: 'synthetic' };
}

function sd(x: number[]): number {
  const m = x.reduce((a, v) => a + v, 0) / x.length;
  return Math.sqrt(x.reduce((a, v) => a + (v - m) ** 2, 0) / (x.length - 1));
}

export interface MonthSpec {
  month: string;
  id: string;
  group?: string | null;
  units: number;
  /** True mean of per-unit lifetime sparseness this month. */
  lifetime: number;
  kurtosis?: number;
  findings?: DatasetResult['findings'];
}

export function makeDataset(rng: Random, spec: MonthSpec): DatasetResult {
  const n = spec.units;
  const life = Array.from({ length: n }, () => Math.min(1, Math.max(0, spec.lifetime + 0.15 * rng.normal())));
  const kurt = Array.from({ length: n }, () => (spec.kurtosis ?? 4) + 1.5 * rng.normal());
  const mean = life.reduce((a, v) => a + v, 0) / n;
  const sorted = [...kurt].sort((a, b) => a - b);
  const med = n % 2 ? sorted[(n - 1) / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
  const pop = 0.5 + 0.01 * rng.normal();
  return {
    id: spec.id,
    month: spec.month,
    group: spec.group ?? null,
    kind: 'activity',
    shape: [n, 6000],
    files: [{ path: `data/${spec.id}.npy`, sha256: spec.id.padEnd(64, '0'), bytes: 1000 }],
    measures: {
      population_sparseness: measure(pop, 0.02, 6000),
      lifetime_sparseness: measure(mean, (1.959964 * sd(life)) / Math.sqrt(n), n),
      kurtosis: measure(med, (1.959964 * 1.2533 * sd(kurt)) / Math.sqrt(n), n),
    },
    findings: spec.findings ?? [],
    chartData: {
      unitLabels: life.map((_, i) => `u${i}`),
      lifetimeSparseness: life,
      kurtosis: kurt,
      meanRate: life.map(() => 1),
      populationWindows: [],
      windowBins: 500,
      binMs: 50,
    },
    cacheKey: spec.id,
  };
}

/**
 * Twelve months from 2024-01, one dataset a month with 50–70 units, lifetime sparseness 0.6
 * (unit SD 0.15 → SE ≈ 0.02); from month index `stepAt` on, lifetime sparseness is 0.6 + `step`.
 */
export function twelveMonths(seed: number, step = 0, stepAt = 7): DatasetResult[] {
  const rng = createRandom(seed);
  return Array.from({ length: 12 }, (_, i) =>
    makeDataset(rng, { month: monthLabel(i), id: `m${i}`, units: 50 + rng.int(21), lifetime: 0.6 + (i >= stepAt ? step : 0) }),
  );
}
