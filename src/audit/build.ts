/**
 * A build, as a pipeline of plain stages:
 *
 *   1. manifests  — find and validate every `audits/*.md` (all problems reported together)
 *   2. inputs     — SHA-256 of every data file (cached by size, mtime, ctime and inode); a
 *                   plain build first takes the workspace lock (`lock.ts`) and removes what
 *                   a killed build left in `records/`
 *   3. compute    — each dataset from the cache, or measured on a lane of the pool (this thread
 *                   and worker threads; one large dataset split by unit ranges); --shard: only
 *                   this process's share, then stop: a later plain build renders
 *   4. assemble   — one AuditResult per audit, with drift across months
 *   5. version    — unchanged inputs reuse the latest version; changed inputs write a new record
 *   6. render     — the site converges to the records (`render.ts`): pages for every version
 *                   missing or rendered from another record, and the indexes whenever what they
 *                   show changed; each version written to a temporary folder and renamed into
 *                   place, so an interrupted build leaves the older versions intact
 */
import { cpus } from 'node:os';
import { toolSourceCommit, workspaceState } from './git-state.ts';
import { join } from 'node:path';
import { findManifests, loadManifest } from '../manifest/index.ts';
import type { ResolvedManifest } from '../manifest/types.ts';
import { InputError, InputErrors } from '../errors.ts';
import type { AuditResult, DatasetResult, MeasureResult } from '../types.ts';
import { TOOL_VERSION } from '../version.ts';
import type { Progress } from '../cli/progress.ts';
import { planHashes, readCachedDataset, recordHashes } from './cache.ts';
import { datasetParameters, finishSplit, keyFor, unitsOf, type DatasetJob } from './dataset.ts';
import type { ActivityPassState } from '../metrics/activity-pass.ts';
import { createPool, type Pool, type Task } from './pool.ts';
import { acquireWorkspaceLock } from './lock.ts';
import { loadRenderModules, renderSite } from './render.ts';
import { claimSite, readSiteState } from './site-state.ts';
import { cleanRecordLeftovers, refuseSymlinkedWorkspaceState } from './state-files.ts';
import { buildDrift } from './drift.ts';
import { describeChange, inputsHash, listVersions, nextVersionName, readRecord, writeRecord, RECORD_FORMAT } from './versions.ts';
import { pushAll } from '../util/arrays.ts';

export interface BuildOptions {
  workspace: string;
  out: string;
  audit?: string;
  /** "I/N": compute share I (1-based) of N into the cache, render nothing. */
  shard?: string;
  /** 'auto' or a whole number ≥ 1. */
  workers?: string;
  progress: Progress;
  /** Split an activity dataset of at least this many bytes across workers (default SPLIT_MIN_BYTES). */
  splitMinBytes?: number;
  /** Read every input again, ignoring the hash index. */
  rehash?: boolean;
  /** Take over an output folder that holds another workspace's site (its pages are regenerated). */
  adoptSite?: boolean;
  /** Fixed clock for tests. */
  now?: () => Date;
}

export interface BuildSummary {
  audits: { audit: string; version: string; reused: boolean; datasets: number }[];
  computed: number;
  cached: number;
  /** Datasets that were split by unit ranges across worker threads. */
  split: number;
  rendered: string[];
  /** Wall time of each stage in ms (the benchmark prints these). */
  timings: { manifests: number; hash: number; compute: number; assemble: number; render: number };
}

export function parseShard(text: string): { index: number; count: number } {
  const m = /^(\d+)\/(\d+)$/.exec(text);
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!m || count < 1 || index < 1 || index > count) {
    throw new InputError(`--shard must be I/N with 1 ≤ I ≤ N, got "${text}"`, { hint: 'e.g. --shard 2/8 for the second of eight shards' });
  }
  return { index, count };
}

function workerCount(text: string | undefined, jobs: number): number {
  if (!text || text === 'auto') return Math.max(1, Math.min(jobs, cpus().length, 4));
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1) throw new InputError(`--workers must be "auto" or a whole number ≥ 1, got "${text}"`);
  return Math.min(n, Math.max(1, jobs));
}

