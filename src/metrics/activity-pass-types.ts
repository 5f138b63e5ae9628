/**
 * Types and option checks for the fused one-pass activity engine (`activity-pass.ts`).
 *
 * The state is plain typed arrays and numbers, so a worker thread can transfer it and two
 * workers' states over disjoint unit ranges can be merged; `Array.from` of every array gives
 * a JSON-able copy (NaN becomes null in JSON).
 */
import type { NegativesPolicy } from '../manifest/types.ts';
import { InputError } from '../errors.ts';

export type { NegativesPolicy };

/** Event detection for fluorescence traces (see `activity-pass-events.ts`). */
export interface ActivityEventOptions {
  /** A cell is an event bin when x > median + k · 1.4826 · MAD of its unit. */
  k: number;
  /** Bins [start, end) where each unit's median and MAD are estimated; omitted = the whole row. */
  baselineBins?: [number, number];
}

export interface ActivityPassOptions {
  /** |x| > zeroTolerance counts as active (nonzero). Finite, ≥ 0. */
  zeroTolerance: number;
  /**
   * What the sparseness measures (lifetime and population Vinje–Gallant S, activity ratio,
   * Hoyer, Gini, density) do with values below zero. Skewness and kurtosis always use the raw values.
   * - `keep`: use values as they are (Hoyer and Gini use |x|); S can then exceed 1 (counted).
   * - `rectify`: y = max(0, x).
   * - `shift`: y = x − min(unit) for a unit whose minimum is negative. Every defined value of such
   *   a unit changes and its former zeros become active, so its lifetime S falls, and in
   *   population sparseness that unit is raised in every bin relative to the other units.
   * - `refuse`: a unit holding any negative value is left out of those measures (counted).
   */
  negatives: NegativesPolicy;
  events: ActivityEventOptions | null;
  /** A unit needs at least this many nonzero (|x| > tol) bins for its kurtosis to be reported. */
  minNonzero: number;
}

/** Everything one `addBlock` stream has accumulated. Per-unit arrays have length `units`. */
export interface ActivityPassState {
  units: number;
  bins: number;
  options: ActivityPassOptions;
  /** 1 where the unit has been added (merging checks the ranges are disjoint and complete). */
  seen: Uint8Array;
  // Per unit. NaN where a value is undefined.
  mean: Float64Array;
  lifetimeSparseness: Float64Array;
  activityRatio: Float64Array;
  hoyer: Float64Array;
  gini: Float64Array;
  skewness: Float64Array;
  kurtosis: Float64Array;
  min: Float64Array;
  max: Float64Array;
  /** Cells that are finite and not missing. */
  defined: Int32Array;
  nan: Int32Array;
  infinite: Int32Array;
  missing: Int32Array;
  /** Defined cells below zero (raw values). */
  negative: Int32Array;
  /** Defined cells with |x| > zeroTolerance (raw values). */
  nonzero: Int32Array;
  /** Defined cells equal to the unit's maximum. */
  atMax: Int32Array;
  /** Defined cells whose value the negatives policy changed. */
  changed: Int32Array;
  /** 1 = every defined cell is zero (|x| ≤ tol); 1 = all defined cells equal and nonzero; 1 = refused. */
  silent: Uint8Array;
  constant: Uint8Array;
  refused: Uint8Array;
  /** Two 32-bit hashes over the row's float bits and missing mask (duplicate detection). */
  hashA: Uint32Array;
  hashB: Uint32Array;
  // Per unit, events (length 0 when events are off). eventCount −1 = events undefined for the unit.
  eventMedian: Float64Array;
  eventRobustSd: Float64Array;
  eventCount: Int32Array;
  // Per bin, over units (policy-transformed values y; refused units left out).
  /** Units whose row had no excluded cell; they count as defined in every bin. */
  fullRows: number;
  binPartialDefined: Int32Array;
  binSum: Float64Array;
  binSumSq: Float64Array;
  /** Raw cells with |x| > zeroTolerance per bin, over every unit (refused ones too): density's numerator. */
  binActive: Int32Array;
  /** Defined cells of refused units per bin: with the defined units, density's denominator. */
  binRefusedDefined: Int32Array;
  /** Raw negative cells per bin, over all units. */
  binNegative: Int32Array;
  // Per bin, events (length 0 when events are off).
  eventFullRows: number;
  binEventPartialDefined: Int32Array;
  binEvents: Int32Array;
}

const POLICIES: readonly NegativesPolicy[] = ['keep', 'rectify', 'shift', 'refuse'];

/** Check the options and the shape; returns a normalised copy. Throws `InputError` naming the field. */
export function checkPassOptions(shape: { units: number; bins: number }, o: ActivityPassOptions): ActivityPassOptions {
  const fail = (where: string, found: unknown, allowed: string): never => {
    throw new InputError(`found ${JSON.stringify(found)}; allowed: ${allowed}`, { where });
  };
  if (!Number.isInteger(shape.units) || shape.units < 0) fail('units', shape.units, 'an integer ≥ 0');
  if (!Number.isInteger(shape.bins) || shape.bins < 1) fail('bins', shape.bins, 'an integer ≥ 1');
  if (typeof o.zeroTolerance !== 'number' || !Number.isFinite(o.zeroTolerance) || o.zeroTolerance < 0) {
    fail('zero_tolerance', o.zeroTolerance, 'a finite number ≥ 0');
  }
  if (!POLICIES.includes(o.negatives)) fail('negatives', o.negatives, POLICIES.join(', '));
  if (!Number.isInteger(o.minNonzero) || o.minNonzero < 0) fail('min_nonzero', o.minNonzero, 'an integer ≥ 0');
  let events: ActivityEventOptions | null = null;
  if (o.events !== null && o.events !== undefined) {
    const k = o.events.k;
    if (typeof k !== 'number' || !Number.isFinite(k) || k < 0) fail('events.k', k, 'a finite number ≥ 0');
    events = { k };
    const b = o.events.baselineBins;
    if (b !== undefined) {
      const ok = Array.isArray(b) && b.length === 2 && Number.isInteger(b[0]) && Number.isInteger(b[1]);
      if (!ok || b[0] < 0 || b[1] <= b[0] || b[1] > shape.bins) {
        fail('events.baseline', b, `bins [start, end) with 0 ≤ start < end ≤ ${shape.bins}`);
      }
      events.baselineBins = [b[0], b[1]];
    }
  }
  return { zeroTolerance: o.zeroTolerance, negatives: o.negatives, events, minNonzero: o.minNonzero };
}

