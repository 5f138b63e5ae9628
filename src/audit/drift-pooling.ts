/**
 * Drift, step 1: one monthly point per (measure, group, month) from the datasets of that cell.
 *
 * Pooling rule (stated in the report through `POOLING_TEXT`):
 * - one dataset with an estimate → its estimate and its interval, unchanged;
 * - several → the n-weighted mean of their estimates, ŷ = Σ nᵢ·yᵢ / Σ nᵢ (nᵢ = the measure's
 *   number of defined items, e.g. units), and an interval ŷ ± z·SE with
 *   SE = √(Σ wᵢ²·SEᵢ²), wᵢ = nᵢ/Σn, SEᵢ = (upperᵢ − lowerᵢ)/(2·z_{levelᵢ}) — each dataset's
 *   bootstrap interval read as a normal interval of an independent estimate (the datasets of a
 *   month are different recordings). Asymmetric intervals are made symmetric by this; if any
 *   pooled dataset has no interval the pooled point has none.
 *   For kurtosis, whose per-dataset estimate is a median over units, the weighted mean of
 *   medians is an approximation of the pooled median (stated in the text).
 * - datasets whose estimate is null are listed in the point but do not enter it; with none
 *   defined the point's estimate is null (shown as "no estimate").
 *
 * Cost: O(datasets in the cell).
 */
import type { DatasetResult, MeasureName, MeasureResult } from '../types.ts';
import { normalPpf } from '../stats/normal.ts';

export const POOLING_TEXT =
  'Datasets of the same month and group are pooled: one dataset gives its own estimate and interval; ' +
  'several give the mean of their estimates weighted by each one’s n (units or bins measured), with an ' +
  'interval from their interval half-widths combined as independent normal standard errors ' +
  '(for kurtosis, a weighted mean of per-dataset medians approximates the pooled median).';

/** Findings that make a month thin whatever its n. */
export const THIN_CODES: readonly string[] = ['too-few-bins', 'too-few-units'];

export interface PooledPoint {
  estimate: number | null;
  interval: [number, number] | null;
  /** Standard error implied by the (pooled) interval; null without one. */
  se: number | null;
  n: number;
  datasets: string[];
  /** A pooled dataset carried a `too-few-bins` / `too-few-units` finding. */
  flaggedThin: boolean;
}

/** z for a two-sided interval at `level`. */
export function zFor(level: number): number {
  return normalPpf((1 + level) / 2);
}

/** Standard error from a symmetric-normal reading of an interval. */
export function seFromInterval(interval: [number, number], level: number): number {
  return (interval[1] - interval[0]) / (2 * zFor(level));
}

function finite(m: MeasureResult | undefined): m is MeasureResult & { estimate: number } {
  return m !== undefined && typeof m.estimate === 'number' && Number.isFinite(m.estimate);
}

/** Pool one cell. `level` is the audit's interval level (for the combined interval). */
export function poolCell(cell: DatasetResult[], measure: MeasureName, level: number): PooledPoint {
  const present = cell.filter((d) => d.measures[measure] !== undefined);
  const datasets = present.map((d) => d.id);
  const flaggedThin = present.some((d) => d.findings.some((f) => THIN_CODES.includes(f.code)));
  const defined = present.map((d) => d.measures[measure]).filter(finite);
  if (defined.length === 0) {
    const n = present.reduce((s, d) => s + (d.measures[measure]?.n ?? 0), 0);
    return { estimate: null, interval: null, se: null, n, datasets, flaggedThin };
  }
  const n = defined.reduce((s, m) => s + m.n, 0);
  if (defined.length === 1) {
    const m = defined[0];
    const interval = m.interval ? ([m.interval[0], m.interval[1]] as [number, number]) : null;
    const se = interval ? seFromInterval(interval, m.level ?? level) : null;
    return { estimate: m.estimate, interval, se, n, datasets, flaggedThin };
  }
  // n-weighted mean (equal weights if every n is 0).
  const weights = defined.map((m) => (n > 0 ? m.n / n : 1 / defined.length));
  const estimate = defined.reduce((s, m, i) => s + weights[i] * m.estimate, 0);
  let interval: [number, number] | null = null;
  let se: number | null = null;
  if (defined.every((m) => m.interval !== null)) {
    const v = defined.reduce((s, m, i) => s + (weights[i] * seFromInterval(m.interval as [number, number], m.level ?? level)) ** 2, 0);
    se = Math.sqrt(v);
    const half = zFor(level) * se;
    interval = [estimate - half, estimate + half];
  }
  return { estimate, interval, se, n, datasets, flaggedThin };
}
