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
import { cleanCacheLeftovers, planHashes, readCachedDataset, recordHashes, type FileToHash } from './cache.ts';
import { datasetParameters, finishSplit, keyFor, unitsOf, withHashes, type DatasetJob, type DatasetOutcome, type HashedInPass, type PassPart } from './dataset.ts';
import type { ActivityPassState } from '../metrics/activity-pass.ts';
import { createPool, type Pool, type Task, type TaskResult } from './pool.ts';
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
  /**
   * Input bytes hashed: on their own before the compute (`first`), or in the pass that measured
   * them (`inPass`), of which `reread` the taps had to read again themselves (read-tap.ts).
   */
  hashed: { first: number; inPass: number; reread: number };
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

/**
 * Costs on the benchmark machine (docs/benchmark.md, 2 cores), for sharing a split dataset's
 * units between lanes: the one-pass measures take about 2.9 ns a byte of lane time when two lanes
 * run at once, SHA-256 about 0.8 ns a byte, and loading the render modules on this thread about
 * 0.7 s. Other machines differ; a wrong guess only makes one lane wait for the other.
 */
const PASS_S_PER_BYTE = 2.9e-9;
const HASH_S_PER_BYTE = 0.8e-9;
const PRELOAD_S = 0.7;

/**
 * The share of a split dataset's units for the lane that hashes its files in its reads (the
 * first range). That lane also reads the rest of the file for the hash once its range is done,
 * while this thread (another lane) may first load the render modules; the share evens the two
 * out: with P the pass's lane time, H the hash's and L the load's, over W lanes,
 * s·P + H = L + (1 − s)·P/(W − 1). On two lanes: about 0.66 at 381 MiB with the load, 0.39 at 4 GiB.
 */
export function hashingLaneShare(bytes: number, lanes: number, preloading: boolean): number {
  const P = PASS_S_PER_BYTE * bytes;
  const H = HASH_S_PER_BYTE * bytes;
  const L = preloading ? PRELOAD_S : 0;
  const w = Math.max(2, lanes);
  const s = (L - H + P / (w - 1)) / ((P * w) / (w - 1));
  return Math.min(0.8, Math.max(0.2, s));
}

/**
 * The files to hash in the pass that measures them (read-tap.ts): each fresh file (new to the
 * hash index, or resized: `FileToHash.fresh`) together with the other unhashed files of its
 * dataset, when none of them is read by another dataset of this build. Such a dataset misses the
 * cache whatever the hashes turn out to be, so one read serves both. Every other file is hashed
 * first: a file of unchanged size may have unchanged bytes, and its dataset then comes from the
 * cache without being measured; a file two datasets read is hashed once, not by both.
 */
export function filesHashedInPass(datasets: string[][], pending: Map<string, FileToHash>): Set<string> {
  const uses = new Map<string, number>();
  for (const rels of datasets) for (const r of rels) uses.set(r, (uses.get(r) ?? 0) + 1);
  const out = new Set<string>();
  for (const rels of datasets) {
    const mine = rels.filter((r) => pending.has(r));
    if (mine.some((r) => pending.get(r)!.fresh) && mine.every((r) => uses.get(r) === 1)) for (const r of mine) out.add(r);
  }
  return out;
}

