/**
 * Data readers: the entry points the audit and `lacuna check` use.
 *
 *   ResolvedDataset ─┬─ activity: 1. open each file (openActivityFile, per format)
 *                    │            2. check units agree, 3. hash files, 4. join along bins (join.ts)
 *                    └─ weights:  1. read every header (weights.ts), 2. hash files
 *
 * Step "hash files" is skipped when the caller passes the provenance it computed (the build hashes
 * every input first): the files' size, times and inode are recorded at open instead and checked
 * after each full pass (file-guard.ts), so a file changed underneath is an InputError, not a
 * result recorded under the wrong hash.
 *
 * Formats: npy.ts (NEP 1), npz.ts (+ zip.ts, inflate-source.ts), csv.ts (CSV/TSV matrices),
 * spikes.ts (spike-time tables), safetensors.ts (weights), nwb.ts (NWB 2.x, loaded on demand so
 * its HDF5 WebAssembly module is only loaded for NWB datasets). Every problem with a data file is
 * an InputError naming the workspace-relative file and the place.
 */
import { stat } from 'node:fs/promises';
import type { FileProvenance, WeightsSource } from '../types.ts';
import type { AuditKind, ResolvedDataset } from '../manifest/types.ts';
import { InputError, InternalError } from '../errors.ts';
import type { ActivityFile, FileInspection } from './types.ts';
import { inputError } from './byte-source.ts';
import { hashFile } from './hash.ts';
import { guardFiles, type FileGuard, type HashedFile } from './file-guard.ts';
import { openNpyActivity, openNpyFile, activityGeometry } from './npy.ts';
import { openNpzActivity, npzEntries, openNpzMember, chooseMember } from './npz.ts';
import { openCsvActivity, inspectTable } from './csv.ts';
import { openSpikeTable } from './spikes.ts';
import { inspectSpikeHeader } from './spikes-inspect.ts';
import { readSafetensorsHeader } from './safetensors.ts';
import { delimiterFor } from './table-text.ts';
import { planWeights, readTensors } from './weights.ts';
import { joinActivity, type RangedActivitySource } from './join.ts';
import type { ReadableActivityFile } from './activity-file.ts';
import { openSorterFolder, inspectSorterFolder } from './sorter-folder.ts';
import { openImagingFolder } from './imaging-folder.ts';

export { hashFile };
export type { HashedFile, RangedActivitySource };
export type { BlockOptions } from './join.ts';
export type { ReadableActivityFile } from './activity-file.ts';

/** A reader that holds the whole file in memory (CSV, spike tables): any unit range is contiguous. */
function inMemory(f: ReadableActivityFile): ReadableActivityFile {
  return Object.assign(f, { contiguous: true });
}

/** A folder dataset (sorter or imaging output) as one activity file over all its member files. */
async function openLabFolder(ds: ResolvedDataset, ctx: { binMs: number }): Promise<ReadableActivityFile> {
  if (ds.format === 'sorter-folder') return openSorterFolder(ds.files, ds.relFiles, ds.sorter!, ctx.binMs);
  return openImagingFolder(ds.files, ds.relFiles, ds.imaging!, ctx.binMs);
}

/** The folder of a folder dataset, workspace-relative (for the joiner's segment and messages). */
function folderRel(ds: ResolvedDataset): string {
  const r = ds.relFiles[0];
  const planeUp = ds.format === 'imaging-folder' && /\/plane\d+\/[^/]+$/.test(r) ? 2 : 1;
  return r.split('/').slice(0, -planeUp).join('/') || '.';
}

/** One file of an activity dataset, opened for `readUnits` (headers read; data not yet). */
export async function openActivityFile(path: string, relPath: string, ds: ResolvedDataset, ctx: { binMs: number }): Promise<ActivityFile> {
  switch (ds.format) {
    case 'npy': return openNpyActivity(path, relPath, ds.layout);
    case 'npz': return openNpzActivity(path, relPath, ds.layout, ds.member);
    case 'csv':
    case 'tsv': return inMemory(await openCsvActivity(path, relPath, ds.layout, delimiterFor(ds.format, relPath)));
    case 'spikes': return openSpikeTable(path, relPath, delimiterFor(ds.format, relPath), ctx.binMs); // contiguous already (spike-counts.ts)
    case 'nwb': {
      const { openNwbActivity } = await import('./nwb.ts');
      return openNwbActivity(path, { binMs: ctx.binMs, series: ds.series, relPath, recordingEndS: ds.recording_end_s ?? null });
    }
    case 'safetensors':
      throw inputError(relPath, 'format', 'safetensors files hold weights, not activity', 'use kind: weights, or store activity as npy, npz, csv, tsv, spikes or nwb');
    case 'sorter-folder':
    case 'imaging-folder':
      throw new InternalError(`${ds.format} is opened as a whole folder (openLabFolder), not file by file`);
    default:
      throw inputError(relPath, 'format', `unknown format '${String(ds.format)}'`);
  }
}

