/**
 * The per-file contract every activity reader implements. A dataset made of several files
 * (sessions) is the files joined along the bin axis by `src/readers/index.ts`; each reader
 * only has to hand out ranges of whole units of its own file.
 */
import type { Finding, Numeric } from '../types.ts';

export interface ActivityFile {
  /** Absolute path. */
  path: string;
  units: number;
  bins: number;
  /** Optional unit names (NWB ids, CSV header, spike-table unit names). */
  unitLabels?: string[];
  /** Bin width in ms where the file defines it (spike times binned at bin_ms, NWB series); else null. */
  binMs: number | null;
  /** Findings the reader made about this file (resampling, missing bins, …). */
  findings: Finding[];
  /** True when some (unit, bin) cells are missing (NWB observation intervals). */
  hasMissing: boolean;
  /**
   * Fill units [unitStart, unitStart + count) of this file into `out`, a row-major block whose
   * rows are units and which has `outCols` columns; this file's bins go to columns
   * [colOffset, colOffset + bins). When `missing` is given and the file has missing cells,
   * set those cells to 1 (leave others untouched); missing cells in `out` are set to 0.
   * Errors are InputErrors naming the file and the place (byte offset, row, column).
   */
  readUnits(unitStart: number, count: number, out: Numeric, outCols: number, colOffset: number, missing?: Uint8Array): Promise<void>;
  close(): Promise<void>;
}

/** What `lacuna check` learns about one file from its header, without reading the data. */
export interface FileInspection {
  path: string;
  format: string;
  /** Shape as stored, e.g. [units, bins] or per tensor. */
  shape: number[] | null;
  dtype: string | null;
  /** Tensors/members/series found, when the file holds several. */
  parts?: { name: string; shape: number[]; dtype: string }[];
  bytes: number;
}
