/**
 * An activity dataset from its files (sessions), joined along the bin axis: file k's bins follow
 * file k − 1's, so every file must have the same units (an InputError names both files and their
 * counts when they differ). Unit labels come from the first file that has them; a later file whose
 * labels differ gives a `caution` finding (units are matched by position, not by name).
 *
 * `blocks()` yields blocks of whole units into one buffer allocated per call and reused between
 * yields: ⌊maxBlockBytes / (bins × bytes per value)⌋ units per block, at least one (so a single
 * unit wider than the limit still makes a block). The default limit depends on the layout: 8 MiB
 * when every file reads unit ranges contiguously (activity-file.ts `contiguous`), where small
 * blocks stay in cache and keep memory low (measured on a 381 MiB float32 `.npy` through the
 * compute stage: 8 MiB 2.1 s and 114 MiB peak RSS, 64 MiB 2.5 s and 170 MiB); else 64 MiB,
 * because strided layouts re-read the file once per block. An explicit `maxBlockBytes` (the
 * dataset's default, then the `blocks()` option) wins. The buffer is Float64Array when any file needs
 * float64 precision (activity-file.ts), else Float32Array. File handles are released when the
 * iteration ends, early or not. A file whose `close()` is final (not `reusableAfterClose`, e.g.
 * NWB) is opened again through `reopen` at the start of each pass and closed at its end; a
 * reopened file whose units or bins changed since the dataset was opened is an InputError.
 * `blocks({ unitStart, unitEnd })` yields only units [unitStart, unitEnd) (default: all), still as
 * whole-unit blocks whose `unitStart` is the absolute unit index, so one dataset can be split
 * across workers and their pass states merged; ranges covering [0, units) together give exactly
 * the blocks' rows of one whole pass. A range outside [0, units) or not integral is a RangeError
 * (a caller's bug); an empty range yields nothing and reads nothing.
 * `afterPass`, when given, runs after the last block of each pass is read and before it is
 * yielded (file-guard.ts: were the files changed underneath?); its error ends the pass.
 * A dataset of more than MAX_OPEN_FILES files keeps at most one of them open at a time.
 */
import type { ActivitySource, FileProvenance, Finding, Numeric, UnitBlock } from '../types.ts';
import { InputError, InternalError } from '../errors.ts';
import { precisionOf, isReusable, isContiguous } from './activity-file.ts';
import type { ActivityFile } from './types.ts';

/** Default block limit when some file's unit ranges are strided on disk. */
export const DEFAULT_MAX_BLOCK_BYTES = 64 * 1024 * 1024;
/** Default block limit when every file reads unit ranges contiguously. */
export const CONTIGUOUS_MAX_BLOCK_BYTES = 8 * 1024 * 1024;

/**
 * Above this many files a dataset's files are opened one at a time per block (and closed after
 * each read) instead of all at once per pass: a folder may hold more files than the process may
 * open (the usual soft limit is 1,024 descriptors, shared with the worker threads).
 */
export const MAX_OPEN_FILES = 64;

/** Options of `blocks()`: the contract's block limit plus a range of units. */
export interface BlockOptions {
  maxBlockBytes?: number;
  /** First unit to yield (default 0). */
  unitStart?: number;
  /** One past the last unit to yield (default: every unit). */
  unitEnd?: number;
}

/** An ActivitySource whose `blocks()` also takes a unit range (what `openDataset` returns). */
export interface RangedActivitySource extends ActivitySource {
  blocks(options?: BlockOptions): AsyncIterable<UnitBlock>;
}

/** The default block limit for these files: small when all are contiguous, else large. */
export function defaultMaxBlockBytes(files: ActivityFile[]): number {
  return files.every(isContiguous) ? CONTIGUOUS_MAX_BLOCK_BYTES : DEFAULT_MAX_BLOCK_BYTES;
}

