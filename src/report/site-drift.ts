/**
 * Page models for `drift.html` (the monthly series of one audit version) and `compare.html`
 * (what changed since the previous version). Text fields only; the templates escape them.
 */
import type { DriftResult, VersionComparison } from '../types.ts';
import type { ChartModel } from './site-charts.ts';
import { NONE, formatCount, formatInterval, formatLevel, formatNumber, formatValue, measureLabel } from './site-format.ts';

export interface DriftSeriesModel {
  heading: string;
  anchor: string;
  baseline: string;
  trend: string;
  slope: string;
  pAdjusted: string;
  firstSignal: string;
  chart: string;
  points: {
    month: string;
    estimate: string;
    interval: string;
    n: string;
    thin: string;
    datasets: string;
    chartValue: string;
    limits: string;
    signal: string;
  }[];
}

export interface DriftModel {
  summary: string;
  months: string;
  pooling: string;
  chart: string;
  adjustment: string;
  testsRun: string;
  series: DriftSeriesModel[];
  groupDifferences: { measure: string; month: string; pair: string; difference: string; interval: string }[];
  charts: ChartModel[];
}

const CHART_WORDS = {
  ewma: 'EWMA chart (Roberts 1959): exponentially weighted moving average against limits from the baseline months',
  cusum: 'CUSUM chart (Page 1954): cumulative sums of deviations from the baseline mean',
} as const;

const ADJUST_WORDS = { holm: 'Holm (1979) step-down', bh: 'Benjamini–Hochberg (1995) false discovery rate', none: 'none' } as const;

function limits(upper: number | null | undefined, lower: number | null | undefined): string {
  if ((upper === null || upper === undefined) && (lower === null || lower === undefined)) return '—';
  return `${formatNumber(lower)} to ${formatNumber(upper)}`;
}

/** Build the drift page model. `anchorFor` hands out unique ids for the series sections. */
export function driftModel(drift: DriftResult, charts: ChartModel[], anchorFor: (text: string) => string): DriftModel {
  return {
    summary: drift.summary,
    months: drift.months.length ? `${drift.months[0]} to ${drift.months[drift.months.length - 1]} (${drift.months.length} months)` : 'no months',
    pooling: drift.pooling,
    chart: CHART_WORDS[drift.chart],
    adjustment: ADJUST_WORDS[drift.adjustment],
    testsRun: formatCount(drift.testsRun),
    series: drift.series.map((s) => {
      const heading = `${measureLabel(s.measure)}${s.layer ? `, layer ${s.layer}` : ''}${s.group ? ` — ${s.group}` : ''}`;
      const mk = s.mannKendall;
      const ts = s.theilSen;
      return {
        heading,
        anchor: anchorFor(`drift-${s.measure}${s.layer ? `-${s.layer}` : ''}-${s.group ?? 'all'}`),
        baseline: s.baseline
          ? `mean ${formatNumber(s.baseline.mean)}, SD ${formatNumber(s.baseline.sd)} over ${s.baselineMonths.join(', ')}`
          : `not available (baseline months: ${s.baselineMonths.join(', ') || 'none'})`,
        trend: mk ? `Mann–Kendall S = ${mk.S}, z = ${formatNumber(mk.z)}, p = ${formatNumber(mk.p)} (unadjusted), n = ${mk.n} months` : 'not tested (too few months)',
        slope: ts
          ? `Theil–Sen slope ${formatNumber(ts.slope)} per month, ${formatLevel(ts.level)} interval ${formatInterval([ts.lower, ts.upper])}`
          : 'not estimated',
        pAdjusted: formatNumber(s.pAdjusted),
        firstSignal: s.firstSignal ?? 'no signal',
        chart: s.chart.toUpperCase(),
        points: s.points.map((p) => ({
          month: p.month,
          estimate: formatNumber(p.estimate),
          interval: formatInterval(p.interval),
          n: formatCount(p.n),
          thin: p.thin ? 'thin month' : '',
          datasets: p.datasets.join(', '),
          chartValue: formatNumber(p.chartValue),
          limits: s.chart === 'cusum' ? cusumText(p.chartUpper, p.chartLower, p.chartLimit) : limits(p.chartUpper, p.chartLower),
          signal: p.signal ? 'signal' : '',
        })),
      };
    }),
    groupDifferences: drift.groupDifferences.map((g) => ({
      measure: measureLabel(g.measure),
      month: g.month,
      pair: `${g.a} − ${g.b}`,
      difference: formatNumber(g.difference),
      interval: formatInterval(g.interval),
    })),
    charts,
  };
}

