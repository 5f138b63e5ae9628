/**
 * Inspection of HDF5 objects before they are read, so that an object whose bytes live outside
 * the file is refused with its reason rather than read.
 *
 * Two layers. The structural one is hdf5-sandbox.ts: the library can open no file but this one,
 * so nothing here is needed to keep outside bytes out. This layer names the reason first:
 *
 * - links are resolved one path component at a time, without following the last one: an HDF5
 *   external link (HDF5 User's Guide, "Links": H5Lcreate_external) or any other user-defined
 *   link is refused; a soft link is replaced by its target (at most 16 hops, HDF5's own limit
 *   H5L_NUM_LINKS) and the target checked the same way;
 * - a dataset with the virtual layout (HDF5 1.10 "Virtual Dataset", H5D_VIRTUAL) is refused,
 *   naming its source files: a source that cannot be opened reads as fill values, silently;
 * - HDF5 external storage (H5Pset_external) is not visible through h5wasm's API; it is refused by
 *   the sandbox the moment a read tries to open the raw file (see `guarded`), and `lacuna check`
 *   reads one element of each dataset it will use so that check refuses it too.
 */
import h5wasm, { Module as h5Module } from 'h5wasm';
import type { Dataset, Entity, File as H5File } from 'h5wasm';
import { InputError } from '../errors.ts';
import { guarded } from './hdf5-sandbox.ts';

/** Soft-link hops followed before giving up (HDF5's default H5L_NUM_LINKS). */
const MAX_HOPS = 16;
const LOOKUP = { lookup: true };

const relPaths = new Map<bigint, string>();

/** Remember which workspace-relative name a sandboxed file is reported under (until `forgetFile`). */
export function registerFile(file: H5File, relPath: string): void {
  relPaths.set(file.file_id, relPath);
}

/** Drop a closed file's name. */
export function forgetFile(file: H5File): void {
  relPaths.delete(file.file_id);
}

/** The workspace-relative name of the file an open object belongs to, for error messages. */
export function relPathOf(obj: { file_id: bigint }): string {
  return relPaths.get(obj.file_id) ?? '(HDF5 file)';
}

/** Module-level functions h5wasm binds (h5wasm's hdf5_util.cc), used for link inspection. */
function api(): typeof h5Module {
  if (!h5Module) throw new Error('h5wasm module not loaded');
  return h5Module;
}

function joinPath(parent: string, name: string): string {
  return parent === '/' ? `/${name}` : `${parent}/${name}`;
}

function parentOf(path: string): string {
  const i = path.lastIndexOf('/');
  return i <= 0 ? '/' : path.slice(0, i);
}

/**
 * Why the link at `path` (whose parent is already checked) must not be followed, or null for a
 * hard or soft link. Does not follow the link itself.
 */
export function linkProblem(file: H5File, path: string): string | null {
  const relPath = relPathOf(file);
  const m = api();
  const ext = guarded(relPath, path, () => m.get_external_link(file.file_id, path), LOOKUP);
  if (ext && typeof ext.filename === 'string') {
    return `HDF5 external link to ${JSON.stringify(ext.filename)}:${JSON.stringify(ext.obj_path ?? '')}; Lacuna reads only the file itself and does not follow links out of it`;
  }
  if (guarded(relPath, path, () => m.get_symbolic_link(file.file_id, path), LOOKUP) !== null) return null;
  // get_type on a user-defined link tries to traverse it; the sandbox refuses and records that.
  let type: number;
  try {
    type = guarded(relPath, path, () => m.get_type(file.file_id, path), LOOKUP);
  } catch {
    return 'HDF5 link that leads outside the file (the library tried to open another file to follow it)';
  }
  if (type === m.H5G_UDLINK) return 'HDF5 user-defined link, which Lacuna does not follow (it may point outside the file)';
  return null;
}

/**
 * The path of the object `path` names after soft links are replaced by their targets, with
 * every component checked to be a hard or soft link inside this file. InputError naming the
 * link for an external or other user-defined link, or a soft-link chain longer than 16 hops.
 * Returns null when some component does not exist.
 */
export function resolveInside(file: H5File, path: string): string | null {
  const relPath = relPathOf(file);
  const m = api();
  let parts = path.split('/').filter((p) => p !== '' && p !== '.');
  let resolved = '/';
  let hops = 0;
  while (parts.length > 0) {
    const name = parts.shift()!;
    const here = joinPath(resolved, name);
    const problem = linkProblem(file, here);
    if (problem !== null) {
      throw new InputError(`refused: this is an ${problem}`, {
        file: relPath,
        where: here,
        hint: 'copy the linked object into the NWB file (e.g. h5copy) or point the manifest at the file that holds it',
      });
    }
    const soft = guarded(relPath, here, () => m.get_symbolic_link(file.file_id, here), LOOKUP);
    if (typeof soft === 'string') {
      if (++hops > MAX_HOPS) throw new InputError(`soft links chain through more than ${MAX_HOPS} hops (a cycle?)`, { file: relPath, where: here });
      const target = soft.startsWith('/') ? soft : joinPath(parentOf(here), soft);
      parts = [...target.split('/').filter((p) => p !== '' && p !== '.'), ...parts];
      resolved = '/';
      continue;
    }
    if (guarded(relPath, here, () => m.get_type(file.file_id, here), LOOKUP) < 0) return null;
    resolved = here;
  }
  return resolved;
}

/**
 * The entity at `path` once every link on the way is checked (resolveInside), read through
 * the sandbox guard; datasets are checked for the virtual layout. Null when absent.
 */
export function getChecked(file: H5File, path: string): Entity | null {
  const relPath = relPathOf(file);
  const at = resolveInside(file, path);
  if (at === null) return null;
  const e = guarded(relPath, path, () => file.get(at));
  if (e instanceof h5wasm.Dataset) checkLayout(e, relPath, path);
  return e;
}

/** Refuse a virtual dataset, naming its sources. */
export function checkLayout(ds: Dataset, relPath: string, where: string = ds.path): void {
  const md = guarded(relPath, where, () => ds.metadata);
  const sources = md.virtual_sources;
  if (sources && sources.length > 0) {
    const named = sources.slice(0, 3).map((s) => `${JSON.stringify(s.file_name)}:${JSON.stringify(s.dset_name)}`).join(', ');
    throw new InputError(`is an HDF5 virtual dataset mapping ${sources.length} source${sources.length === 1 ? '' : 's'} (${named}${sources.length > 3 ? ', …' : ''}); Lacuna reads only the file itself, and a virtual dataset whose source is missing reads as fill values`, {
      file: relPath,
      where,
      hint: 'write the data into the NWB file itself (e.g. h5repack)',
    });
  }
}

/** Read a hyperslab of a dataset through the sandbox guard (refused on any library error or outside access). */
export function readSlice(ds: Dataset, ranges: [number, number][], relPath: string): unknown {
  return guarded(relPath, ds.path, () => ds.slice(ranges));
}

/** Read a whole (small, e.g. scalar) dataset through the sandbox guard. */
export function readValue(ds: Dataset, relPath: string): unknown {
  return guarded(relPath, ds.path, () => ds.value);
}
