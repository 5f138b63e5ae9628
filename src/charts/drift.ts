/**
 * Drift: one chart per series (measure × group). Monthly estimates with their bootstrap
 * intervals (our bounds), the baseline band (baseline mean ± 1 SD) and mean, the EWMA
 * statistic and its control limits (Roberts 1959) on the same scale, or for CUSUM (Page 1954)
 * a second panel with the chart statistics. Flagged months are marked by SHAPE (a triangle)
 * and a text label in the margin above their column (never over data), thin months by a hollow square and a label — colour is never the only cue.
 */
import type { ChartSpec, DriftResult, DriftSeries } from '../types.ts';
import { fmt, frame, measureLabel, pct, slug } from './format.ts';
import { CHART_WIDTH, estimateTextWidth, ROLE, TYPE } from './theme.ts';

const STATUS = ['in control', 'thin month', 'signal'] as const;
const STATUS_SHAPE = ['circle', 'square', 'triangle-up'];
const STATUS_COLOUR = [ROLE.data, ROLE.muted, ROLE.signal];

function status(p: DriftSeries['points'][number]): (typeof STATUS)[number] {
  return p.signal ? 'signal' : p.thin ? 'thin month' : 'in control';
}

function describe(s: DriftSeries, drift: DriftResult): string {
  const who = `${measureLabel(s.measure)}${s.layer ? ` of layer ${s.layer}` : ''}${s.group ? ` (group ${s.group})` : ''}`;
  const pts = s.points;
  const parts = [`Monthly ${who} over ${pts.length} months, ${pts[0]?.month ?? ''} to ${pts[pts.length - 1]?.month ?? ''}.`];
  if (s.baseline) parts.push(`Baseline (${s.baselineMonths.join(', ')}): mean ${fmt(s.baseline.mean)}, SD ${fmt(s.baseline.sd)}.`);
  const listed = pts.slice(0, 36).map((p) =>
    p.estimate === null ? `${p.month} no estimate` : `${p.month} ${fmt(p.estimate)}${p.interval ? ` [${fmt(p.interval[0])}, ${fmt(p.interval[1])}]` : ''} (n = ${p.n})`,
  );
  parts.push(`Estimates: ${listed.join('; ')}${pts.length > 36 ? `; and ${pts.length - 36} more months` : ''}.`);
  const flagged = pts.filter((p) => p.signal).map((p) => p.month);
  parts.push(flagged.length ? `${s.chart.toUpperCase()} signal (screening flag) in ${flagged.join(', ')}; first ${s.firstSignal ?? flagged[0]}.` : `No month crossed the ${s.chart.toUpperCase()} limits.`);
  const thin = pts.filter((p) => p.thin).map((p) => p.month);
  if (thin.length) parts.push(`Thin months (too few units or bins): ${thin.join(', ')}.`);
  if (s.mannKendall) parts.push(`Mann–Kendall z = ${fmt(s.mannKendall.z)}, p = ${fmt(s.mannKendall.p)}${s.pAdjusted !== null ? `, adjusted p (${drift.adjustment}) = ${fmt(s.pAdjusted)}` : ''}.`);
  if (s.theilSen) parts.push(`Theil–Sen slope ${fmt(s.theilSen.slope)} per month (${pct(s.theilSen.level)} CI ${fmt(s.theilSen.lower)} to ${fmt(s.theilSen.upper)}).`);
  return parts.join(' ');
}

