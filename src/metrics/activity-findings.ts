/**
 * Data-quality findings from the counts of the fused activity pass.
 *
 * | code                        | level   | when                                                                  |
 * |-----------------------------|---------|-----------------------------------------------------------------------|
 * | `nan-values`                | exclude | NaN cells (left out of every measure)                                 |
 * | `infinite-values`           | exclude | ±Infinity cells (left out of every measure)                           |
 * | `missing-values`            | notice  | cells marked missing by the reader (left out)                         |
 * | `empty-units`               | exclude | units with no defined cell (no measure at all)                        |
 * | `silent-units`              | exclude | units with no |x| > zero tolerance (left out of lifetime measures)    |
 * | `constant-units`            | caution | all defined cells equal and nonzero (lifetime S = 0, kurtosis undefined) |
 * | `negative-values`           | caution | negative cells; the message states the policy and what it changed     |
 * | `negative-units-refused`    | exclude | `refuse`: units with negatives left out of the sparseness measures    |
 * | `saturated-units`           | caution | ≥ 1% of a unit's defined bins and ≥ 5 cells at its maximum (`isSaturated`) |
 * | `duplicate-units`           | caution | rows with identical 64-bit hashes; `where` names the pairs            |
 * | `kurtosis-too-few-nonzero`  | notice  | fewer than `minNonzero` nonzero bins: kurtosis not reported (routine) |
 * | `sparseness-out-of-range`   | caution | `keep`: lifetime or population S > 1 (negative values)                |
 * | `events-undefined-units`    | exclude | event detection on: no baseline cell or MAD = 0, so no threshold      |
 *
 * `where` lists unit labels (or `unit <i>`; bins as `bin <j>`), at most `maxWhere` (20) entries;
 * `count` holds the full number. Findings come in the order of the table; none for a clean matrix.
 */
import type { Finding } from '../types.ts';
import type { ActivityPassResult } from './activity-pass-types.ts';
import { RANGE_SLACK } from './activity-pass-finish.ts';

