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
import { tapFiles, type FileStamp, type TappedHash } from '../readers/read-tap.ts';

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
  /**
   * Indexes into `files` whose SHA-256 is not known yet (their `sha256` is empty): the task
   * hashes them from its own reads (read-tap.ts) and the result carries the full provenance.
   */
  hashInPass?: number[];
  /** For each index of `hashInPass`, the file's identity when the build planned to hash it. */
  stamps?: FileStamp[];
}

/** A file hashed in a task's own reads: its provenance, and the bytes the tap read itself. */
export interface HashedInPass extends FileProvenance {
  reread: number;
}

/** Register taps for the job's files whose hash is pending (none: a no-op set). */
function tapsFor(job: DatasetJob) {
  const ds = job.manifest.datasets[job.datasetIndex];
  const idx = job.hashInPass ?? [];
  const set = tapFiles(idx.map((i, k) => ({ path: ds.files[i], relPath: job.files[i].path, size: job.files[i].bytes, stamp: job.stamps?.[k] })));
  return {
    async finish(): Promise<HashedInPass[]> {
      const got: TappedHash[] = await set.finish();
      return idx.map((i, k) => ({ path: job.files[i].path, sha256: got[k].sha256, bytes: got[k].bytes, reread: got[k].reread }));
    },
    drop: () => set.drop(),
  };
}

/** The job with the hashes learnt in the pass filled in. */
export function withHashes(job: DatasetJob, hashed: HashedInPass[]): DatasetJob {
  const by = new Map(hashed.map((h) => [h.path, h.sha256]));
  const files = job.files.map((f) => ({ path: f.path, sha256: by.get(f.path) ?? f.sha256, bytes: f.bytes }));
  if (files.some((f) => !f.sha256)) throw new InternalError(`a file of dataset ${job.datasetIndex} was never hashed`);
  return { ...job, files, hashInPass: undefined, stamps: undefined };
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

/** A dataset's result, and the files its task hashed in its own reads (`job.hashInPass`). */
export interface DatasetOutcome {
  result: DatasetResult;
  hashed: HashedInPass[];
}

/** Compute (cache miss) and store a dataset result; returns it. */
export async function computeDataset(job: DatasetJob, onBytes: (n: number) => void = () => {}): Promise<DatasetResult> {
  return (await measureDataset(job, onBytes)).result;
}

/**
 * Compute (cache miss) and store a dataset result. A job with files to hash in the pass cannot
 * know its cache key before it reads them (the key holds their hashes); it is a miss by
 * construction (build.ts sends only new or resized files this way), and the key is made once
 * the files are read.
 */
export async function measureDataset(job: DatasetJob, onBytes: (n: number) => void = () => {}): Promise<DatasetOutcome> {
  const m = job.manifest;
  const ds = m.datasets[job.datasetIndex];
  if (!job.hashInPass?.length) {
    const cached = readCachedDataset(job.workspace, keyFor(ds, m, job.files));
    if (cached) return { result: cached, hashed: [] };
  }
  const taps = tapsFor(job);
  let partial: Omit<DatasetResult, 'cacheKey'>;
  try {
    const source = await openForJob(job); // (names the dataset in its own errors)
    try {
      partial = source.kind === 'activity' ? await computeActivity(ds, m, source, onBytes) : await computeWeights(ds, m, source, onBytes);
    } catch (err) {
      throw wrap(err, ds, m);
    }
  } catch (err) {
    taps.drop();
    throw err;
  }
  const hashed = await taps.finish();
  const done = withHashes(job, hashed);
  checkSameFiles(job, partial.files);
  const result: DatasetResult = { ...partial, files: done.files, cacheKey: keyFor(ds, m, done.files) };
  writeCachedDataset(job.workspace, result);
  return { result, hashed };
}

/** One lane's share of a split dataset, and the files it hashed (those of `job.hashInPass`). */
export interface PassPart {
  state: ActivityPassState;
  hashed: HashedInPass[];
}

/**
 * One worker's share of a split activity dataset: the pass state over units [unitStart, unitEnd).
 * With `job.hashInPass`, this lane also hashes those files: from its own reads while they come in
 * file order, then by reading the rest (the other ranges' bytes) itself.
 */
export async function computePassPart(job: DatasetJob, range: { unitStart: number; unitEnd: number }, onBytes: (n: number) => void = () => {}): Promise<PassPart> {
  const m = job.manifest;
  const taps = tapsFor(job);
  let state: ActivityPassState;
  try {
    const source = await openForJob(job); // (names the dataset in its own errors)
    if (source.kind !== 'activity') throw new InternalError('computePassPart called on a weights dataset');
    try {
      state = await runActivityPass(source, m, onBytes, range);
    } catch (err) {
      throw wrap(err, m.datasets[job.datasetIndex], m);
    }
  } catch (err) {
    taps.drop();
    throw err;
  }
  return { state, hashed: await taps.finish() };
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
