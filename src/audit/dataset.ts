/**
 * Compute one dataset's result, or take it from the cache.
 * Runs in the main thread or in a worker (worker.mjs); takes and returns plain values.
 *
 * A large activity dataset can also be split by unit ranges: each worker streams its units
 * through the one-pass engine (`computePassPart`), and the main thread merges the states and
 * finishes (`finishSplit`); the merged states equal the whole's (test/metrics/activity-pass).
 */
import { openDataset } from '../readers/index.ts';
import type { ResolvedDataset, ResolvedManifest } from '../manifest/types.ts';
import type { ActivitySource, DataSource, DatasetResult, FileProvenance, MeasureResult } from '../types.ts';
import type { SummariseJob } from './summarise.ts';
import type { ActivityPassState } from '../metrics/activity-pass.ts';
import { TOOL_VERSION } from '../version.ts';
import { activityResult, computeActivity, runActivityPass, sourceMeta } from './activity.ts';
import { computeWeights } from './weights.ts';
import { datasetCacheKey, readCachedDataset, writeCachedDataset } from './cache.ts';
import { InputError, inputErrorWithHint, InternalError } from '../errors.ts';

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
  /** Provenance from the build's hash of the inputs; the reader checks the files did not change. */
  files: FileProvenance[];
}

/** Name the dataset in a reader's error, keeping its cause. */
function wrap(err: unknown, ds: ResolvedDataset, m: ResolvedManifest): unknown {
  // The cause's message shows its hint; the wrapper keeps it as a property only, so it is printed once.
  if (err instanceof InputError) return inputErrorWithHint(`dataset "${ds.id}" of ${m.relFile} could not be measured`, err, err.hint);
  return err;
}

export async function openForJob(job: DatasetJob): Promise<DataSource> {
  const m = job.manifest;
  const ds = m.datasets[job.datasetIndex];
  try {
    return await openDataset(ds, { kind: m.kind, binMs: m.bin_ms, workspaceRoot: job.workspace, provenance: job.files });
  } catch (err) {
    throw wrap(err, ds, m);
  }
}

function checkSameFiles(job: DatasetJob, read: FileProvenance[]): void {
  const got = new Map(read.map((f) => [f.path, f.sha256]));
  for (const f of job.files) {
    if (got.get(f.path) !== f.sha256) throw new InputError('file changed while it was being read', { file: f.path, hint: 'run the build again' });
  }
}

/** Compute (cache miss) and store a dataset result; returns it. */
export async function computeDataset(job: DatasetJob, onBytes: (n: number) => void = () => {}): Promise<DatasetResult> {
  const m = job.manifest;
  const ds = m.datasets[job.datasetIndex];
  const cacheKey = keyFor(ds, m, job.files);
  const cached = readCachedDataset(job.workspace, cacheKey);
  if (cached) return cached;
  const source = await openForJob(job);
  let partial: Omit<DatasetResult, 'cacheKey'>;
  try {
    partial = source.kind === 'activity' ? await computeActivity(ds, m, source, onBytes) : await computeWeights(ds, m, source, onBytes);
  } catch (err) {
    throw wrap(err, ds, m);
  }
  checkSameFiles(job, partial.files);
  const result: DatasetResult = { ...partial, cacheKey };
  writeCachedDataset(job.workspace, result);
  return result;
}

/** One worker's share of a split activity dataset: the pass state over units [unitStart, unitEnd). */
export async function computePassPart(job: DatasetJob, range: { unitStart: number; unitEnd: number }, onBytes: (n: number) => void = () => {}): Promise<ActivityPassState> {
  const m = job.manifest;
  const source = await openForJob(job);
  if (source.kind !== 'activity') throw new InternalError('computePassPart called on a weights dataset');
  try {
    return await runActivityPass(source, m, onBytes, range);
  } catch (err) {
    throw wrap(err, m.datasets[job.datasetIndex], m);
  }
}

/**
 * Merge the workers' states of a split dataset, finish, and store the result. `summariser` may
 * spread the measures' intervals over the pool's lanes.
 */
export async function finishSplit(job: DatasetJob, states: ActivityPassState[], summariser?: (jobs: SummariseJob[]) => Promise<MeasureResult[]>): Promise<DatasetResult> {
  const m = job.manifest;
  const ds = m.datasets[job.datasetIndex];
  const source = (await openForJob(job)) as ActivitySource;
  const partial = await activityResult(ds, m, sourceMeta(source), states, summariser);
  checkSameFiles(job, partial.files);
  const result: DatasetResult = { ...partial, cacheKey: keyFor(ds, m, job.files) };
  writeCachedDataset(job.workspace, result);
  return result;
}

/** Units of an activity dataset (header only), or null for weights. */
export async function unitsOf(job: DatasetJob): Promise<number | null> {
  const source = await openForJob(job);
  return source.kind === 'activity' ? source.units : null;
}