/** Tasks for the datasets to compute, each with the index (into `todo`) of the dataset it serves. */
async function planTasks(todo: (DatasetJob & { bytes: number })[], workers: number, minBytes: number, preloading: boolean): Promise<{ task: Task; owner: number }[]> {
  const tasks: { task: Task; owner: number }[] = [];
  // Measured on 2 cores (381 MiB, docs/benchmark.md): two lanes over unit ranges, one range
  // each, took 0.9–1.1 s against 1.1–1.2 s for one lane; more, smaller ranges were slower
  // (each range opens the file and allocates a full state).
  const split = workers >= SPLIT_MIN_LANES && todo.length < workers;
  for (let owner = 0; owner < todo.length; owner++) {
    const job = todo[owner];
    const units = split && job.manifest.kind === 'activity' && job.bytes >= minBytes ? await unitsOf(job) : null;
    if (units === null || units < 2 * workers) {
      tasks.push({ task: { kind: 'dataset', job }, owner });
      continue;
    }
    // Range boundaries: the first range (whose lane hashes, when the files need it) takes
    // `hashingLaneShare` of the units, the others share the rest evenly.
    const share = job.hashInPass ? hashingLaneShare(job.bytes, workers, preloading) : 1 / workers;
    const first = Math.min(units - (workers - 1), Math.max(1, Math.round(units * share)));
    const edge = (w: number) => (w === 0 ? 0 : first + Math.floor(((w - 1) * (units - first)) / (workers - 1)));
    for (let w = 0; w < workers; w++) {
      const range = { unitStart: edge(w), unitEnd: w === workers - 1 ? units : edge(w + 1) };
      tasks.push({ task: { kind: 'pass', job: w === 0 ? job : { ...job, hashInPass: undefined, stamps: undefined }, range }, owner });
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
    const left = shard ? [] : [...cleanRecordLeftovers(workspace), ...cleanCacheLeftovers(workspace).map((f) => `.lacuna-cache/${f}`)];
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

  // 2. Inputs: the SHA-256 of every file whose size, mtime, ctime or inode changed since it was
  // last hashed. A shard hashes and computes only its own datasets (dataset number modulo N), so
  // N shards read each input once between them rather than each hashing the whole workspace.
  let count = 0;
  const chosen = manifests
    .flatMap((m) => m.datasets.map((d, i) => ({ m, d, i, n: count++ })))
    .filter(({ n }) => !shard || n % shard.count === shard.index - 1);
  const allFiles = chosen.flatMap(({ d }) => d.files.map((abs, i) => ({ abs, rel: d.relFiles[i] })));
  const notice = (file: string, reason: string) => progress.info(`notice: cache entry ${file} refused, ${reason}; computing it again`);
  const { known: provenance, toHash } = planHashes(workspace, allFiles, { rehash: o.rehash, onReject: notice });
  const pending = new Map(toHash.map((f) => [f.rel, f]));
  const inPass = filesHashedInPass(chosen.map(({ d }) => d.relFiles), pending);
  const hashFirst = toHash.filter((f) => !inPass.has(f.rel));
  const hashed = { first: hashFirst.reduce((s, f) => s + f.size, 0), inPass: 0, reread: 0 };

  // A build that reads new inputs almost always renders a new version, so while the worker
  // threads hash (or measure) them, this thread loads the render modules (Eleventy, vega: about
  // 0.6 s) instead of waiting for them at the end, and joins the lanes when done. Shards never
  // render.
  const preload = !shard && toHash.length > 0 && pool.lanes >= 2 ? loadRenderModules() : null;
  preload?.catch(() => {}); // a failure to load is reported when the render awaits the modules
  const record = (learnt: { file: FileToHash; sha256: string }[]) => {
    recordHashes(workspace, learnt, { fragment: !!shard });
    for (const { file, sha256 } of learnt) provenance.set(file.rel, { path: file.rel, sha256, bytes: file.size });
  };
  // Files hashed on their own first: unchanged-size files (their dataset may still be cached)
  // and files that more than one dataset reads.
  if (hashFirst.length) {
    const hashStep = progress.step(`hashing ${hashFirst.length} input file${hashFirst.length === 1 ? '' : 's'}`, hashFirst.reduce((s, f) => s + f.size, 0), 'bytes');
    const shas = (await pool.run(hashFirst.map((f) => ({ kind: 'hash' as const, path: f.abs })), (n) => hashStep.advance(n), { mainLaneAfter: preload ?? undefined })) as string[];
    record(hashFirst.map((file, i) => ({ file, sha256: shas[i] })));
    hashStep.done(`${provenance.size - hashFirst.length} unchanged${inPass.size ? `, ${inPass.size} new to hash while measuring` : ''}`);
  } else if (!toHash.length) {
    record([]); // folds what shards left in hashes.d/ into the index
  }
  lap('hash');

  // 3. Compute. A dataset with files hashed in the pass has no key yet (its key holds their
  // hashes) and misses the cache by construction; the others are looked up.
  const jobs: (DatasetJob & { key: string | null; bytes: number })[] = chosen.map(({ m, d, i }) => {
    const files = d.relFiles.map((r) => provenance.get(r) ?? { path: r, sha256: '', bytes: pending.get(r)!.size });
    const hashInPass = d.relFiles.flatMap((r, k) => (inPass.has(r) ? [k] : []));
    const stamps = hashInPass.map((k) => pending.get(d.relFiles[k])!);
    const key = hashInPass.length ? null : keyFor(d, m, files);
    return {
      workspace, manifest: m, datasetIndex: i, files, key, bytes: files.reduce((s, f) => s + f.bytes, 0),
      ...(hashInPass.length ? { hashInPass, stamps: stamps.map((f) => ({ mtimeMs: f.mtimeMs, ctimeMs: f.ctimeMs, ino: f.ino })) } : {}),
    };
  });
  const results: (DatasetResult | undefined)[] = jobs.map((j) => (j.key ? (readCachedDataset(workspace, j.key, notice) ?? undefined) : undefined));
  const todoIndex = jobs.flatMap((_, k) => (results[k] ? [] : [k]));
  const todo = todoIndex.map((k) => jobs[k]);
  const cached = jobs.length - todo.length;
  let split = 0;
  const hashedInPass: HashedInPass[] = [];
  if (todo.length) {
    const step = progress.step(`computing ${todo.length} dataset${todo.length === 1 ? '' : 's'}`, todo.reduce((s, j) => s + j.bytes, 0), 'bytes');
    const tasks = await planTasks(todo, pool.lanes, o.splitMinBytes ?? SPLIT_MIN_BYTES, preload !== null);
    // Hashes learnt in the pass are kept as each task ends, and recorded even when a later
    // dataset fails: the next build then finds the datasets that were computed in the cache
    // instead of measuring them again to learn their files' hashes.
    let out: TaskResult[];
    try {
      out = await pool.run(
        tasks.map((t) => t.task),
        (n) => step.advance(n),
        { mainLaneAfter: preload ?? undefined, onResult: (i, r) => pushAll(hashedInPass, tasks[i].task.kind === 'dataset' ? (r as DatasetOutcome).hashed : (r as PassPart).hashed) },
      );
    } finally {
      record(hashedInPass.map((h) => ({ file: pending.get(h.path)!, sha256: h.sha256 })));
    }
    const parts = new Map<number, { states: ActivityPassState[]; hashed: HashedInPass[] }>();
    for (let i = 0; i < tasks.length; i++) {
      const { task, owner } = tasks[i];
      if (task.kind === 'dataset') {
        results[todoIndex[owner]] = (out[i] as DatasetOutcome).result;
      } else if (task.kind === 'pass') {
        const part = out[i] as PassPart;
        const p = parts.get(owner) ?? { states: [], hashed: [] };
        p.states.push(part.state);
        pushAll(p.hashed, part.hashed);
        parts.set(owner, p);
      }
    }
    split = parts.size;
    for (const [owner, { states, hashed: learnt }] of parts) {
      // The measures' intervals of the merged dataset are spread over the lanes too.
      const job = withHashes(todo[owner], learnt);
      results[todoIndex[owner]] = await finishSplit(job, states, async (jobs) => (await pool.run(jobs.map((job) => ({ kind: 'summarise' as const, job })), () => {})) as MeasureResult[]);
    }
    for (const h of hashedInPass) {
      hashed.inPass += h.bytes;
      hashed.reread += h.reread;
    }
    step.done(`${cached} from cache${inPass.size ? `; ${inPass.size} new input file${inPass.size === 1 ? '' : 's'} hashed as ${inPass.size === 1 ? 'it was' : 'they were'} read` : ''}`);
  } else {
    progress.info(`all ${jobs.length} dataset results taken from the cache`);
  }
  await pool.close(); // free the workers' memory before rendering
  lap('compute');
  if (shard) {
    progress.info(`shard ${shard.index}/${shard.count}: ${todo.length} computed, ${cached} already cached; run a plain \`lacuna build\` to render`);
    return { audits: [], computed: todo.length, cached, split, rendered: [], hashed, timings };
  }

  // 4–5. Assemble and version.
  const summary: BuildSummary = { audits: [], computed: todo.length, cached, split, rendered: [], hashed, timings };
  const git = workspaceState(workspace);
  const sourceCommit = toolSourceCommit();
  for (const m of manifests) {
    const datasets = jobs.flatMap((j, k) => (j.manifest === m ? [results[k]!] : []));
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
