/**
 * Compute one dataset's result, or take it from the cache.
 * Runs in the main thread or in a worker (worker.mjs); takes and returns plain values.
 */
import { openDataset } from '../readers/index.ts';
import type { ResolvedDataset, ResolvedManifest } from '../manifest/types.ts';
import type { DatasetResult, FileProvenance } from '../types.ts';
import { TOOL_VERSION } from '../version.ts';
import { computeActivity } from './activity.ts';
import { computeWeights } from './weights.ts';
import { datasetCacheKey, readCachedDataset, writeCachedDataset } from './cache.ts';
import { InputError } from '../errors.ts';

/** The manifest settings that change a dataset's numbers (and so its cache key). */
export function datasetParameters(m: ResolvedManifest): Record<string, unknown> {
  return {
    kind: m.kind,
    axis: m.axis,
    bin_ms: m.bin_ms,
    zero_tolerance: m.zero_tolerance,
    bootstrap: m.bootstrap,
    negatives: m.negatives,
    events: m.events,
    min_bins: m.min_bins,
    min_nonzero: m.min_nonzero,
  };
}

export function keyFor(ds: ResolvedDataset, m: ResolvedManifest, files: FileProvenance[]): string {
  const { files: _abs, relFiles: _rel, path: _path, ...entry } = ds;
  return datasetCacheKey({ files, entry, parameters: datasetParameters(m), toolVersion: TOOL_VERSION });
}

export interface DatasetJob {
  workspace: string;
  manifest: ResolvedManifest;
  datasetIndex: number;
  files: FileProvenance[];
}

/** Compute (cache miss) and store a dataset result; returns it. */
export async function computeDataset(job: DatasetJob, onBytes: (n: number) => void = () => {}): Promise<DatasetResult> {
  const m = job.manifest;
  const ds = m.datasets[job.datasetIndex];
  const cacheKey = keyFor(ds, m, job.files);
  const cached = readCachedDataset(job.workspace, cacheKey);
  if (cached) return cached;
  let partial: Omit<DatasetResult, 'cacheKey'>;
  try {
    const source = await openDataset(ds, { kind: m.kind, binMs: m.bin_ms, workspaceRoot: job.workspace });
    partial = source.kind === 'activity' ? await computeActivity(ds, m, source, onBytes) : await computeWeights(ds, m, source, onBytes);
  } catch (err) {
    if (err instanceof InputError) throw new InputError(`dataset "${ds.id}" of ${m.relFile} could not be measured`, { cause: err, hint: err.hint });
    throw err;
  }
  // The reader hashed the files it read; they must be the files the key was made from.
  const read = new Map(partial.files.map((f) => [f.path, f.sha256]));
  for (const f of job.files) {
    if (read.get(f.path) !== f.sha256) throw new InputError(`file changed while it was being read`, { file: f.path, hint: 'run the build again' });
  }
  const result: DatasetResult = { ...partial, cacheKey };
  writeCachedDataset(job.workspace, result);
  return result;
}
