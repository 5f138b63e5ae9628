/**
 * An activity file of spike counts held as each unit's spike bins, grouped by unit (the layout
 * the spike-table and sorter-folder readers build): unit u's spikes are `spikeBins[start[u] ..
 * start[u + 1])`. `readUnits` counts them into the block; memory stays 4 bytes a spike, never
 * units × bins. Counts are whole numbers, exact in float32 while there are fewer than 2^24 spikes.
 */
import type { Finding } from '../types.ts';
import type { ReadableActivityFile } from './activity-file.ts';

export interface SpikeCounts {
  path: string;
  bins: number;
  binMs: number;
  findings: Finding[];
  unitLabels: string[];
  /** Offsets into `spikeBins`, one more than there are units. */
  start: ArrayLike<number>;
  spikeBins: Int32Array;
}

export function spikeCountsFile(c: SpikeCounts): ReadableActivityFile {
  const { bins, start, spikeBins } = c;
  const units = c.unitLabels.length;
  return {
    path: c.path, units, bins, binMs: c.binMs, findings: c.findings, hasMissing: false, unitLabels: c.unitLabels,
    precision: spikeBins.length < 2 ** 24 ? 'f32' : 'f64', reusableAfterClose: true, contiguous: true,
    async readUnits(unitStart, count, out, outCols, colOffset) {
      if (unitStart < 0 || count < 0 || unitStart + count > units || colOffset + bins > outCols) {
        throw new RangeError(`readUnits(${unitStart}, ${count}) outside ${units} units or block of ${outCols} columns`);
      }
      for (let u = 0; u < count; u++) {
        const o = u * outCols + colOffset;
        out.fill(0, o, o + bins);
        for (let i = start[unitStart + u]; i < start[unitStart + u + 1]; i++) out[o + spikeBins[i]] += 1;
      }
    },
    async close() {},
  };
}
