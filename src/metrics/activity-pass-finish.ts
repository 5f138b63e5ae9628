/**
 * Merge and finish the fused activity pass (internal; exported through `activity-pass.ts`).
 *
 * Merging: per-unit arrays are taken from the state that saw each unit (the states must cover
 * disjoint unit ranges and together every unit); per-bin sums and counts are added. Per-bin
 * sums then differ from a single stream only by the order of float64 additions.
 *
 * Per bin j, over the n_j units defined there (policy-transformed y, refused units left out):
 * population sparseness S_j = (1 − a_j)/(1 − 1/n_j), a_j = (Σy)² / (n_j Σy²) (Vinje & Gallant 2000;
 * population = across units, Willmore & Tolhurst 2001, Network 12:255–270); NaN when Σy² = 0
 * (every unit zero: 0/0) or n_j < 2. Density is of the raw values, whatever the negatives policy:
 * cells with |x| > tol over the cells defined in the bin, refused units included (NaN when none).
 * Events: the binary event vector's S = (n − k)/(n − 1), NaN when k = 0 or n < 2.
 */
import { InternalError } from '../errors.ts';
import { emptyPassState, type ActivityEventResult, type ActivityPassResult, type ActivityPassState, type ActivityPassTotals } from './activity-pass-types.ts';

/** S above 1 by more than this counts as out of the published range [0, 1] (float rounding allowance). */
export const RANGE_SLACK = 1e-12;

/**
 * The saturation rule: a unit is saturated when at least 1% of its defined bins, and at least 5
 * cells, sit exactly at its maximum (a clipped or railed signal). Binary-like rows, whose every
 * nonzero cell equals the maximum (0/1 spike trains, constant units), are not judged by it.
 * Common practice, no single source.
 */
export function isSaturated(defined: number, atMax: number, nonzero: number, max: number): boolean {
  return max > 0 && atMax >= 5 && atMax >= 0.01 * defined && atMax < nonzero;
}

const UNIT_KEYS = [
  'mean', 'lifetimeSparseness', 'activityRatio', 'hoyer', 'gini', 'skewness', 'kurtosis', 'min', 'max',
  'defined', 'nan', 'infinite', 'missing', 'negative', 'nonzero', 'atMax', 'changed', 'silent', 'constant', 'refused',
  'hashA', 'hashB', 'eventMedian', 'eventRobustSd', 'eventCount',
] as const;
const BIN_KEYS = ['binPartialDefined', 'binSum', 'binSumSq', 'binActive', 'binRefusedDefined', 'binNegative', 'binEventPartialDefined', 'binEvents'] as const;

/** Merge states over disjoint unit ranges into one (a new state; the inputs are not changed). */
export function mergeActivityStates(states: ActivityPassState[]): ActivityPassState {
  if (states.length === 0) throw new InternalError('activity pass: nothing to merge');
  const first = states[0];
  const { units, bins } = first;
  const out = emptyPassState(units, bins, first.options);
  for (const s of states) {
    if (s.units !== units || s.bins !== bins || JSON.stringify(s.options) !== JSON.stringify(first.options)) {
      throw new InternalError('activity pass: merging states of different shapes or options');
    }
    for (let u = 0; u < units; u++) {
      if (s.seen[u] === 0) continue;
      if (out.seen[u] !== 0) throw new InternalError(`activity pass: unit ${u} is in two merged states`);
      out.seen[u] = 1;
      for (const k of UNIT_KEYS) if (s[k].length > 0) out[k][u] = s[k][u];
    }
    for (const k of BIN_KEYS) {
      const a = out[k], b = s[k];
      for (let j = 0; j < a.length; j++) a[j] += b[j];
    }
    out.fullRows += s.fullRows;
    out.eventFullRows += s.eventFullRows;
  }
  return out;
}

