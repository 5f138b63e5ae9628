/**
 * One activity dataset, end to end:
 *
 *   1. stream unit blocks from the reader into the fused one-pass engine (bounded memory);
 *   2. finish the pass: per-unit and per-bin values, counts;
 *   3. findings from the reader and from the counts;
 *   4. each measure summarised with its bootstrap interval (see summarise.ts);
 *   5. chart data (per-unit values in full, per-bin values in ≤ ~1,000 windows).
 */
import { createActivityPass, finishActivityPass, type ActivityPassResult, type ActivityPassState } from '../metrics/activity-pass.ts';
import { activityFindings } from '../metrics/activity-findings.ts';
import type { ResolvedDataset, ResolvedManifest } from '../manifest/types.ts';
import type { ActivityChartData, ActivitySource, DatasetResult, Finding, MeasureResult, UnitBlock } from '../types.ts';
import { summariseHere, type IntervalPlan, type SummariseJob } from './summarise.ts';

export const ACTIVITY_SUMMARIES = {
  population_sparseness: "mean over defined bins of each bin's Vinje–Gallant sparseness across units",
  lifetime_sparseness: "mean over defined units of each unit's Vinje–Gallant sparseness across bins",
  kurtosis: "median over units of each unit's excess kurtosis g2 across bins",
  density: 'fraction of all defined elements with |x| above the zero tolerance',
  hoyer: "mean over defined units of each unit's Hoyer sparseness across bins",
  gini: "mean over defined units of each unit's Gini index across bins",
  activity_ratio: "mean over defined units of each unit's Treves–Rolls activity ratio across bins",
} as const;

/** What the finish stage needs to know of a source (plain values: it crosses worker threads). */
export type SourceMeta = Pick<ActivitySource, 'units' | 'bins' | 'unitLabels' | 'binMs' | 'files' | 'findings'>;

export function sourceMeta(s: ActivitySource): SourceMeta {
  return { units: s.units, bins: s.bins, unitLabels: s.unitLabels, binMs: s.binMs, files: s.files, findings: s.findings };
}

function passOptions(m: ResolvedManifest, meta: SourceMeta) {
  const binMs = meta.binMs ?? m.bin_ms;
  const events = m.events
    ? {
        k: m.events.k,
        ...(m.events.baseline === 'trace' ? {} : { baselineBins: baselineBins(m.events.baseline, binMs, meta.bins) }),
      }
    : null;
  return { zeroTolerance: m.zero_tolerance, negatives: m.negatives, events, minNonzero: m.min_nonzero };
}

/**
 * Step 1: stream the units [range.unitStart, range.unitEnd) (all units when no range) through
 * the fused pass. States of disjoint ranges merge in `finishActivityPass`.
 */
export async function runActivityPass(
  source: ActivitySource & { blocks(o?: { maxBlockBytes?: number; unitStart?: number; unitEnd?: number }): AsyncIterable<UnitBlock> },
  m: ResolvedManifest,
  onBytes: (n: number) => void,
  range?: { unitStart: number; unitEnd: number },
): Promise<ActivityPassState> {
  const pass = createActivityPass({ units: source.units, bins: source.bins }, passOptions(m, source));
  for await (const block of source.blocks(range ? { unitStart: range.unitStart, unitEnd: range.unitEnd } : undefined)) {
    pass.addBlock(block);
    onBytes(block.units * block.bins * block.data.BYTES_PER_ELEMENT);
  }
  return pass.state();
}

export async function computeActivity(
  ds: ResolvedDataset,
  m: ResolvedManifest,
  source: ActivitySource,
  onBytes: (n: number) => void,
): Promise<Omit<DatasetResult, 'cacheKey'>> {
  return activityResult(ds, m, sourceMeta(source), [await runActivityPass(source, m, onBytes)]);
}

/**
 * Steps 2–5, from the pass states of one dataset (one state, or several over disjoint units).
 * `summariser` runs the measures' summaries and intervals: in this thread by default, or spread
 * over the lanes of the worker pool when a split dataset is finished.
 */
