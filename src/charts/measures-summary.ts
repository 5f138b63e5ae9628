/**
 * Every measure of one dataset: the estimate as a point and its bootstrap interval as a bar,
 * drawn from our computed bounds, one row per measure (each row its own x scale, since
 * kurtosis is not on the 0–1 scale of the sparseness measures). Event-based measures, when
 * present, get their own rows labelled "event …". Measures without an interval show the point
 * only; measures without an estimate are named in the description and labelled in the chart.
 */
import type { ChartSpec, DatasetResult, MeasureResult } from '../types.ts';
import { estimatePhrase, fmt, frame, measureLabel, slug } from './format.ts';
import { CHART_WIDTH, ESTIMATE_SHAPE, ROLE, TYPE } from './theme.ts';

interface Row {
  measure: string;
  name: string;
  estimate: number | null;
  lower: number | null;
  upper: number | null;
  level: number | null;
  n: number;
  excluded: number;
  label: string;
}

function row(name: string, label: string, m: MeasureResult): Row {
  return {
    measure: label,
    name,
    estimate: m.estimate,
    lower: m.interval ? m.interval[0] : null,
    upper: m.interval ? m.interval[1] : null,
    level: m.level,
    n: m.n,
    excluded: m.excluded,
    label:
      m.estimate === null
        ? 'no estimate'
        : `${fmt(m.estimate)}${m.interval ? ` [${fmt(m.interval[0])}, ${fmt(m.interval[1])}]` : ' (no interval)'} n=${m.n}`,
  };
}

/** The rows drawn by `measuresSummaryChart`, in order (exported for the page tables and tests). */
export function measureRows(ds: DatasetResult): Row[] {
  const rows: Row[] = [];
  for (const [name, m] of Object.entries(ds.measures)) if (m) rows.push(row(name, measureLabel(name), m));
  for (const [name, m] of Object.entries(ds.eventMeasures ?? {})) if (m) rows.push(row(`event_${name}`, `event ${measureLabel(name)}`, m));
  return rows;
}

/**
 * One row: the measure's name and numbers as a line of text above its own axis, then the
 * interval bar and the estimate diamond. Text above rather than beside the axis keeps the chart
 * as narrow as the others (legible on a phone).
 */
function rowChart(r: Row): Record<string, unknown> {
  const data = { data: { values: [r] } };
  const x = { type: 'quantitative', title: null, scale: { zero: false }, axis: { grid: true, tickCount: 4 } };
  const layers: Record<string, unknown>[] = [];
  if (r.lower !== null && r.upper !== null) {
    layers.push({ ...data, mark: { type: 'rule', color: ROLE.estimate, strokeWidth: 2.5 }, encoding: { x: { ...x, field: 'lower' }, x2: { field: 'upper' } } });
  }
  if (r.estimate !== null) {
    layers.push({
      ...data,
      mark: { type: 'point', shape: ESTIMATE_SHAPE, filled: true, size: 70, color: ROLE.ink },
      encoding: {
        x: { ...x, field: 'estimate' },
        tooltip: [
          { field: 'measure', type: 'nominal' },
          { field: 'estimate', type: 'quantitative', format: '.4~g' },
          { field: 'lower', type: 'quantitative', format: '.4~g' },
          { field: 'upper', type: 'quantitative', format: '.4~g' },
          { field: 'n', type: 'quantitative' },
          { field: 'excluded', type: 'quantitative' },
        ],
      },
    });
  }
  if (layers.length === 0) layers.push({ ...data, mark: { type: 'text', align: 'left', color: ROLE.muted }, encoding: { x: { value: 0 }, text: { value: 'no estimate' } } });
  return {
    width: CHART_WIDTH,
    height: 16,
    title: { text: r.measure, subtitle: r.label, anchor: 'start', fontSize: TYPE.label, fontWeight: 600, color: ROLE.ink, subtitleFontSize: TYPE.label, subtitlePadding: 1, offset: 4 },
    layer: layers,
  };
}

/** The per-dataset measures chart, or null when the dataset has no measures. */
export function measuresSummaryChart(ds: DatasetResult): ChartSpec | null {
  const rows = measureRows(ds);
  if (rows.length === 0) return null;
  const charts = rows.map((r) => rowChart(r));
  const spec = { vconcat: charts, spacing: 10 };
  const title = `Measures — ${ds.id}`;
  const anyInterval = Object.values(ds.measures).some((m) => m?.interval) || Object.values(ds.eventMeasures ?? {}).some((m) => m?.interval);
  const description =
    `Estimates of ${rows.length} measures for dataset ${ds.id}, ${anyInterval ? 'each with its bootstrap interval where one was computed' : 'without intervals'}: ` +
    Object.entries(ds.measures)
      .filter((e): e is [string, MeasureResult] => e[1] !== undefined)
      .map(([name, m]) => `${measureLabel(name)} ${estimatePhrase(m)}`)
      .concat(Object.entries(ds.eventMeasures ?? {}).filter((e): e is [string, MeasureResult] => e[1] !== undefined).map(([name, m]) => `event ${measureLabel(name)} ${estimatePhrase(m)}`))
      .join('; ') +
    '.';
  return {
    id: `${slug(ds.id)}--measures`,
    title,
    description,
    datasetId: ds.id,
    spec: frame(title, description, spec, { noSize: true, subtitle: anyInterval ? 'diamond: estimate · bar: bootstrap interval' : 'diamond: estimate (no sampling interval: every element was measured)' }),
  };
}