/** Per-bin values from `finishActivityPass`; NaN where undefined. */
export interface ActivityBinResult {
  /** Vinje–Gallant S across the units defined in the bin (policy-transformed values). */
  populationSparseness: Float64Array;
  /** Fraction of the bin's defined cells, every unit, with raw |x| > zeroTolerance (whatever the negatives policy). */
  density: Float64Array;
  /** Units defined in the bin (finite, not missing, not refused). */
  defined: Int32Array;
  /** Cells defined in the bin over every unit, refused ones too: density's denominator. */
  densityDefined: Int32Array;
  active: Int32Array;
  negative: Int32Array;
  sum: Float64Array;
  sumSq: Float64Array;
}

export interface ActivityEventResult {
  k: number;
  baselineBins: [number, number] | null;
  unitMedian: Float64Array;
  unitRobustSd: Float64Array;
  /** Event bins per unit; −1 = undefined (no baseline cell, or σ̂ = 0). */
  unitEvents: Int32Array;
  binDefined: Int32Array;
  binEvents: Int32Array;
  /** Event bins / defined units, per bin. */
  binDensity: Float64Array;
  /** Vinje–Gallant S of the binary event vector across units: (n − k)/(n − 1); NaN when k = 0 or n < 2. */
  binPopulationSparseness: Float64Array;
  undefinedUnits: number;
}

/** Totals the findings are made from. */
export interface ActivityPassTotals {
  cells: number;
  definedCells: number;
  nanCells: number;
  infiniteCells: number;
  missingCells: number;
  negativeCells: number;
  changedCells: number;
  unitsWithNegatives: number;
  emptyUnits: number;
  silentUnits: number;
  constantUnits: number;
  saturatedUnits: number;
  refusedUnits: number;
  kurtosisTooFewUnits: number;
  /** Under `keep`: units whose lifetime S > 1 + 1e-12, bins whose population S > 1 + 1e-12. */
  lifetimeOutOfRangeUnits: number;
  populationOutOfRangeBins: number;
}

export interface ActivityPassResult {
  units: number;
  bins: number;
  options: ActivityPassOptions;
  /** The per-unit arrays of the merged state (see `ActivityPassState`). */
  unit: Pick<
    ActivityPassState,
    | 'mean' | 'lifetimeSparseness' | 'activityRatio' | 'hoyer' | 'gini' | 'skewness' | 'kurtosis' | 'min' | 'max'
    | 'defined' | 'nan' | 'infinite' | 'missing' | 'negative' | 'nonzero' | 'atMax' | 'changed'
    | 'silent' | 'constant' | 'refused' | 'hashA' | 'hashB'
  > & {
    /** 1 = saturated (rule in `SATURATION_RULE`); 1 = kurtosis withheld for too few nonzero bins. */
    saturated: Uint8Array;
    kurtosisTooFew: Uint8Array;
  };
  bin: ActivityBinResult;
  events: ActivityEventResult | null;
  totals: ActivityPassTotals;
  /** Pairs [first, other] of units with identical row hashes (silent and empty units left out). */
  duplicates: [number, number][];
}

/** A state with nothing added: per-unit values NaN, counts 0. */
export function emptyPassState(units: number, bins: number, options: ActivityPassOptions): ActivityPassState {
  const f = () => new Float64Array(units).fill(NaN);
  const i = () => new Int32Array(units);
  const ev = options.events !== null;
  return {
    units, bins, options,
    seen: new Uint8Array(units),
    mean: f(), lifetimeSparseness: f(), activityRatio: f(), hoyer: f(), gini: f(), skewness: f(), kurtosis: f(), min: f(), max: f(),
    defined: i(), nan: i(), infinite: i(), missing: i(), negative: i(), nonzero: i(), atMax: i(), changed: i(),
    silent: new Uint8Array(units), constant: new Uint8Array(units), refused: new Uint8Array(units),
    hashA: new Uint32Array(units), hashB: new Uint32Array(units),
    eventMedian: new Float64Array(ev ? units : 0).fill(NaN),
    eventRobustSd: new Float64Array(ev ? units : 0).fill(NaN),
    eventCount: new Int32Array(ev ? units : 0).fill(-1),
    fullRows: 0,
    binPartialDefined: new Int32Array(bins), binSum: new Float64Array(bins), binSumSq: new Float64Array(bins),
    binActive: new Int32Array(bins), binRefusedDefined: new Int32Array(bins), binNegative: new Int32Array(bins),
    eventFullRows: 0,
    binEventPartialDefined: new Int32Array(ev ? bins : 0), binEvents: new Int32Array(ev ? bins : 0),
  };
}