function noFiles(ds: ResolvedDataset): InputError {
  return new InputError(`no ${ds.format} files found at this path`, { file: ds.path, where: `dataset '${ds.id}', path`, hint: `put .${ds.format === 'spikes' ? 'csv' : ds.format} files there or correct the path` });
}

async function provenanceOf(ds: ResolvedDataset): Promise<FileProvenance[]> {
  const out: FileProvenance[] = [];
  for (let i = 0; i < ds.files.length; i++) out.push({ path: ds.relFiles[i], ...(await hashFile(ds.files[i])) });
  return out;
}

/** Every tensor of the plan, then the guard's check (when there is one) once the last is read. */
async function* guardedTensors(plan: Awaited<ReturnType<typeof planWeights>>, guard: FileGuard | null) {
  yield* readTensors(plan);
  if (guard) await guard.check();
}

export interface OpenContext {
  kind: AuditKind;
  binMs: number;
  workspaceRoot: string;
  /** Largest block in bytes; default by layout (join.ts). */
  maxBlockBytes?: number;
  /**
   * The files' provenance as the caller already hashed it (same order as `ds.files`, `path` the
   * workspace-relative path). When given, the files are not hashed again: this becomes the
   * source's `files`, and the files must keep their size, times and inode while they are read
   * (file-guard.ts). When absent, every file is hashed while opening.
   */
  provenance?: HashedFile[];
}

/**
 * Open a dataset for streaming: activity blocks (whose `blocks()` also takes a unit range, see
 * join.ts) or weight tensors.
 */
export async function openDataset(ds: ResolvedDataset, ctx: OpenContext): Promise<RangedActivitySource | WeightsSource> {
  if (!ds.files.length) throw noFiles(ds);
  const guard = ctx.provenance ? await guardFiles(ds.files, ds.relFiles, ctx.provenance) : null;
  const provenance = async (): Promise<FileProvenance[]> =>
    ctx.provenance ? ctx.provenance.map((p) => ({ path: p.path, sha256: p.sha256, bytes: p.bytes })) : provenanceOf(ds);
  if (ctx.kind === 'weights') {
    const plan = await planWeights(ds);
    const source: WeightsSource = {
      kind: 'weights',
      files: await provenance(),
      layers: plan.layers.map((l) => ({ name: l.name, shape: l.shape })),
      findings: plan.findings,
      tensors: () => guardedTensors(plan, guard),
    };
    return source;
  }
  if (ds.format === 'sorter-folder' || ds.format === 'imaging-folder') {
    const folder = await openLabFolder(ds, ctx);
    const check = guard ? () => guard.check() : undefined;
    return joinActivity([folder], [folderRel(ds)], await provenance(), ctx.maxBlockBytes, () => openLabFolder(ds, ctx), check);
  }
  const files: ActivityFile[] = [];
  try {
    for (let i = 0; i < ds.files.length; i++) {
      const f = await openActivityFile(ds.files[i], ds.relFiles[i], ds, ctx);
      files.push(f);
      await f.close(); // release handles now; each pass of blocks() reads (or reopens) it
    }
    const reopen = (i: number) => openActivityFile(ds.files[i], ds.relFiles[i], ds, ctx);
    const check = guard ? () => guard.check() : undefined;
    return joinActivity(files, ds.relFiles, await provenance(), ctx.maxBlockBytes, reopen, check);
  } catch (err) {
    for (const f of files) await f.close();
    throw err;
  }
}

/** Units of an inspected activity file where the layout decides it (npy, npz, csv, tsv); else null. */
function unitsOf(ins: FileInspection, ds: ResolvedDataset): number | null {
  if (!ins.shape || !['npy', 'npz', 'csv', 'tsv'].includes(ds.format)) return null;
  if (ins.shape.length === 1) return 1;
  return ds.layout === 'units-by-bins' ? ins.shape[0] : ins.shape[1];
}