export interface CompareModel {
  from: string;
  to: string;
  summary: string;
  inputs: { path: string; change: string }[];
  parameters: { name: string; from: string; to: string }[];
  /** Only datasets that were added, removed or changed, or whose estimates moved. */
  datasets: {
    id: string;
    change: string;
    /** Only the measures whose estimate changed. */
    measures: { measure: string; from: string; to: string; delta: string; relative: string; overlap: string }[];
  }[];
  /** One line for everything that did not change (`The other 11 datasets: no estimate changed.`), or ''. */
  unchanged: string;
}

/** A measure moved when its estimate changed, or appeared, or vanished. */
function moved(m: VersionComparison['datasets'][number]['measures'][number]): boolean {
  if (m.from === null || m.to === null) return m.from !== m.to;
  return m.delta !== 0 || m.from !== m.to;
}

/**
 * Build the comparison page model: what changed and nothing else. Unchanged datasets and
 * measures are counted in one line instead of shown as tables of zeros.
 */
export function compareModel(c: VersionComparison): CompareModel {
  const shown = c.datasets
    .map((d) => ({ ...d, measures: d.measures.filter(moved) }))
    .filter((d) => d.change !== 'same' || d.measures.length > 0);
  const rest = c.datasets.length - shown.length;
  const steady = shown.reduce((k, d) => k + (c.datasets.find((x) => x.id === d.id)?.measures.length ?? 0) - d.measures.length, 0);
  const parts: string[] = [];
  if (rest > 0) {
    const who = shown.length ? (rest === 1 ? 'The other dataset' : `The other ${rest} datasets`) : rest === 1 ? 'The one dataset' : `All ${rest} datasets`;
    parts.push(`${who}: no estimate changed`);
  }
  if (steady > 0) parts.push(`${steady} other ${steady === 1 ? 'estimate' : 'estimates'} of the datasets above unchanged`);
  return {
    from: c.from,
    to: c.to,
    summary: c.summary,
    inputs: c.inputs.map((i) => ({ path: i.path, change: i.change })),
    parameters: c.parameters.map((p) => ({ name: p.name, from: formatValue(p.from), to: formatValue(p.to) })),
    datasets: shown.map((d) => ({
      id: d.id,
      change: d.change,
      measures: d.measures.map((m) => ({
        measure: measureLabel(m.measure),
        from: formatNumber(m.from),
        to: formatNumber(m.to),
        delta: m.delta === null ? '—' : `${m.delta > 0 ? '+' : ''}${formatNumber(m.delta)}`,
        relative: m.relative === null ? '—' : `${m.relative > 0 ? '+' : ''}${formatNumber(m.relative * 100)}%`,
        overlap: m.overlap === null ? 'no interval to compare' : m.overlap ? 'intervals overlap' : 'intervals do not overlap',
      })),
    })),
    unchanged: parts.length ? `${parts.join('; ')}.` : '',
  };
}

/** CUSUM columns: the two one-sided sums against the decision interval H. */
function cusumText(high: number | null | undefined, low: number | null | undefined, h: number | null | undefined): string {
  if (high === null || high === undefined || low === null || low === undefined) return NONE;
  return `S_H ${formatNumber(high)}, S_L ${formatNumber(low)}${h === null || h === undefined ? '' : ` (signal above H = ${formatNumber(h)})`}`;
}