/**
 * An activity dataset at least this large is split by unit ranges across the workers when there
 * are more workers than datasets left to share them (the pass states merge exactly).
 */
export const SPLIT_MIN_BYTES = 128 << 20;
export const SPLIT_MIN_LANES = 2;

async function planTasks(todo: (DatasetJob & { bytes: number })[], workers: number, minBytes: number): Promise<Task[]> {
  const tasks: Task[] = [];
  // Measured on 2 cores (381 MiB, docs/benchmark.md): two lanes over unit ranges, one range
  // each, took 0.9–1.1 s against 1.1–1.2 s for one lane; more, smaller ranges were slower
  // (each range opens the file and allocates a full state).
  const split = workers >= SPLIT_MIN_LANES && todo.length < workers;
  for (const job of todo) {
    const units = split && job.manifest.kind === 'activity' && job.bytes >= minBytes ? await unitsOf(job) : null;
    if (units === null || units < 2 * workers) {
      tasks.push({ kind: 'dataset', job });
      continue;
    }
    for (let w = 0; w < workers; w++) {
      tasks.push({ kind: 'pass', job, range: { unitStart: Math.floor((w * units) / workers), unitEnd: Math.floor(((w + 1) * units) / workers) } });
    }
  }
  return tasks;
}

/** 1. Every manifest, validated; all problems of all manifests together. */
async function loadAll(workspace: string): Promise<ResolvedManifest[]> {
  const files = await findManifests(workspace);
  const manifests: ResolvedManifest[] = [];
  const problems: InputError[] = [];
  for (const f of files) {
    try {
      manifests.push(await loadManifest(f, workspace));
    } catch (err) {
      if (err instanceof InputErrors) pushAll(problems, err.problems);
      else if (err instanceof InputError) problems.push(err);
      else throw err;
    }
  }
  if (problems.length) throw new InputErrors(problems);
  const seen = new Map<string, string>();
  for (const m of manifests) {
    const other = seen.get(m.audit);
    if (other) throw new InputError(`audit slug "${m.audit}" is used by two manifests`, { file: m.relFile, where: 'audit', hint: `also in ${other}` });
    seen.set(m.audit, m.relFile);
  }
  if (!manifests.length) throw new InputError(`no manifests in ${join(workspace, 'audits')}`, { hint: 'add one, or make a demo workspace with `lacuna init DIR`' });
  return manifests;
}

/** Every parameter of an audit, as recorded in its version (the datasets' ones plus drift). */
export function parametersOf(m: ResolvedManifest): Record<string, unknown> {
  return { ...datasetParameters(m), drift: m.drift };
}

export async function buildWorkspace(o: BuildOptions): Promise<BuildSummary> {
  const { workspace, progress } = o;
  const now = o.now ?? (() => new Date());
  const shard = o.shard ? parseShard(o.shard) : null;

  const timings = { manifests: 0, hash: 0, compute: 0, assemble: 0, render: 0 };
  let t0 = performance.now();
  const lap = (k: keyof typeof timings) => {
    const t = performance.now();
    timings[k] = t - t0;
    t0 = t;
  };

  // 1. Manifests (all of them: the site index says which audits lost theirs).
  const everyManifest = await loadAll(workspace);
  const manifests = o.audit ? everyManifest.filter((m) => m.audit === o.audit) : everyManifest;
  if (!manifests.length) throw new InputError(`no audit named "${o.audit}"`, { hint: `audits here: ${everyManifest.map((m) => m.audit).join(', ') || 'none'}` });
  lap('manifests');

  // Nothing is written through a linked state folder; one plain build of a workspace at a time;
  // an output folder of another workspace is refused now, before any work.
  refuseSymlinkedWorkspaceState(workspace);
  if (!shard) claimSite(o.out, workspace, readSiteState(o.out), o.adoptSite ?? false);
  const release = shard ? () => {} : acquireWorkspaceLock(workspace);
  try {
    const left = shard ? [] : cleanRecordLeftovers(workspace);
    if (left.length) progress.info(`removed what an interrupted build left: ${left.join(', ')}`);
    return await buildLocked(o, manifests, everyManifest.map((m) => m.audit), shard, timings, lap, now);
  } finally {
    release();
  }
}

