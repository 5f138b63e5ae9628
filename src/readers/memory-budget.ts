/**
 * How much memory one dataset's shape may claim, checked before anything is allocated for it.
 *
 * A file's header can declare any number of units or bins (an 8 KB NWB file can claim 10⁸
 * units; a 27-byte spike table with a spike at 2·10⁷ s makes 2·10⁹ bins of 10 ms), and the
 * build keeps state per unit and per bin whatever the file's size. The rule:
 *
 *     units × BYTES_PER_UNIT + bins × BYTES_PER_BIN  ≤  MEMORY_FRACTION × physical memory
 *
 * with MEMORY_FRACTION = 1/4 (on a 23 GiB machine: about 5.9 GB, i.e. at most ≈ 23 million
 * bins or ≈ 11 million units). The per-item figures are a count of what the pipeline holds,
 * rounded up (common practice, no source): per bin, the fused pass keeps seven accumulators
 * (activity-pass-types.ts, 36 B), the Gini scratch (≤ 16 B), the event scratch (8 B), the
 * finishing sums (activity-pass-finish.ts, 40 B) and one row of the block with its mask (9 B),
 * about 110 B per lane, two lanes on two cores → 256 B; per unit, the pass state (about
 * 140 B per lane), the reader's index and label, and the unit's row in the record → 512 B.
 *
 * `lacuna check` applies the same rule to what headers and the manifest give (NWB shapes, a
 * spike table's `# duration_s:`), with the same message, so check refuses what build would.
 */
import { totalmem } from 'node:os';
import { InputError } from '../errors.ts';

export const MEMORY_FRACTION = 0.25;
export const BYTES_PER_BIN = 256;
export const BYTES_PER_UNIT = 512;

/** Bytes one dataset's per-unit and per-bin state may take on this machine. */
export function memoryBudget(): number {
  return Math.floor(totalmem() * MEMORY_FRACTION);
}

function gb(bytes: number): string {
  return `${(bytes / 1e9).toFixed(bytes < 1e10 ? 2 : 0)} GB`;
}

/** The largest number of bins the rule allows next to `units` units. */
export function maxBinsFor(units: number): number {
  return Math.max(0, Math.floor((memoryBudget() - units * BYTES_PER_UNIT) / BYTES_PER_BIN));
}

/**
 * Refuse a shape whose per-unit and per-bin state would pass the budget. `bins` may be 0 when
 * not yet known (units alone are checked). `where` names the object or row the shape came from.
 */
export function checkActivityShape(s: { units: number; bins: number; binMs: number; file: string; where: string }): void {
  const need = s.units * BYTES_PER_UNIT + s.bins * BYTES_PER_BIN;
  const budget = memoryBudget();
  if (need <= budget) return;
  const unitsPart = s.units * BYTES_PER_UNIT;
  let hint: string;
  if (unitsPart >= budget) hint = `split the file into parts of at most ${Math.floor(budget / BYTES_PER_UNIT)} units`;
  else {
    const coarser = Math.ceil((s.binMs * s.bins * BYTES_PER_BIN) / (budget - unitsPart));
    hint = `raise bin_ms to ${coarser} or more, or split the recording in time`;
  }
  throw new InputError(
    `${[s.units > 0 ? `${s.units} units` : '', s.bins > 0 ? `${s.bins} bins of ${s.binMs} ms` : ''].filter(Boolean).join(' × ')} would need about ${gb(need)} of per-unit and per-bin state ` +
      `(${BYTES_PER_UNIT} B a unit, ${BYTES_PER_BIN} B a bin), more than the ${gb(budget)} allowed (a quarter of this machine's ${gb(totalmem())} of memory)`,
    { file: s.file, where: s.where, hint },
  );
}

/** Refuse one allocation of `bytes` sized by a number the file claims (e.g. an index column's length). */
export function checkClaimedBytes(bytes: number, what: string, file: string, where: string): void {
  const budget = memoryBudget();
  if (bytes <= budget) return;
  throw new InputError(`${what} would need about ${gb(bytes)}, more than the ${gb(budget)} allowed (a quarter of this machine's ${gb(totalmem())} of memory)`, { file, where });
}