export function joinActivity(
  files: ActivityFile[], relFiles: string[], provenance: FileProvenance[], maxBlockBytesDefault = defaultMaxBlockBytes(files),
  reopen?: (index: number) => Promise<ActivityFile>,
  afterPass?: () => Promise<void>,
): RangedActivitySource {
  const first = files[0];
  const findings: Finding[] = files.flatMap((f) => f.findings);
  let bins = 0;
  const segments: ActivitySource['segments'] = [];
  let unitLabels: string[] | undefined;
  let labelsFrom = '';
  for (let i = 0; i < files.length; i++) {
    const f = files[i];
    if (f.units !== first.units) {
      throw new InputError(`${relFiles[i]} has ${f.units} units but ${relFiles[0]} has ${first.units}; sessions joined along bins must have the same units`, {
        file: relFiles[i], where: 'units', hint: 'split the dataset, or make every file hold the same units in the same order',
      });
    }
    segments.push({ path: relFiles[i], binStart: bins, bins: f.bins });
    bins += f.bins;
    if (f.unitLabels) {
      if (!unitLabels) {
        unitLabels = f.unitLabels;
        labelsFrom = relFiles[i];
      } else if (f.unitLabels.some((l, k) => l !== unitLabels![k])) {
        findings.push({
          level: 'caution', code: 'unit-labels-differ',
          message: `${relFiles[i]} names its units differently from ${labelsFrom}; sessions were joined by unit position, and the labels of ${labelsFrom} are used.`,
          where: [relFiles[i], labelsFrom], count: f.unitLabels.filter((l, k) => l !== unitLabels![k]).length,
        });
      }
    }
  }
  const binMsSet = new Set(files.map((f) => f.binMs));
  const binMs = binMsSet.size === 1 ? first.binMs : null;
  const f64 = files.some((f) => precisionOf(f) === 'f64');
  const anyMissing = files.some((f) => f.hasMissing);
  const units = first.units;

  return {
    kind: 'activity', units, bins, unitLabels, binMs, files: provenance, segments, findings,
    async *blocks(options) {
      const start = options?.unitStart ?? 0;
      const end = options?.unitEnd ?? units;
      if (!Number.isInteger(start) || !Number.isInteger(end) || start < 0 || start > end || end > units) {
        throw new RangeError(`unit range [${start}, ${end}) is not within [0, ${units})`);
      }
      if (start === end) return;
      const maxBytes = options?.maxBlockBytes ?? maxBlockBytesDefault;
      const per = Math.max(1, Math.min(end - start, Math.floor(maxBytes / (bins * (f64 ? 8 : 4)))));
      const data: Numeric = f64 ? new Float64Array(per * bins) : new Float32Array(per * bins);
      const missing = anyMissing ? new Uint8Array(per * bins) : undefined;
      // Few files: open each once per pass. More than MAX_OPEN_FILES: open, read and close each
      // file per block, so the process never holds more than one of this dataset's files open.
      const bounded = files.length > MAX_OPEN_FILES;
      const acquire = async (i: number): Promise<ActivityFile> => {
        if (isReusable(files[i])) return files[i];
        if (!reopen) throw new InternalError(`${relFiles[i]} cannot be read again after close and no reopen was given`);
        const f = await reopen(i);
        if (f.units !== files[i].units || f.bins !== files[i].bins) {
          await f.close();
          throw new InputError(`file changed while in use: now ${f.units} units × ${f.bins} bins, was ${files[i].units} × ${files[i].bins}`, { file: relFiles[i], where: 'shape' });
        }
        return f;
      };
      const open: ActivityFile[] = [];
      try {
        if (!bounded) for (let i = 0; i < files.length; i++) open.push(await acquire(i));
        for (let u = start; u < end; u += per) {
          const count = Math.min(per, end - u);
          if (missing) missing.fill(0);
          for (let i = 0; i < files.length; i++) {
            if (!bounded) {
              await open[i].readUnits(u, count, data, bins, segments[i].binStart, missing);
              continue;
            }
            const f = await acquire(i);
            try {
              await f.readUnits(u, count, data, bins, segments[i].binStart, missing);
            } finally {
              await f.close();
            }
          }
          if (afterPass && u + count >= end) await afterPass();
          const n = count * bins;
          yield {
            unitStart: u, units: count, bins,
            data: n === data.length ? data : data.subarray(0, n),
            missing: missing && (n === missing.length ? missing : missing.subarray(0, n)),
          };
        }
      } finally {
        for (const f of open) await f.close();
      }
    },
  };
}