async function inspectFile(path: string, rel: string, ds: ResolvedDataset, kind: AuditKind, binMs: number): Promise<FileInspection> {
  const bytes = (await stat(path)).size;
  switch (ds.format) {
    case 'npy': {
      const { src, header } = await openNpyFile(path, rel);
      await src.close();
      if (kind === 'activity') activityGeometry(header, ds.layout, rel, 'shape');
      return { path: rel, format: 'npy', shape: header.shape, dtype: header.dtype.name, bytes };
    }
    case 'npz': {
      const entries = await npzEntries(path, rel);
      const chosen = kind === 'activity' ? chooseMember(entries, ds.member, rel) : null;
      const parts: NonNullable<FileInspection['parts']> = [];
      let shape: number[] | null = null;
      let dtype: string | null = null;
      for (const e of entries) {
        const m = await openNpzMember(path, rel, e);
        await m.src.close();
        parts.push({ name: m.name, shape: m.header.shape, dtype: m.header.dtype.name });
        if (e === chosen) {
          activityGeometry(m.header, ds.layout, rel, `member '${e.name}', shape`);
          shape = m.header.shape;
          dtype = m.header.dtype.name;
        }
      }
      return { path: rel, format: 'npz', shape, dtype, parts, bytes };
    }
    case 'csv':
    case 'tsv': {
      const t = await inspectTable(path, rel, delimiterFor(ds.format, rel));
      return { path: rel, format: ds.format, shape: [t.rows, t.cols], dtype: null, bytes };
    }
    case 'spikes': {
      if (kind === 'weights') throw inputError(rel, 'format', "format 'spikes' holds activity, not weights");
      await inspectSpikeHeader(path, rel, delimiterFor(ds.format, rel), binMs);
      return { path: rel, format: 'spikes', shape: null, dtype: null, bytes };
    }
    case 'safetensors': {
      if (kind === 'activity') throw inputError(rel, 'format', 'safetensors files hold weights, not activity');
      const h = await readSafetensorsHeader(path, rel);
      return { path: rel, format: 'safetensors', shape: null, dtype: null, bytes, parts: h.tensors.map((t) => ({ name: t.name, shape: t.shape, dtype: t.dtype.name })) };
    }
    case 'nwb': {
      if (kind === 'weights') throw inputError(rel, 'format', "format 'nwb' holds activity, not weights");
      const { inspectNwb } = await import('./nwb.ts');
      return inspectNwb(path, rel, ds.series, binMs, ds.recording_end_s ?? null);
    }
    default:
      throw inputError(rel, 'format', `unknown format '${String(ds.format)}'`);
  }
}

/** A folder dataset's headers (`lacuna check`): everything the build checks before reading data. */
async function inspectLabFolder(ds: ResolvedDataset, ctx: { kind: AuditKind; binMs: number }): Promise<FileInspection> {
  let bytes = 0;
  for (const f of ds.files) bytes += (await stat(f)).size;
  const path = folderRel(ds);
  if (ds.format === 'sorter-folder') {
    const s = await inspectSorterFolder(ds.files, ds.relFiles, ds.sorter!, ctx.binMs);
    return { path, format: ds.format, shape: [s.spikes], dtype: s.dtype, bytes };
  }
  const f = await openImagingFolder(ds.files, ds.relFiles, ds.imaging!, ctx.binMs, true);
  await f.close();
  return { path, format: ds.format, shape: [f.units, f.bins], dtype: null, bytes };
}

/** Headers only, no data pass (for `lacuna check`); every problem is collected, none thrown. */
export async function inspectDataset(
  ds: ResolvedDataset, ctx: { kind: AuditKind; binMs: number },
): Promise<{ files: FileInspection[]; problems: InputError[] }> {
  const files: FileInspection[] = [];
  const problems: InputError[] = [];
  if (!ds.files.length) return { files, problems: [noFiles(ds)] };
  if (ds.format === 'sorter-folder' || ds.format === 'imaging-folder') {
    try {
      files.push(await inspectLabFolder(ds, ctx));
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      problems.push(err);
    }
    return { files, problems };
  }
  let firstUnits: { rel: string; units: number } | null = null;
  for (let i = 0; i < ds.files.length; i++) {
    const rel = ds.relFiles[i];
    try {
      const ins = await inspectFile(ds.files[i], rel, ds, ctx.kind, ctx.binMs);
      files.push(ins);
      const units = ctx.kind === 'activity' ? unitsOf(ins, ds) : null;
      if (units !== null) {
        if (!firstUnits) firstUnits = { rel, units };
        else if (units !== firstUnits.units) {
          problems.push(new InputError(`${rel} has ${units} units but ${firstUnits.rel} has ${firstUnits.units}; sessions joined along bins must have the same units`, { file: rel, where: 'units' }));
        }
      }
    } catch (err) {
      if (err instanceof InputError) problems.push(err);
      else if (err instanceof Error && 'code' in err && typeof (err as NodeJS.ErrnoException).code === 'string') {
        problems.push(new InputError(`cannot read file: ${err.message}`, { file: rel, cause: err }));
      } else throw err;
    }
  }
  return { files, problems };
}
