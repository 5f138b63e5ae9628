/**
 * Population sparseness across time: each bin's Vinje–Gallant sparseness across units
 * (Willmore & Tolhurst 2001), summarised in consecutive windows (`populationWindows`): the line is
 * each window's mean, the light band its min–max. The audit's estimate (mean over defined bins)
 * is the horizontal rule, its bootstrap interval the darker horizontal band (our bounds).
 * The x axis is in seconds when the bin width is known, in bins otherwise. Windows with no
 * defined bin break the line (shown as a gap, never bridged).
 */
import type { ActivityChartData, ChartSpec, DatasetResult, MeasureResult } from '../types.ts';
import { estimatePhrase, estimateWithInterval, fmt, frame, slug } from './format.ts';
import { fitDomain } from './domain.ts';
import { ROLE } from './theme.ts';
import { minOf, maxOf } from '../util/arrays.ts';

type Windows = ActivityChartData['populationWindows'];

/** Population sparseness over time (or event-based, with `events: true`), or null without data. */
export function populationSparsenessChart(ds: DatasetResult, options: { events?: boolean } = {}): ChartSpec | null {
  if (ds.kind !== 'activity') return null;
  const cd = ds.chartData as ActivityChartData;
  const windows: Windows | undefined = options.events ? cd.eventPopulationWindows : cd.populationWindows;
  const m: MeasureResult | undefined = options.events ? ds.eventMeasures?.population_sparseness : ds.measures.population_sparseness;
  if (!m || !windows || windows.length === 0) return null;
  if (!windows.some((w) => w.mean !== null)) return null;
  const scale = cd.binMs !== null && cd.binMs > 0 ? cd.binMs / 1000 : null;
  const xTitle = scale !== null ? 'time (s)' : 'bin';
  const rows = windows.map((w) => ({
    start: scale !== null ? w.binStart * scale : w.binStart,
    end: scale !== null ? (w.binStart + w.bins) * scale : w.binStart + w.bins,
    mid: scale !== null ? (w.binStart + w.bins / 2) * scale : w.binStart + w.bins / 2,
    mean: w.mean,
    min: w.min,
    max: w.max,
    defined: w.defined,
    bins: w.bins,
  }));
  const x = { field: 'mid', type: 'quantitative', title: xTitle, scale: { zero: false, nice: false } };
  // 1. The y axis fits the window values and the interval (a 0–1 axis flattens a series near 0.99).
  const fitted = fitDomain(domainValues(windows, m), { bounds: [0, 1] }) ?? [0, 1];
  const y = { type: 'quantitative', title: options.events ? 'event population sparseness' : 'population sparseness', scale: { domain: fitted, nice: false, zero: false } };
  const layers: Record<string, unknown>[] = [];
  if (m.interval) {
    layers.push({
      data: { values: [{ estimate: m.estimate, lower: m.interval[0], upper: m.interval[1], level: m.level }] },
      mark: { type: 'rect', color: ROLE.estimate, opacity: 0.22 },
      encoding: { y: { ...y, field: 'lower' }, y2: { field: 'upper' } },
    });
  }
  layers.push({
    data: { values: rows },
    layer: [
      { mark: { type: 'area', color: ROLE.range, opacity: 0.35, invalid: 'break-paths-show-domains' }, encoding: { x, y: { ...y, field: 'min' }, y2: { field: 'max' } } },
      {
        mark: { type: 'line', color: ROLE.data, strokeWidth: 1.5, point: { size: 14, filled: true, color: ROLE.data }, invalid: 'break-paths-show-domains' },
        encoding: {
          x,
          y: { ...y, field: 'mean' },
          tooltip: [
            { field: 'start', type: 'quantitative', title: `from (${xTitle})`, format: '.4~g' },
            { field: 'end', type: 'quantitative', title: `to (${xTitle})`, format: '.4~g' },
            { field: 'mean', type: 'quantitative', format: '.4~g' },
            { field: 'min', type: 'quantitative', format: '.4~g' },
            { field: 'max', type: 'quantitative', format: '.4~g' },
            { field: 'defined', type: 'quantitative', title: 'defined bins' },
          ],
        },
      },
    ],
  });
  if (m.estimate !== null) {
    // 2. The rule only: its value is written in the subtitle, where it covers no data.
    const est = { data: { values: [{ estimate: m.estimate }] } };
    // A paper-coloured halo under the dashed rule keeps it visible over a dense data line (and in greyscale).
    layers.push({ ...est, mark: { type: 'rule', color: ROLE.paper, strokeWidth: 4.5, opacity: 0.9 }, encoding: { y: { ...y, field: 'estimate' } } });
    layers.push({ ...est, mark: { type: 'rule', color: ROLE.estimate, strokeWidth: 2, strokeDash: [6, 3] }, encoding: { y: { ...y, field: 'estimate' } } });
  }
  const empty = windows.filter((w) => w.mean === null).length;
  const means = windows.map((w) => w.mean).filter((v): v is number => v !== null);
  const kind = options.events ? 'Event-based population sparseness' : 'Population sparseness';
  const span = rows.length ? `${fmt(rows[0]!.start)} to ${fmt(rows[rows.length - 1]!.end)} ${scale !== null ? 's' : 'bins'}` : '';
  const title = `${kind} over ${scale !== null ? 'time' : 'bins'} — ${ds.id}`;
  const description =
    `${kind} across units of dataset ${ds.id}, over ${span}, in ${windows.length} windows of ${cd.windowBins} bins` +
    (scale !== null ? ` (${fmt(cd.windowBins * scale)} s each)` : '') +
    `; window means range from ${fmt(minOf(means))} to ${fmt(maxOf(means))}` +
    (empty ? `, ${empty} windows have no defined bin and are left as gaps` : '') +
    `. Mean over defined bins: ${estimatePhrase(m)}. ${axisSentence(fitted)}`;
  return {
    id: `${slug(ds.id)}--${options.events ? 'event-' : ''}population-sparseness`,
    title,
    description,
    datasetId: ds.id,
    spec: frame(title, description, { layer: layers }, { subtitle: subtitle(m, fitted) }),
  };
}

/** Every value the y axis must show: window means, minima and maxima, the estimate and its interval. */
function* domainValues(windows: Windows, m: MeasureResult): Generator<number | null> {
  for (const w of windows) {
    yield w.min;
    yield w.max;
    yield w.mean;
  }
  yield m.estimate;
  if (m.interval) yield* m.interval;
}

/** The caption's sentence on the y axis, since it does not start at 0. */
export function axisSentence(domain: [number, number]): string {
  return domain[0] === 0 && domain[1] === 1
    ? 'The vertical axis spans the whole range, 0 to 1.'
    : `The vertical axis spans ${fmt(domain[0])} to ${fmt(domain[1])}, fitted to the window values and the interval, not the whole range 0 to 1.`;
}

/** Legend in words, with the estimate's value (kept off the plot so it covers no data). */
function subtitle(m: MeasureResult, domain: [number, number]): string {
  const value = estimateWithInterval(m);
  return `line: window mean · light band: window min–max · dashed line: mean over bins, ${value}${m.interval ? ' · dark band: its bootstrap interval' : ''}${domain[0] === 0 && domain[1] === 1 ? '' : ' · axis fitted to the data'}`;
}
