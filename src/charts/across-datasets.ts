/**
 * One measure across every dataset of an audit, on one shared axis: a row per dataset (or per
 * month), the estimate as a point and its bootstrap interval as a capped bar (our bounds, never
 * Vega-Lite's `extent: "ci"`). Groups (rigs, conditions) differ by colour, point shape AND name
 * (a legend), so an outlying dataset stands out at once and the chart reads in greyscale. A
 * dotted line marks the median of the datasets' estimates, to judge distance from the bulk.
 *
 * Meant to be placed once per measure on a version page (`acrossDatasetsMeasures` lists them):
 * unlike the per-dataset measures chart, where each row has its own axis and every bar looks
 * full width, here all datasets share one axis.
 *
 *   acrossDatasetsChart(result.datasets, 'lifetime_sparseness')            // one row per dataset
 *   acrossDatasetsChart(result.datasets, 'event_density', { by: 'month' }) // one row per month
 */
import type { ChartSpec, DatasetResult, MeasureResult } from '../types.ts';
import { fitDomain } from './domain.ts';
import { fmt, frame, measureLabel, pct, slug } from './format.ts';
import { CATEGORY, CHART_WIDTH, estimateTextWidth, ROLE, SHAPES, SVG_WIDTH, TYPE } from './theme.ts';

/** Widest row label in px (by Vega's estimate); longer labels end in "…" (the caption has them whole). */
const LABEL_LIMIT = 150;

/** Group name used for datasets without a group. */
export const NO_GROUP = 'no group';

/** Row label used, with `by: 'month'`, for datasets without a month. */
export const NO_MONTH = 'no month';

export interface AcrossDatasetsOptions {
  /** One row per dataset (default) or per month (datasets of one month side by side in its row). */
  by?: 'dataset' | 'month';
}

/** One plotted row of the chart: plain JSON taken from one dataset's measure. */
export interface AcrossDatasetsRow {
  dataset: string;
  month: string | null;
  group: string;
  /** The label on the band axis: the dataset id, or the month with `by: 'month'`. */
  row: string;
  /** Position among the datasets sharing this row (0, 1, …): they are drawn one below the other. */
  slot: number;
  estimate: number | null;
  lower: number | null;
  upper: number | null;
  n: number;
}

/**
 * The measure keys present in any dataset, in a stable order: plain measures as in
 * `DatasetResult.measures` (e.g. `lifetime_sparseness`), then event-based ones as
 * `event_<name>` (e.g. `event_density`), the naming of the measures table.
 */
export function acrossDatasetsMeasures(datasets: DatasetResult[]): string[] {
  const plain = new Set<string>();
  const events = new Set<string>();
  for (const ds of datasets) {
    for (const [k, m] of Object.entries(ds.measures)) if (m) plain.add(k);
    for (const [k, m] of Object.entries(ds.eventMeasures ?? {})) if (m) events.add(`event_${k}`);
  }
  return [...plain, ...events];
}

/** The measure `key` of one dataset (`event_…` reads `eventMeasures`), or undefined. */
function measureOf(ds: DatasetResult, key: string): MeasureResult | undefined {
  if (key.startsWith('event_')) return (ds.eventMeasures as Record<string, MeasureResult | undefined> | undefined)?.[key.slice(6)];
  return (ds.measures as Record<string, MeasureResult | undefined>)[key];
}

/** Human label of a measure key, event-based ones prefixed "event". */
function keyLabel(key: string): string {
  return key.startsWith('event_') ? `event ${measureLabel(key.slice(6))}` : measureLabel(key);
}

/** The rows drawn, in dataset order; datasets without this measure are left out. */
export function acrossDatasetsRows(datasets: DatasetResult[], measure: string, options: AcrossDatasetsOptions = {}): AcrossDatasetsRow[] {
  const out: AcrossDatasetsRow[] = [];
  const slots = new Map<string, number>();
  for (const ds of datasets) {
    const m = measureOf(ds, measure);
    if (!m) continue;
    const row = options.by === 'month' ? (ds.month ?? NO_MONTH) : ds.id;
    const slot = slots.get(row) ?? 0;
    slots.set(row, slot + 1);
    out.push({
      dataset: ds.id,
      month: ds.month,
      group: ds.group ?? NO_GROUP,
      row,
      slot,
      estimate: m.estimate,
      lower: m.interval ? m.interval[0] : null,
      upper: m.interval ? m.interval[1] : null,
      n: m.n,
    });
  }
  return out;
}

