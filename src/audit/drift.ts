/**
 * The audit's drift stage: monthly series of every measure, trend tests and change screening.
 *
 *   1. months: distinct `month` values, sorted; datasets without a month are left out (counted
 *      in the summary); fewer than 3 months → null (no drift section)
 *   2. series: one per (measure, group) when any dataset has a group (datasets without a group
 *      then form their own series, group null); one per measure (group null) when none has.
 *      Points: one per month in which the series has datasets, pooled (drift-pooling.ts)
 *   3. thin months: n below half the series' median n, or a pooled dataset with a
 *      `too-few-bins` / `too-few-units` finding. Thin months are shown and used like the others;
 *      the flag tells the reader to weigh them lightly
 *   4. per series, over the months with an estimate:
 *      - trend: Mann–Kendall (Gilbert 1987) and Theil–Sen with Sen's interval at `level`, with
 *        t = calendar months since the first month of the audit (slope per month; gaps count)
 *      - baseline: the first `baseline_months` months with an estimate; μ₀ = their mean;
 *        σ = max(SD of the baseline estimates (n − 1), median standard error of the baseline
 *        months read from their intervals). The SD of three numbers is itself very uncertain and
 *        can be near zero by chance; the within-month SE is the floor below which no month-to-
 *        month change could be told from sampling noise. `baseline.sd` records this σ.
 *      - chart over every month with an estimate (baseline months included, started at μ₀):
 *        EWMA (Roberts 1959) with exact limits widened for μ₀ being the mean of the baseline
 *        months themselves (`baselineCount`, see stats/ewma.ts: with 3 baseline months Roberts's
 *        known-μ₀ limits raised the in-control false-alarm rate over 12 months from about 1.4%
 *        to 13%; scripts/drift-false-alarm.ts), or tabular CUSUM (Page 1954), which has no such
 *        widening (its false-alarm rate over 12 months is about 12%; see that script). For CUSUM,
 *        `chartUpper` = S_H, `chartLower` = S_L and `chartValue` = max(S_H, S_L), which signals
 *        above H = cusum_h·σ
 *   5. multiple testing over all Mann–Kendall tests of the audit: Holm, BH or none
 *   6. group differences per month (drift-groups.ts)
 *   Weights audits get the same series over whole datasets, and one more per layer and measure
 *   where layers match by name across months (drift-layers.ts); with no sampling interval, σ is
 *   the baseline SD alone (step 4) and the summary says so.
 *   7. summary paragraph (drift-summary.ts)
 *
 * Months are 'YYYY-MM' (the manifest enforces it); any other label falls back to its rank.
 * Cost: O(series × months²) for the trend statistics, plus the group bootstraps.
 */
import type { DriftSettings } from '../manifest/types.ts';
import { ACTIVITY_MEASURES, WEIGHT_MEASURES } from '../types.ts';
import type { DatasetResult, DriftPoint, DriftResult, DriftSeries, MeasureName } from '../types.ts';
import { cusumChart } from '../stats/cusum.ts';
import { ewmaChart } from '../stats/ewma.ts';
import { mannKendall } from '../stats/mann-kendall.ts';
import { benjaminiHochberg, holm } from '../stats/multiple-testing.ts';
import { theilSen } from '../stats/theil-sen.ts';
import { groupDifferences, type GroupCell } from './drift-groups.ts';
import { poolCell, POOLING_TEXT, type PooledPoint } from './drift-pooling.ts';
import { driftSummary } from './drift-summary.ts';
import { layerDatasets, WEIGHTS_SIGMA_TEXT } from './drift-layers.ts';

export interface DriftOptions {
  level: number;
  seed: number;
  resamples: number;
}

const MEASURE_ORDER: readonly MeasureName[] = [...new Set<MeasureName>([...ACTIVITY_MEASURES, ...WEIGHT_MEASURES])];

/** Calendar month number of 'YYYY-MM', or null. */
function monthNumber(m: string): number | null {
  const r = /^(\d{4})-(\d{2})$/.exec(m);
  if (!r) return null;
  const mm = Number(r[2]);
  return mm >= 1 && mm <= 12 ? Number(r[1]) * 12 + mm - 1 : null;
}

function median(x: number[]): number {
  const s = [...x].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}