/** The drift chart of one series. */
export function driftSeriesChart(s: DriftSeries, drift: DriftResult): ChartSpec {
  const months = drift.months.length ? drift.months : s.points.map((p) => p.month);
  const rows = s.points.map((p) => ({
    month: p.month,
    estimate: p.estimate,
    lower: p.interval ? p.interval[0] : null,
    upper: p.interval ? p.interval[1] : null,
    n: p.n,
    datasets: p.datasets.join(', '),
    status: status(p),
    flag: p.signal ? 'signal' : p.thin ? 'thin' : '',
    chartValue: p.chartValue,
    chartUpper: p.chartUpper ?? null,
    chartLower: p.chartLower ?? null,
    chartLimit: p.chartLimit ?? null,
  }));
  const x = { field: 'month', type: 'ordinal', title: 'month', scale: { domain: months }, axis: { labelAngle: months.length * (estimateTextWidth('2026-01', TYPE.label) + 4) > CHART_WIDTH ? -40 : 0 } };
  const y = { type: 'quantitative', title: measureLabel(s.measure), scale: { zero: false } };
  const layers: Record<string, unknown>[] = [];
  if (s.baseline) {
    const b = { mean: s.baseline.mean, sd: s.baseline.sd, low: s.baseline.mean - s.baseline.sd, high: s.baseline.mean + s.baseline.sd, label: 'baseline mean ± 1 SD' };
    layers.push({ data: { values: [b] }, mark: { type: 'rect', color: ROLE.baseline, opacity: 0.6 }, encoding: { y: { ...y, field: 'low' }, y2: { field: 'high' } } });
    layers.push({ data: { values: [b] }, mark: { type: 'rule', color: ROLE.muted, strokeWidth: 1 }, encoding: { y: { ...y, field: 'mean' } } });
  }
  const pointData = { data: { values: rows } };
  if (s.chart === 'ewma' && rows.some((r) => r.chartValue !== null || r.chartUpper !== null || r.chartLower !== null)) {
    layers.push({
      ...pointData,
      transform: [{ fold: ['chartUpper', 'chartLower', 'chartValue'], as: ['line', 'value'] }, { filter: 'isValid(datum.value)' }, { calculate: "datum.line === 'chartValue' ? 'EWMA statistic' : datum.line === 'chartUpper' ? 'upper limit' : 'lower limit'", as: 'series' }],
      mark: { type: 'line', strokeWidth: 1.2, interpolate: 'step-after' },
      encoding: {
        x,
        y: { ...y, field: 'value' },
        detail: { field: 'series', type: 'nominal' },
        strokeDash: { field: 'series', type: 'nominal', title: null, scale: { domain: ['EWMA statistic', 'upper limit', 'lower limit'], range: [[1, 0], [5, 3], [5, 3]] } },
        color: { value: ROLE.limit },
        opacity: { value: 0.7 },
      },
    });
  }
  if (rows.some((r) => r.lower !== null && r.upper !== null)) layers.push({
    ...pointData,
    transform: [{ filter: 'isValid(datum.lower) && isValid(datum.upper)' }],
    mark: { type: 'rule', strokeWidth: 2, color: ROLE.data },
    encoding: { x, y: { ...y, field: 'lower' }, y2: { field: 'upper' } },
  });
  const statusScale = { domain: [...STATUS], range: STATUS_SHAPE };
  if (rows.some((r) => r.estimate !== null)) layers.push({
    ...pointData,
    transform: [{ filter: 'isValid(datum.estimate)' }],
    mark: { type: 'point', filled: true, size: 90, strokeWidth: 1.5 },
    encoding: {
      x,
      y: { ...y, field: 'estimate' },
      shape: { field: 'status', type: 'nominal', title: 'month', scale: statusScale },
      color: { field: 'status', type: 'nominal', title: 'month', scale: { domain: [...STATUS], range: STATUS_COLOUR } },
      tooltip: [
        { field: 'month', type: 'ordinal' },
        { field: 'estimate', type: 'quantitative', format: '.4~g' },
        { field: 'lower', type: 'quantitative', format: '.4~g' },
        { field: 'upper', type: 'quantitative', format: '.4~g' },
        { field: 'n', type: 'quantitative' },
        { field: 'datasets', type: 'nominal' },
        { field: 'status', type: 'nominal' },
      ],
    },
  });
  if (rows.some((r) => r.flag !== '' && r.estimate !== null)) layers.push({
    ...pointData,
    // In the margin above the plot, over the month's column: the word never covers data.
    transform: [{ filter: "datum.flag !== '' && isValid(datum.estimate)" }],
    mark: { type: 'text', baseline: 'bottom', dy: -4, fontWeight: 600, color: ROLE.ink },
    encoding: { x, y: { value: 0 }, text: { field: 'flag', type: 'nominal' } },
  });
  if (rows.some((r) => r.estimate === null)) layers.push({
    ...pointData,
    transform: [{ filter: '!isValid(datum.estimate)' }, { calculate: "'no estimate'", as: 'note' }],
    mark: { type: 'text', baseline: 'top', dy: 4, angle: 0, color: ROLE.muted },
    encoding: { x, y: { value: 0 }, text: { field: 'note', type: 'nominal' } },
  });
  const main = { layer: layers };
  const title = `Drift — ${measureLabel(s.measure)}${s.layer ? `, layer ${s.layer}` : ''}${s.group ? ` (${s.group})` : ''}`;
  const description = describe(s, drift);
  const id = `drift--${slug(s.measure)}${s.layer ? `--layer-${slug(s.layer)}` : ''}${s.group ? `--${slug(s.group)}` : ''}`;
  const subtitle = `${s.chart === 'ewma' ? 'EWMA' : 'CUSUM'} screening · bars: bootstrap intervals · grey band: baseline mean ± 1 SD`;
  if (s.chart === 'ewma') return { id, title, description, datasetId: null, spec: frame(title, description, main, { subtitle }) };
  const cusum = {
    width: CHART_WIDTH,
    height: 110,
    data: { values: rows },
    transform: [{ fold: ['chartValue', 'chartUpper', 'chartLower'], as: ['line', 'value'] }, { filter: 'isValid(datum.value)' }],
    mark: { type: 'line', point: { filled: true, size: 25 }, color: ROLE.limit },
    encoding: {
      x,
      y: { field: 'value', type: 'quantitative', title: 'CUSUM statistic' },
      strokeDash: { field: 'line', type: 'nominal', title: null, scale: { domain: ['chartValue', 'chartUpper', 'chartLower'], range: [[1, 0], [5, 3], [2, 2]] } },
      shape: { field: 'line', type: 'nominal', title: null, scale: { domain: ['chartValue', 'chartUpper', 'chartLower'], range: ['circle', 'triangle-up', 'triangle-down'] } },
    },
  };
  const { width: _w, height: _h, ...cusumLayer } = cusum;
  const hLimit = rows.find((r) => r.chartLimit !== null && r.chartLimit !== undefined)?.chartLimit ?? null;
  const cusumPanel =
    hLimit === null
      ? cusum
      : {
          width: CHART_WIDTH,
          height: 110,
          layer: [
            cusumLayer,
            { data: { values: [{ h: hLimit, label: `H = ${fmt(hLimit)}` }] }, mark: { type: 'rule', strokeDash: [6, 2], color: ROLE.limit }, encoding: { y: { field: 'h', type: 'quantitative' } } },
            { data: { values: [{ h: hLimit, label: `decision interval H = ${fmt(hLimit)}` }] }, mark: { type: 'text', align: 'left', dx: 4, dy: -6 }, encoding: { x: { value: 0 }, y: { field: 'h', type: 'quantitative' }, text: { field: 'label', type: 'nominal' } } },
          ],
        };
  const spec = { vconcat: [{ width: CHART_WIDTH, height: 200, ...main }, cusumPanel], resolve: { scale: { strokeDash: 'independent', shape: 'independent', color: 'independent' } } };
  return { id, title, description, datasetId: null, spec: frame(title, description, spec, { noSize: true, subtitle }) };
}

/** One chart per drift series. */
export function driftCharts(drift: DriftResult): ChartSpec[] {
  return drift.series.map((s) => driftSeriesChart(s, drift));
}
