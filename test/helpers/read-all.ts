/** Read every unit of an ActivityFile into plain arrays (values and missing mask), for assertions. */
import type { ActivityFile } from '../../src/readers/types.ts';

export async function readAll(f: ActivityFile): Promise<{ values: number[][]; missing: number[][] }> {
  const out = new Float64Array(f.units * f.bins);
  const miss = new Uint8Array(out.length);
  await f.readUnits(0, f.units, out, f.bins, 0, miss);
  const rows = (a: ArrayLike<number>) => Array.from({ length: f.units }, (_, u) => Array.from(a).slice(u * f.bins, (u + 1) * f.bins));
  return { values: rows(out), missing: rows(miss) };
}