/** Median of the defined estimates (mean of the middle two for an even count), or null. */
function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const s = [...values].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h]! : (s[h - 1]! + s[h]!) / 2;
}

/**
 * The chart of one measure across `datasets` (from `AuditResult.datasets`), or null when no
 * dataset has that measure. `measure` is a key of `DatasetResult.measures`, or `event_<name>`
 * for an event-based measure; `acrossDatasetsMeasures` lists the keys present. The returned
 * `description` is the caption: every dataset's estimate and interval, the median and the
 * dataset farthest from it.
 */
export function acrossDatasetsChart(datasets: DatasetResult[], measure: string, options: AcrossDatasetsOptions = {}): ChartSpec | null {
  const rows = acrossDatasetsRows(datasets, measure, options);
  if (rows.length === 0) return null;
  const by = options.by ?? 'dataset';
  const label = keyLabel(measure);

  // 1. Groups: one colour, shape and name each, in order of first appearance.
  const groups = [...new Set(rows.map((r) => r.group))];
  const pick = <T>(list: T[]) => groups.map((_, i) => list[i % list.length]!);
  const groupScale = (range: unknown[]) => ({ field: 'group', type: 'nominal', title: 'group', scale: { domain: groups, range }, legend: groups.length > 1 ? {} : null });

  // 2. One shared axis, fitted to every estimate and interval bound.
  const defined = rows.filter((r): r is AcrossDatasetsRow & { estimate: number } => r.estimate !== null);
  const domain = fitDomain(rows.flatMap((r) => [r.estimate, r.lower, r.upper])) ?? [0, 1];
  const mid = median(defined.map((r) => r.estimate));
  const order = [...new Set(rows.map((r) => r.row))];
  // Row labels take what SVG_WIDTH leaves beside them; the plot gets the rest (at least 160 px).
  let longest = 0;
  for (const r of order) longest = Math.max(longest, estimateTextWidth(r, TYPE.label));
  const labelPx = Math.min(LABEL_LIMIT, longest);
  const plotWidth = Math.max(160, Math.min(CHART_WIDTH, SVG_WIDTH - 16 - labelPx - 12));
  const y = { field: 'row', type: 'nominal', title: null, sort: order, axis: { labelLimit: LABEL_LIMIT, ticks: false } };
  // Five ticks at most: a narrow plot with more runs their labels together ("0.860.870.88").
  const x = { type: 'quantitative', title: label, scale: { domain, nice: false, zero: false }, axis: { tickCount: 5, labelOverlap: 'greedy' } };
  const perRow = maxPerRow(rows);
  const yOffset = perRow > 1 ? { yOffset: { field: 'slot', type: 'ordinal', scale: { paddingOuter: 0.5 } } } : {};
  const data = { data: { values: rows } };

  // 3. Layers: median line, interval bars with caps, estimate points, "no estimate" notes.
  const layers: Record<string, unknown>[] = [];
  if (mid !== null) layers.push({ data: { values: [{ median: mid }] }, mark: { type: 'rule', color: ROLE.muted, strokeDash: [1, 3], strokeWidth: 1.5 }, encoding: { x: { ...x, field: 'median' } } });
  if (rows.some((r) => r.lower !== null && r.upper !== null)) {
    const withInterval = { ...data, transform: [{ filter: 'isValid(datum.lower) && isValid(datum.upper)' }] };
    layers.push({ ...withInterval, mark: { type: 'rule', strokeWidth: 2 }, encoding: { y, ...yOffset, x: { ...x, field: 'lower' }, x2: { field: 'upper' }, color: groupScale(pick(CATEGORY)) } });
    layers.push({
      ...withInterval,
      transform: [...withInterval.transform, { fold: ['lower', 'upper'], as: ['end', 'bound'] }],
      mark: { type: 'tick', orient: 'vertical', thickness: 2, size: 9 },
      encoding: { y, ...yOffset, x: { ...x, field: 'bound' }, color: groupScale(pick(CATEGORY)) },
    });
  }
  if (defined.length) layers.push({
    ...data,
    transform: [{ filter: 'isValid(datum.estimate)' }],
    mark: { type: 'point', filled: true, size: 80, strokeWidth: 1.5, stroke: ROLE.paper, opacity: 1 },
    encoding: {
      y,
      ...yOffset,
      x: { ...x, field: 'estimate' },
      color: groupScale(pick(CATEGORY)),
      shape: groupScale(pick(SHAPES)),
      tooltip: [
        { field: 'dataset', type: 'nominal' },
        { field: 'group', type: 'nominal' },
        { field: 'estimate', type: 'quantitative', format: '.4~g' },
        { field: 'lower', type: 'quantitative', format: '.4~g' },
        { field: 'upper', type: 'quantitative', format: '.4~g' },
        { field: 'n', type: 'quantitative' },
      ],
    },
  });
  if (defined.length < rows.length) layers.push({
    ...data,
    transform: [{ filter: '!isValid(datum.estimate)' }, { calculate: "'no estimate'", as: 'note' }],
    mark: { type: 'text', align: 'left', dx: 2, color: ROLE.muted, fontStyle: 'italic' },
    encoding: { y, ...yOffset, x: { value: 0 }, text: { field: 'note', type: 'nominal' } },
  });

  // 4. Caption: every value, the median, and the farthest dataset.
  const phrase = (r: AcrossDatasetsRow) =>
    `${r.dataset}${r.group !== NO_GROUP ? ` (${r.group})` : ''} ${r.estimate === null ? 'no estimate' : fmt(r.estimate)}${r.lower !== null && r.upper !== null ? ` [${fmt(r.lower)}, ${fmt(r.upper)}]` : ''}`;
  let far: (typeof defined)[number] | null = null;
  if (mid !== null) for (const r of defined) if (!far || Math.abs(r.estimate - mid) > Math.abs(far.estimate - mid)) far = r;
  const m0 = datasets.map((d) => measureOf(d, measure)).find((m) => m?.interval);
  const ci = m0 ? `${m0.level !== null ? `${pct(m0.level)} ` : ''}bootstrap interval` : '';
  const title = `${label[0]!.toUpperCase()}${label.slice(1)} across ${by === 'month' ? 'months' : 'datasets'}`;
  const description =
    `${title}: the estimate of each of ${rows.length} datasets${m0 ? ` with its ${ci}` : ''}` +
    (groups.length > 1 ? `, in ${groups.length} groups told apart by colour and shape (${groups.join(', ')})` : '') +
    `, on one shared axis from ${fmt(domain[0])} to ${fmt(domain[1])}: ${rows.map(phrase).join('; ')}.` +
    (mid !== null ? ` Median of the estimates ${fmt(mid)} (dotted line)` : '') +
    (far && defined.length > 2 ? `; farthest from it: ${far.dataset} (${fmt(far.estimate)}).` : mid !== null ? '.' : '');
  const subtitle = `point: estimate${m0 ? ' · bar: bootstrap interval' : ''}${mid !== null ? ` · dotted line: median of datasets, ${fmt(mid)}` : ''}`;
  const body = { width: plotWidth, height: perRow > 1 ? { step: 16, for: 'offset' } : { step: 24 }, layer: layers };
  return { id: `across--${slug(measure)}${by === 'month' ? '--by-month' : ''}`, title, description, datasetId: null, spec: frame(title, description, body, { noSize: true, subtitle }) };
}

/** Most datasets sharing one row (one month). */
function maxPerRow(rows: AcrossDatasetsRow[]): number {
  const n = new Map<string, number>();
  let most = 0;
  for (const r of rows) {
    const k = (n.get(r.row) ?? 0) + 1;
    n.set(r.row, k);
    if (k > most) most = k;
  }
  return most;
}

/**
 * One across-datasets chart per measure present (`acrossDatasetsMeasures` order), for a version
 * page; `buildCharts` adds them, and the page puts them in its across-datasets section.
 */
export function acrossDatasetsCharts(datasets: DatasetResult[], options: AcrossDatasetsOptions = {}): ChartSpec[] {
  const out: ChartSpec[] = [];
  for (const m of acrossDatasetsMeasures(datasets)) {
    const c = acrossDatasetsChart(datasets, m, options);
    if (c) out.push(c);
  }
  return out;
}