export interface ActivityFindingsOptions {
  /** Names of the units, index = unit; `unit <i>` where absent. */
  unitLabels?: string[];
  /** Longest `where` list (default 20). */
  maxWhere?: number;
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

export function activityFindings(result: ActivityPassResult, options: ActivityFindingsOptions = {}): Finding[] {
  const cap = options.maxWhere ?? 20;
  const label = (u: number) => options.unitLabels?.[u] ?? `unit ${u}`;
  const U = result.unit;
  const t = result.totals;
  const out: Finding[] = [];
  /** Units where pred holds, capped, and their number. */
  const unitsWhere = (pred: (u: number) => boolean): { where: string[]; n: number } => {
    const where: string[] = [];
    let n = 0;
    for (let u = 0; u < result.units; u++) {
      if (!pred(u)) continue;
      n++;
      if (where.length < cap) where.push(label(u));
    }
    return { where, n };
  };
  const add = (level: Finding['level'], code: string, message: string, where: string[], count: number) => {
    out.push({ level, code, message, where, count });
  };

  if (t.nanCells > 0) {
    const w = unitsWhere((u) => U.nan[u] > 0);
    add('exclude', 'nan-values', `${plural(t.nanCells, 'NaN cell')} in ${plural(w.n, 'unit')}, left out of every measure.`, w.where, t.nanCells);
  }
  if (t.infiniteCells > 0) {
    const w = unitsWhere((u) => U.infinite[u] > 0);
    add('exclude', 'infinite-values', `${plural(t.infiniteCells, 'infinite cell')} in ${plural(w.n, 'unit')}, left out of every measure.`, w.where, t.infiniteCells);
  }
  if (t.missingCells > 0) {
    const w = unitsWhere((u) => U.missing[u] > 0);
    add('notice', 'missing-values', `${plural(t.missingCells, 'cell')} in ${plural(w.n, 'unit')} marked missing (outside observed intervals), left out of every measure.`, w.where, t.missingCells);
  }
  if (t.emptyUnits > 0) {
    const w = unitsWhere((u) => U.defined[u] === 0);
    add('exclude', 'empty-units', `${plural(t.emptyUnits, 'unit')} without a single defined cell: no measure for them.`, w.where, t.emptyUnits);
  }
  if (t.silentUnits > 0) {
    const w = unitsWhere((u) => U.silent[u] === 1);
    add('exclude', 'silent-units', `${plural(t.silentUnits, 'unit')} never active (|x| ≤ ${result.options.zeroTolerance} in every bin), left out of the lifetime measures (sparseness is 0/0); still counted in population measures.`, w.where, t.silentUnits);
  }
  if (t.constantUnits > 0) {
    const w = unitsWhere((u) => U.constant[u] === 1);
    add('caution', 'constant-units', `${plural(t.constantUnits, 'unit')} with the same nonzero value in every defined bin (lifetime sparseness 0, kurtosis undefined): check for a stuck channel or a fill value.`, w.where, t.constantUnits);
  }
  if (t.negativeCells > 0) {
    const w = unitsWhere((u) => U.negative[u] > 0);
    const policy = result.options.negatives;
    const did =
      policy === 'keep' ? 'kept as they are (sparseness can exceed 1; Hoyer and Gini use |x|)'
      : policy === 'rectify' ? `set to 0 for the sparseness measures, activity ratio, Hoyer and Gini (${plural(t.changedCells, 'value')} changed)`
      : policy === 'shift' ? `handled by shifting each such unit by its own minimum for the sparseness measures, activity ratio, Hoyer and Gini (${plural(t.changedCells, 'value')} changed)`
      : `handled by leaving the ${plural(t.refusedUnits, 'unit')} holding them out of the sparseness measures, activity ratio, Hoyer and Gini`;
    add('caution', 'negative-values', `${plural(t.negativeCells, 'negative cell')} in ${plural(w.n, 'unit')}, ${did}; density, skewness and kurtosis use the raw values.`, w.where, t.negativeCells);
  }
  if (t.refusedUnits > 0) {
    const w = unitsWhere((u) => U.refused[u] === 1);
    add('exclude', 'negative-units-refused', `${plural(t.refusedUnits, 'unit')} holding negative values left out of lifetime and population sparseness, activity ratio, Hoyer and Gini (negatives: refuse); density still counts them.`, w.where, t.refusedUnits);
  }
  if (t.saturatedUnits > 0) {
    const w = unitsWhere((u) => U.saturated[u] === 1);
    add('caution', 'saturated-units', `${plural(t.saturatedUnits, 'unit')} with at least 1% of defined bins (and at least 5) exactly at the unit's maximum: possible clipping or saturation.`, w.where, t.saturatedUnits);
  }
  if (result.duplicates.length > 0) {
    const where = result.duplicates.slice(0, cap).map(([a, b]) => `${label(a)} = ${label(b)}`);
    add('caution', 'duplicate-units', `${plural(result.duplicates.length, 'unit')} identical to an earlier unit in every bin (same 64-bit row hash): possible double-counted units.`, where, result.duplicates.length);
  }
  if (t.kurtosisTooFewUnits > 0) {
    const w = unitsWhere((u) => U.kurtosisTooFew[u] === 1);
    add('notice', 'kurtosis-too-few-nonzero', `${plural(t.kurtosisTooFewUnits, 'unit')} with fewer than ${result.options.minNonzero} nonzero bins: kurtosis not reported for them.`, w.where, t.kurtosisTooFewUnits);
  }
  if (t.lifetimeOutOfRangeUnits + t.populationOutOfRangeBins > 0) {
    const w = unitsWhere((u) => U.lifetimeSparseness[u] > 1 + RANGE_SLACK);
    const where = w.where.slice();
    const pop = result.bin.populationSparseness;
    for (let j = 0; j < result.bins && where.length < cap; j++) if (pop[j] > 1 + RANGE_SLACK) where.push(`bin ${j}`);
    add('caution', 'sparseness-out-of-range', `Sparseness above its published range [0, 1] in ${plural(t.lifetimeOutOfRangeUnits, 'unit')} (lifetime) and ${plural(t.populationOutOfRangeBins, 'bin')} (population), because negative values were kept.`, where, t.lifetimeOutOfRangeUnits + t.populationOutOfRangeBins);
  }
  if (result.events !== null && result.events.undefinedUnits > 0) {
    const ev = result.events;
    const w = unitsWhere((u) => ev.unitEvents[u] < 0);
    add('exclude', 'events-undefined-units', `${plural(ev.undefinedUnits, 'unit')} without a noise estimate (no defined baseline bin, or MAD = 0): left out of the event measures.`, w.where, ev.undefinedUnits);
  }
  return out;
}
