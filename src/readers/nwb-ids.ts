/**
 * Unit labels from an NWB table's `id` column.
 *
 * The NWB standard types `id` as ElementIdentifiers (integers), but files written by other
 * tools carry string ids; Lacuna reads integer ids and fixed-length string ids of at most
 * MAX_ID_BYTES bytes, and refuses any other type (variable-length strings among them: their
 * length is not known before reading) — in `lacuna check` and `lacuna build` alike, with the
 * same message. A label is text from an untrusted file: control characters (C0, DEL, C1) and
 * bidirectional-override characters are written as `\u{…}` escapes, and a label is cut at
 * MAX_LABEL characters, so no label can drive a terminal or reorder a line; HTML escaping is the
 * page templates' job as for every other string.
 */
import type { Dataset } from 'h5wasm';
import { InputError } from '../errors.ts';
import { readSlice } from './hdf5-guard.ts';
import { isNumeric, readRange } from './nwb-hdf5.ts';

export const MAX_ID_BYTES = 256;
const MAX_LABEL = 120;
const SLICE = 4096;

/** Why an `id` column cannot be read, or null. From the header only. */
export function idProblem(ds: Dataset): string | null {
  if (isNumeric(ds)) return null;
  const m = ds.metadata;
  if (m.type === 3 && !m.vlen && m.size <= MAX_ID_BYTES) return null;
  const what = m.type === 3 ? (m.vlen ? 'variable-length strings' : `strings of ${m.size} bytes`) : JSON.stringify(ds.dtype);
  return `id holds ${what}; allowed: integers (NWB ElementIdentifiers) or fixed-length strings of at most ${MAX_ID_BYTES} bytes`;
}

/** A label safe to print and to put in a record: controls and bidi overrides escaped, length capped. */
export function safeLabel(s: string): string {
  const escaped = s.replace(/[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, (c) => `\\u{${c.charCodeAt(0).toString(16)}}`);
  return escaped.length > MAX_LABEL ? `${escaped.slice(0, MAX_LABEL)}…` : escaped;
}

/** Read `units` labels from `ds` (checked with idProblem first). */
export function readUnitLabels(ds: Dataset, units: number, relPath: string): string[] {
  const problem = idProblem(ds);
  if (problem) throw new InputError(problem, { file: relPath, where: ds.path });
  if (isNumeric(ds)) return Array.from(readRange(ds, 0, units), String);
  const out: string[] = [];
  for (let a = 0; a < units; a += SLICE) {
    const v = readSlice(ds, [[a, Math.min(units, a + SLICE)]], relPath);
    const arr = Array.isArray(v) ? v : [v];
    for (const x of arr) out.push(safeLabel(typeof x === 'string' ? x : String(x)));
  }
  return out;
}
