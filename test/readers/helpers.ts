/** Shared set-up for the reader tests: temp folders, datasets, and reading a whole source. */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import type { ActivitySource, DataSource } from '../../src/types.ts';
import type { DataFormat, Layout, ResolvedDataset } from '../../src/manifest/types.ts';

export function tempDir(prefix = 'lacuna-readers-'): { dir: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

export function dataset(root: string, files: string[], format: DataFormat, extra: Partial<ResolvedDataset> = {}): ResolvedDataset {
  return {
    id: 'd1', path: 'data', files, relFiles: files.map((f) => relative(root, f).split('\\').join('/')),
    format, month: null, group: null, layout: 'units-by-bins' as Layout, series: null, member: null, sorter: null, imaging: null, ...extra,
  };
}

/** Every block of an activity source copied into one units × bins float64 matrix (row-major). */
export async function readAll(src: DataSource, maxBlockBytes?: number): Promise<Float64Array> {
  if (src.kind !== 'activity') throw new Error('not activity');
  const a = src as ActivitySource;
  const out = new Float64Array(a.units * a.bins);
  let next = 0;
  for await (const b of a.blocks(maxBlockBytes ? { maxBlockBytes } : undefined)) {
    if (b.unitStart !== next) throw new Error(`block starts at ${b.unitStart}, expected ${next}`);
    out.set(b.data.subarray(0, b.units * b.bins), b.unitStart * a.bins);
    next += b.units;
  }
  if (next !== a.units) throw new Error(`blocks covered ${next} of ${a.units} units`);
  return out;
}

/** Compare allowing NaN === NaN; returns the first differing index or -1. */
export function firstDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) return Math.min(a.length, b.length);
  for (let i = 0; i < a.length; i++) {
    if (!(Object.is(a[i], b[i]) || (a[i] === b[i]))) return i;
  }
  return -1;
}

/** Run `fn` and return the error it throws (fails the test if it does not throw). */
export async function errorOf(fn: () => Promise<unknown>): Promise<Error & { file?: string; where?: string }> {
  try {
    await fn();
  } catch (err) {
    return err as Error & { file?: string; where?: string };
  }
  throw new Error('expected an error, none was thrown');
}