export function finishActivityPass(input: ActivityPassState | ActivityPassState[]): ActivityPassResult {
  const st = Array.isArray(input) ? (input.length === 1 ? input[0] : mergeActivityStates(input)) : input;
  const { units, bins, options } = st;
  for (let u = 0; u < units; u++) if (st.seen[u] === 0) throw new InternalError(`activity pass: unit ${u} was never added`);

  // 1. Per bin.
  const defined = new Int32Array(bins);
  const densityDefined = new Int32Array(bins);
  const pop = new Float64Array(bins);
  const density = new Float64Array(bins);
  let popOut = 0;
  for (let j = 0; j < bins; j++) {
    const n = st.fullRows + st.binPartialDefined[j];
    defined[j] = n;
    const nd = n + st.binRefusedDefined[j];
    densityDefined[j] = nd;
    density[j] = nd > 0 ? st.binActive[j] / nd : NaN;
    const s = st.binSum[j], q = st.binSumSq[j];
    pop[j] = n >= 2 && q > 0 ? (1 - (s * s) / (n * q)) / (1 - 1 / n) : NaN;
    if (pop[j] > 1 + RANGE_SLACK) popOut++;
  }

  // 2. Per unit: totals, saturation, kurtosis withheld.
  const saturated = new Uint8Array(units);
  const tooFew = new Uint8Array(units);
  const t: ActivityPassTotals = {
    cells: units * bins, definedCells: 0, nanCells: 0, infiniteCells: 0, missingCells: 0, negativeCells: 0, changedCells: 0,
    unitsWithNegatives: 0, emptyUnits: 0, silentUnits: 0, constantUnits: 0, saturatedUnits: 0, refusedUnits: 0,
    kurtosisTooFewUnits: 0, lifetimeOutOfRangeUnits: 0, populationOutOfRangeBins: options.negatives === 'keep' ? popOut : 0,
  };
  for (let u = 0; u < units; u++) {
    const n = st.defined[u];
    t.definedCells += n;
    t.nanCells += st.nan[u];
    t.infiniteCells += st.infinite[u];
    t.missingCells += st.missing[u];
    t.negativeCells += st.negative[u];
    t.changedCells += st.changed[u];
    if (st.negative[u] > 0) t.unitsWithNegatives++;
    if (n === 0) t.emptyUnits++;
    t.silentUnits += st.silent[u];
    t.constantUnits += st.constant[u];
    t.refusedUnits += st.refused[u];
    if (n > 0 && isSaturated(n, st.atMax[u], st.nonzero[u], st.max[u])) {
      saturated[u] = 1;
      t.saturatedUnits++;
    }
    if (n > 0 && st.nonzero[u] < options.minNonzero) {
      tooFew[u] = 1;
      t.kurtosisTooFewUnits++;
    }
    if (options.negatives === 'keep' && st.lifetimeSparseness[u] > 1 + RANGE_SLACK) t.lifetimeOutOfRangeUnits++;
  }

  // 3. Duplicate rows: identical (hashA, hashB), silent and empty units left out.
  const firstOf = new Map<string, number>();
  const duplicates: [number, number][] = [];
  for (let u = 0; u < units; u++) {
    if (st.defined[u] === 0 || st.silent[u] === 1) continue;
    const key = `${st.hashA[u]}:${st.hashB[u]}`;
    const f = firstOf.get(key);
    if (f === undefined) firstOf.set(key, u);
    else duplicates.push([f, u]);
  }

  // 4. Events.
  let events: ActivityEventResult | null = null;
  if (options.events !== null) {
    const bDef = new Int32Array(bins), bDen = new Float64Array(bins), bPop = new Float64Array(bins);
    for (let j = 0; j < bins; j++) {
      const n = st.eventFullRows + st.binEventPartialDefined[j];
      const k = st.binEvents[j];
      bDef[j] = n;
      bDen[j] = n > 0 ? k / n : NaN;
      bPop[j] = n >= 2 && k > 0 ? (n - k) / (n - 1) : NaN;
    }
    let undef = 0;
    for (let u = 0; u < units; u++) if (st.eventCount[u] < 0) undef++;
    events = {
      k: options.events.k, baselineBins: options.events.baselineBins ?? null,
      unitMedian: st.eventMedian, unitRobustSd: st.eventRobustSd, unitEvents: st.eventCount,
      binDefined: bDef, binEvents: st.binEvents, binDensity: bDen, binPopulationSparseness: bPop, undefinedUnits: undef,
    };
  }

  return {
    units, bins, options,
    unit: {
      mean: st.mean, lifetimeSparseness: st.lifetimeSparseness, activityRatio: st.activityRatio, hoyer: st.hoyer, gini: st.gini,
      skewness: st.skewness, kurtosis: st.kurtosis, min: st.min, max: st.max, defined: st.defined, nan: st.nan,
      infinite: st.infinite, missing: st.missing, negative: st.negative, nonzero: st.nonzero, atMax: st.atMax,
      changed: st.changed, silent: st.silent, constant: st.constant, refused: st.refused, hashA: st.hashA, hashB: st.hashB,
      saturated, kurtosisTooFew: tooFew,
    },
    bin: { populationSparseness: pop, density, defined, densityDefined, active: st.binActive, negative: st.binNegative, sum: st.binSum, sumSq: st.binSumSq },
    events,
    totals: t,
    duplicates,
  };
}