async function buildLocked(
  o: BuildOptions,
  manifests: ResolvedManifest[],
  manifestAudits: string[],
  shard: { index: number; count: number } | null,
  timings: BuildSummary['timings'],
  lap: (k: keyof BuildSummary['timings']) => void,
  now: () => Date,
): Promise<BuildSummary> {
  // Start the worker threads now: their start-up overlaps with hashing the inputs. This thread
  // is one of the lanes, so `--workers N` means N − 1 worker threads.
  const pool = createPool(workerCount(o.workers, Infinity) - 1, { mainLane: true });
  try {
    return await buildWithPool(o, manifests, manifestAudits, pool, shard, timings, lap, now);
  } finally {
    await pool.close();
  }
}

async function buildWithPool(
  o: BuildOptions,
  manifests: ResolvedManifest[],
  manifestAudits: string[],
  pool: Pool,
  shard: { index: number; count: number } | null,
  timings: BuildSummary['timings'],
  lap: (k: keyof BuildSummary['timings']) => void,
  now: () => Date,
): Promise<BuildSummary> {
  const { workspace, progress } = o;

  // 2. Inputs: the SHA-256 of every file whose size, mtime or inode changed since it was last
  // hashed, on the pool's lanes (one file a task). A build that reads new inputs almost always
  // renders a new version, so while worker threads hash, this thread loads the render modules
  // (Eleventy, vega: about 0.6 s) instead of waiting for them at the end, and joins the hashing
  // when done. Shards never render.
  // A shard hashes and computes only its own datasets (dataset number modulo N), so N shards read
  // each input once between them rather than each hashing the whole workspace.
  let count = 0;
  const chosen = manifests
    .flatMap((m) => m.datasets.map((d, i) => ({ m, d, i, n: count++ })))
    .filter(({ n }) => !shard || n % shard.count === shard.index - 1);
  const allFiles = chosen.flatMap(({ d }) => d.files.map((abs, i) => ({ abs, rel: d.relFiles[i] })));
  const notice = (file: string, reason: string) => progress.info(`notice: cache entry ${file} refused, ${reason}; computing it again`);
  const { known: provenance, toHash } = planHashes(workspace, allFiles, { rehash: o.rehash, onReject: notice });
  const preload = !shard && toHash.length > 0 && pool.lanes >= 2 ? loadRenderModules() : null;
  preload?.catch(() => {}); // a failure to load is reported when the render awaits the modules
  if (toHash.length) {
    const hashStep = progress.step(`hashing ${toHash.length} input file${toHash.length === 1 ? '' : 's'}`, toHash.reduce((s, f) => s + f.size, 0), 'bytes');
    const shas = (await pool.run(toHash.map((f) => ({ kind: 'hash' as const, path: f.abs })), (n) => hashStep.advance(n), { mainLaneAfter: preload ?? undefined })) as string[];
    recordHashes(workspace, toHash.map((file, i) => ({ file, sha256: shas[i] })));
    toHash.forEach((f, i) => provenance.set(f.rel, { path: f.rel, sha256: shas[i], bytes: f.size }));
    hashStep.done(`${provenance.size - toHash.length} unchanged`);
  }
  lap('hash');

  // 3. Compute.
  const jobs: (DatasetJob & { key: string; bytes: number })[] = chosen.map(({ m, d, i }) => {
    const files = d.relFiles.map((r) => provenance.get(r)!);
    return { workspace, manifest: m, datasetIndex: i, files, key: keyFor(d, m, files), bytes: files.reduce((s, f) => s + f.bytes, 0) };
  });
  const results = new Map<string, DatasetResult>();
  let split = 0;
  const todo: typeof jobs = [];
  for (const j of jobs) {
    const hit = readCachedDataset(workspace, j.key, notice);
    if (hit) results.set(j.key, hit);
    else todo.push(j);
  }
  const cached = jobs.length - todo.length;
  if (todo.length) {
    const step = progress.step(`computing ${todo.length} dataset${todo.length === 1 ? '' : 's'}`, todo.reduce((s, j) => s + j.bytes, 0), 'bytes');
    const tasks = await planTasks(todo, pool.lanes, o.splitMinBytes ?? SPLIT_MIN_BYTES);
    const out = await pool.run(tasks, (n) => step.advance(n));
    const parts = new Map<(typeof todo)[number], ActivityPassState[]>();
    for (let i = 0; i < tasks.length; i++) {
      const t = tasks[i];
      if (t.kind === 'dataset') {
        const r = out[i] as DatasetResult;
        results.set(r.cacheKey, r);
      } else if (t.kind === 'pass') {
        const j = t.job as (typeof todo)[number];
        parts.set(j, [...(parts.get(j) ?? []), out[i] as ActivityPassState]);
      }
    }
    split = parts.size;
    for (const [j, states] of parts) {
      // The measures' intervals of the merged dataset are spread over the lanes too.
      const r = await finishSplit(j, states, async (jobs) => (await pool.run(jobs.map((job) => ({ kind: 'summarise' as const, job })), () => {})) as MeasureResult[]);
      results.set(r.cacheKey, r);
    }
    step.done(`${cached} from cache`);
  } else {
    progress.info(`all ${jobs.length} dataset results taken from the cache`);
  }
  await pool.close(); // free the workers' memory before rendering
  lap('compute');
  if (shard) {
    progress.info(`shard ${shard.index}/${shard.count}: ${todo.length} computed, ${cached} already cached; run a plain \`lacuna build\` to render`);
    return { audits: [], computed: todo.length, cached, split, rendered: [], timings };
  }

  // 4–5. Assemble and version.
  const summary: BuildSummary = { audits: [], computed: todo.length, cached, split, rendered: [], timings };
  const git = workspaceState(workspace);
  const sourceCommit = toolSourceCommit();
  for (const m of manifests) {
    const datasets = jobs.filter((j) => j.manifest === m).map((j) => results.get(j.key)!);
    const inputs = datasets.flatMap((d) => d.files);
    const parameters = parametersOf(m);
    const hash = inputsHash({ manifestSha256: m.sha256, inputs, parameters, toolVersion: TOOL_VERSION });
    const versions = listVersions(workspace, m.audit);
    const latest = versions[versions.length - 1];
    if (latest && latest.inputsHash === hash) {
      summary.audits.push({ audit: m.audit, version: latest.version, reused: true, datasets: datasets.length });
      continue;
    }
    const version = nextVersionName(versions);
    const drift = buildDrift(datasets, m.drift, { level: m.bootstrap.level, seed: m.bootstrap.seed, resamples: m.bootstrap.resamples });
    const result: AuditResult = {
      audit: m.audit,
      title: m.title,
      kind: m.kind,
      version,
      created: now().toISOString(),
      tool: { name: 'lacuna', version: TOOL_VERSION, node: process.version, commit: git.commit, sourceCommit, workspaceDirty: git.dirty },
      inputs,
      manifest: { path: m.relFile, sha256: m.sha256 },
      parameters,
      datasets,
      drift,
      notes: m.notes,
    };
    const prev = latest ? readRecord(workspace, m.audit, latest.version).result : null;
    writeRecord(workspace, { format: RECORD_FORMAT, entry: { version, created: result.created, inputsHash: hash, changes: describeChange(prev, result) }, result });
    summary.audits.push({ audit: m.audit, version, reused: false, datasets: datasets.length });
  }

  lap('assemble');

  // 6. Render.
  summary.rendered = await renderSite(o.out, workspace, manifestAudits, progress, { adoptSite: o.adoptSite });
  lap('render');
  return summary;
}

export { renderSite } from './render.ts';