export async function activityResult(
  ds: ResolvedDataset,
  m: ResolvedManifest,
  source: SourceMeta,
  states: ActivityPassState[],
  summariser: (jobs: SummariseJob[]) => Promise<MeasureResult[]> = summariseHere,
): Promise<Omit<DatasetResult, 'cacheKey'>> {
  const binMs = source.binMs ?? m.bin_ms;
  // 2. Finish.
  const r = finishActivityPass(states.length === 1 ? states[0] : states);

  // 3. Findings.
  const findings: Finding[] = [...source.findings, ...activityFindings(r, { unitLabels: source.unitLabels })];
  if (source.bins < m.min_bins) {
    findings.push({
      level: 'caution',
      code: 'too-few-bins',
      message: `only ${source.bins} ${m.axis === 'time' ? 'bins' : 'stimuli'} (min_bins is ${m.min_bins}): no intervals for the per-bin measures, and per-unit values are noisy.`,
      where: source.files.map((f) => f.path),
      count: source.bins,
    });
  }
  if (source.units < 3) {
    findings.push({ level: 'caution', code: 'too-few-units', message: `only ${source.units} unit(s): no intervals over units.`, where: [], count: source.units });
  }

  // 4. Measures.
  const overUnits: IntervalPlan = { bootstrap: m.bootstrap, over: 'units', axis: m.axis, minItems: 3 };
  const overBins: IntervalPlan = { bootstrap: m.bootstrap, over: 'bins', axis: m.axis, minItems: m.min_bins };
  const u = r.unit;
  const e = r.events;
  const jobs: Record<string, SummariseJob> = {
    population_sparseness: { plan: overBins, stat: { kind: 'mean', values: r.bin.populationSparseness }, summary: ACTIVITY_SUMMARIES.population_sparseness },
    lifetime_sparseness: { plan: overUnits, stat: { kind: 'mean', values: u.lifetimeSparseness }, summary: ACTIVITY_SUMMARIES.lifetime_sparseness },
    kurtosis: { plan: overUnits, stat: { kind: 'median', values: u.kurtosis }, summary: ACTIVITY_SUMMARIES.kurtosis },
    density: { plan: overBins, stat: { kind: 'ratio', numerator: toF64(r.bin.active), denominator: toF64(r.bin.densityDefined), elements: source.units * source.bins }, summary: ACTIVITY_SUMMARIES.density },
    hoyer: { plan: overUnits, stat: { kind: 'mean', values: u.hoyer }, summary: ACTIVITY_SUMMARIES.hoyer },
    gini: { plan: overUnits, stat: { kind: 'mean', values: u.gini }, summary: ACTIVITY_SUMMARIES.gini },
    activity_ratio: { plan: overUnits, stat: { kind: 'mean', values: u.activityRatio }, summary: ACTIVITY_SUMMARIES.activity_ratio },
    ...(e
      ? {
          event_density: { plan: overBins, stat: { kind: 'ratio', numerator: toF64(e.binEvents), denominator: toF64(e.binDefined), elements: source.units * source.bins }, summary: `fraction of defined elements that are events (k = ${e.k} robust SDs)` },
          event_population_sparseness: { plan: overBins, stat: { kind: 'mean', values: e.binPopulationSparseness }, summary: "mean over defined bins of each bin's Vinje–Gallant sparseness of the binary event vector" },
        }
      : {}),
  };
  const names = Object.keys(jobs);
  const done = await summariser(names.map((n) => jobs[n]));
  const result = Object.fromEntries(names.map((n, i) => [n, done[i]]));
  const measures: DatasetResult['measures'] = {
    population_sparseness: result.population_sparseness,
    lifetime_sparseness: result.lifetime_sparseness,
    kurtosis: result.kurtosis,
    density: result.density,
    hoyer: result.hoyer,
    gini: result.gini,
    activity_ratio: result.activity_ratio,
  };
  let eventMeasures: DatasetResult['eventMeasures'];
  if (e) {
    let l0 = 0;
    let l0Units = 0;
    for (let i = 0; i < e.unitEvents.length; i++) if (e.unitEvents[i] >= 0) (l0 += e.unitEvents[i]), l0Units++;
    const l0Result: MeasureResult = {
      estimate: l0,
      interval: null,
      level: null,
      method: null,
      n: l0Units,
      excluded: e.unitEvents.length - l0Units,
      summary: `number of event bins (L0) over all units, events at k = ${e.k} robust SDs`,
      note: 'a count, reported without an interval',
    };
    eventMeasures = { density: result.event_density, population_sparseness: result.event_population_sparseness, l0: l0Result };
  }

  // 5. Chart data.
  const chartData = activityChartData(r, source, binMs);
  return {
    id: ds.id,
    month: ds.month,
    group: ds.group,
    kind: 'activity',
    shape: [source.units, source.bins],
    files: source.files,
    measures,
    ...(eventMeasures ? { eventMeasures } : {}),
    findings,
    chartData,
  };
}

function toF64(a: Int32Array): Float64Array {
  return Float64Array.from(a);
}

function baselineBins(b: { start_s: number; end_s: number }, binMs: number, bins: number): [number, number] {
  const start = Math.max(0, Math.floor((b.start_s * 1000) / binMs));
  const end = Math.min(bins, Math.ceil((b.end_s * 1000) / binMs));
  return [start, Math.max(start + 1, end)];
}

const nullable = (v: number) => (Number.isFinite(v) ? v : null);

function windows(values: Float64Array, windowBins: number): ActivityChartData['populationWindows'] {
  const out: ActivityChartData['populationWindows'] = [];
  for (let start = 0; start < values.length; start += windowBins) {
    const end = Math.min(values.length, start + windowBins);
    let sum = 0;
    let n = 0;
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = start; i < end; i++) {
      const v = values[i];
      if (v !== v) continue;
      sum += v;
      n++;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    out.push({ binStart: start, bins: end - start, mean: n ? sum / n : null, min: n ? lo : null, max: n ? hi : null, defined: n });
  }
  return out;
}

function activityChartData(r: ActivityPassResult, source: SourceMeta, binMs: number): ActivityChartData {
  const windowBins = Math.max(1, Math.ceil(r.bins / 1000));
  const labels = source.unitLabels ?? Array.from({ length: r.units }, (_, i) => `unit ${i}`);
  return {
    unitLabels: labels,
    lifetimeSparseness: Array.from(r.unit.lifetimeSparseness, nullable),
    kurtosis: Array.from(r.unit.kurtosis, nullable),
    meanRate: Array.from(r.unit.mean, nullable),
    populationWindows: windows(r.bin.populationSparseness, windowBins),
    windowBins,
    binMs,
    ...(r.events ? { eventPopulationWindows: windows(r.events.binPopulationSparseness, windowBins) } : {}),
  };
}
