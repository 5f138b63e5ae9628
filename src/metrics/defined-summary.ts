/**
 * Summary of per-item values where NaN marks "undefined" (internal helper of the matrix measures).
 */
import { fsum } from './fsum.ts';

export interface DefinedSummary {
  /** Mean over defined items (compensated sum); null when none is defined. */
  mean: number | null;
  /** Median over defined items (mean of the middle two for an even count); null when none. */
  median: number | null;
  defined: number;
  undefined: number;
}

/** Mean and median of the non-NaN entries of `values`. Cost: one copy and a sort, O(m log m). */
export function summarizeDefined(values: Float64Array): DefinedSummary {
  const kept = values.filter((v) => !Number.isNaN(v));
  const defined = kept.length;
  const undefinedCount = values.length - defined;
  if (defined === 0) return { mean: null, median: null, defined, undefined: undefinedCount };
  kept.sort();
  const h = defined >> 1;
  const median = defined % 2 === 1 ? kept[h] : (kept[h - 1] + kept[h]) / 2;
  return { mean: fsum(kept) / defined, median, defined, undefined: undefinedCount };
}