/** Build the drift result of an audit, or null when its datasets span fewer than 3 months. */
export function buildDrift(datasets: DatasetResult[], settings: DriftSettings, options: DriftOptions): DriftResult | null {
  // 1. Months.
  const dated = datasets.filter((d): d is DatasetResult & { month: string } => d.month !== null);
  const months = [...new Set(dated.map((d) => d.month))].sort();
  if (months.length < 3) return null;
  const numbers = months.map(monthNumber);
  const tOf = new Map(months.map((m, i) => [m, numbers.every((v) => v !== null) ? (numbers[i] as number) - (numbers[0] as number) : i]));

  // 2. Series keys.
  const grouped = dated.some((d) => d.group !== null);
  const groups = grouped ? [...new Set(dated.map((d) => d.group))].sort((a, b) => (a === null ? 1 : b === null ? -1 : a < b ? -1 : a > b ? 1 : 0)) : [null];
  const present = new Set(dated.flatMap((d) => Object.keys(d.measures)));
  const measures = MEASURE_ORDER.filter((m) => present.has(m));

  const series: DriftSeries[] = [];
  const cells: GroupCell[] = [];
  const perLayer = layerDatasets(dated);
  for (const measure of measures) {
    for (const layer of [null, ...perLayer.layers]) {
      const pool = layer === null ? dated : perLayer.datasets.filter((d) => d.layer === layer);
      for (const group of groups) {
        const points: { month: string; pooled: PooledPoint }[] = [];
        for (const month of months) {
          const cell = pool.filter((d) => d.month === month && (!grouped || d.group === group) && d.measures[measure] !== undefined);
          if (cell.length === 0) continue;
          const pooled = poolCell(cell, measure, options.level);
          points.push({ month, pooled });
          if (group !== null && layer === null) cells.push({ measure, month, group, point: pooled, datasets: cell });
        }
        if (points.length === 0) continue;
        const s = buildSeries(measure, group, points, tOf, settings, options.level);
        if (layer !== null) s.layer = layer;
        series.push(s);
      }
    }
  }

  // 5. Multiple testing.
  const tested = series.filter((s) => s.mannKendall !== null);
  const ps = tested.map((s) => (s.mannKendall as NonNullable<DriftSeries['mannKendall']>).p);
  const adjusted = settings.adjust === 'holm' ? holm(ps) : settings.adjust === 'bh' ? benjaminiHochberg(ps) : ps;
  tested.forEach((s, i) => (s.pAdjusted = adjusted[i]));

  // 6–7.
  const result: DriftResult = {
    months,
    pooling: POOLING_TEXT,
    chart: settings.chart,
    adjustment: settings.adjust,
    testsRun: tested.length,
    series,
    groupDifferences: groupDifferences(cells, options),
    summary: '',
  };
  result.summary = driftSummary(result, { undated: datasets.length - dated.length, baselineMonths: settings.baseline_months });
  if (dated.length > 0 && dated.every((d) => d.kind === 'weights')) result.summary += ` ${WEIGHTS_SIGMA_TEXT}`;
  return result;
}

function buildSeries(
  measure: MeasureName,
  group: string | null,
  raw: { month: string; pooled: PooledPoint }[],
  tOf: Map<string, number>,
  settings: DriftSettings,
  level: number,
): DriftSeries {
  // 3. Thin months.
  const medianN = median(raw.map((r) => r.pooled.n));
  const points: DriftPoint[] = raw.map(({ month, pooled }) => ({
    month,
    estimate: pooled.estimate,
    interval: pooled.interval,
    datasets: pooled.datasets,
    n: pooled.n,
    thin: pooled.flaggedThin || pooled.n < medianN / 2,
    chartValue: null,
    chartUpper: null,
    chartLower: null,
    signal: false,
  }));
  const s: DriftSeries = {
    measure, group, points, baselineMonths: [], baseline: null, mannKendall: null, theilSen: null,
    pAdjusted: null, chart: settings.chart, firstSignal: null,
  };
  // 4. Over the months with an estimate.
  const idx = points.map((p, i) => i).filter((i) => points[i].estimate !== null);
  const x = idx.map((i) => points[i].estimate as number);
  if (x.length >= 3) {
    s.mannKendall = mannKendall(x);
    s.theilSen = theilSen(idx.map((i) => tOf.get(points[i].month) as number), x, level);
  }
  const base = idx.slice(0, settings.baseline_months);
  if (base.length === 0) return s;
  s.baselineMonths = base.map((i) => points[i].month);
  const bx = base.map((i) => points[i].estimate as number);
  const mu0 = bx.reduce((a, v) => a + v, 0) / bx.length;
  const sd = bx.length > 1 ? Math.sqrt(bx.reduce((a, v) => a + (v - mu0) ** 2, 0) / (bx.length - 1)) : 0;
  const baseSe = base.map((i) => raw[i].pooled.se).filter((v): v is number => v !== null && v > 0);
  const allSe = idx.map((i) => raw[i].pooled.se).filter((v): v is number => v !== null && v > 0);
  const se = baseSe.length ? median(baseSe) : allSe.length ? median(allSe) : 0;
  const sigma = Math.max(sd, se);
  s.baseline = { mean: mu0, sd: sigma };
  if (!(sigma > 0 && Number.isFinite(sigma))) return s;
  if (settings.chart === 'ewma') {
    const c = ewmaChart(x, { mu0, sigma, lambda: settings.ewma_lambda, L: settings.ewma_L, baselineCount: base.length });
    idx.forEach((pi, k) => Object.assign(points[pi], { chartValue: c.z[k], chartUpper: c.upper[k], chartLower: c.lower[k], signal: c.signal[k] }));
    s.firstSignal = c.firstSignal === null ? null : points[idx[c.firstSignal]].month;
  } else {
    const c = cusumChart(x, { mu0, sigma, k: settings.cusum_k, h: settings.cusum_h });
    idx.forEach((pi, k) =>
      Object.assign(points[pi], { chartValue: Math.max(c.high[k], c.low[k]), chartUpper: c.high[k], chartLower: c.low[k], chartLimit: c.H, signal: c.signal[k] }),
    );
    s.firstSignal = c.firstSignal === null ? null : points[idx[c.firstSignal]].month;
  }
  return s;
}
