/**
 * Folders with fixed file names, read as one dataset: a spike sorter's output folder
 * (`format: sorter-folder`) and an imaging pipeline's output folder (`format: imaging-folder`).
 *
 * 1. Recognise the layout: as written in `format:`, or, with no `format:`, from the file names —
 *    a folder holding `spike_times.npy` and `spike_clusters.npy` (or `spike_templates.npy`) is a
 *    sorter folder; one holding `F.npy` and `iscell.npy`, or subfolders `plane0/`, `plane1/`, …
 *    holding them, is an imaging folder.
 * 2. List the member files the reader needs (and only those), each realpath-checked to stay
 *    inside the workspace like every other data file (`paths.ts`). Files the readers never open
 *    (the sorter's `params.py` is parsed as text, never run; the pipeline's pickled settings
 *    file `ops.npy` is never opened) are not data: `ops.npy` is not even listed.
 *
 * The files are hashed like any dataset's, so a changed label table or params.py makes a new
 * version.
 */
import { readdir, realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import type { DataFormat } from './types.ts';
import { isInside, resolveTarget, toPosix, type PathContext } from './paths.ts';
import { LABEL_TABLES } from '../readers/sorter-labels.ts';

export interface LabFolderFiles {
  format: 'sorter-folder' | 'imaging-folder';
  files: string[];
  relFiles: string[];
}


/** The sorter files read, in this order when present (other `cluster_*.tsv` tables hold metrics, not labels). */
const SORTER_FILES = ['spike_times.npy', 'spike_clusters.npy', 'spike_templates.npy', 'params.py', ...LABEL_TABLES];
/** The imaging files a plane may hold (which are read depends on `imaging.trace`). */
const PLANE_FILES = ['F.npy', 'Fneu.npy', 'spks.npy', 'iscell.npy'];
const PLANE_DIR = /^plane(\d{1,4})$/;

function looksLikeSorter(names: Set<string>): boolean {
  return names.has('spike_times.npy') && (names.has('spike_clusters.npy') || names.has('spike_templates.npy'));
}

function looksLikePlane(names: Set<string>): boolean {
  return names.has('F.npy') && names.has('iscell.npy');
}

/**
 * When the dataset's path is a folder of one of these layouts (or `format:` names one), its
 * member files; otherwise null (the caller resolves the path as usual).
 */
export async function resolveLabFolder(
  workspaceRoot: string, manifestDir: string, p: string, written: DataFormat | null, ctx: PathContext,
): Promise<LabFolderFiles | null> {
  if (written !== null && written !== 'sorter-folder' && written !== 'imaging-folder') return null;
  const { rootReal, real, fail } = await resolveTarget(workspaceRoot, manifestDir, p, ctx);
  const st = await stat(real);
  if (!st.isDirectory()) {
    if (written === null) return null;
    return fail(`found ${JSON.stringify(p)}, a file; allowed: format ${written} reads a folder`);
  }
  const names = new Set((await readdir(real)).filter((n) => !n.startsWith('.')));
  const planes = [...names].filter((n) => PLANE_DIR.test(n)).sort((a, b) => Number(PLANE_DIR.exec(a)![1]) - Number(PLANE_DIR.exec(b)![1]));
  const format = written ?? (looksLikeSorter(names) ? 'sorter-folder' : looksLikePlane(names) || planes.length > 0 ? 'imaging-folder' : null);
  if (format === null) return null;
  if (ctx.pattern !== null) fail(`found files: ${JSON.stringify(ctx.pattern)} for a ${format}; allowed: no files pattern (the folder's file names are fixed)`, ctx.where.replace(/\.path$/, '.files'));

  const files: string[] = [];
  const member = async (dir: string, name: string, shown: string) => {
    let r: string;
    try {
      r = await realpath(path.join(dir, name));
    } catch (err) {
      return fail(`found ${JSON.stringify(shown)}, a broken symbolic link`, ctx.where, undefined, err);
    }
    if (!isInside(rootReal, r)) fail(`found ${JSON.stringify(shown)}, a symbolic link leading outside the workspace (to ${r}); allowed: files inside the workspace folder`);
    if (!(await stat(r)).isFile()) fail(`found ${JSON.stringify(shown)}, which is not a regular file`);
    files.push(r);
  };

  if (format === 'sorter-folder') {
    if (!looksLikeSorter(names)) {
      fail(`folder ${JSON.stringify(p)} has no spike_times.npy with spike_clusters.npy (or spike_templates.npy); allowed: a spike sorter's output folder`);
    }
    for (const n of SORTER_FILES) if (names.has(n)) await member(real, n, toPosix(path.join(p, n)));
  } else {
    const dirs = looksLikePlane(names) ? [''] : planes;
    if (dirs.length === 0) fail(`folder ${JSON.stringify(p)} has neither F.npy with iscell.npy nor plane0/, plane1/, … subfolders holding them; allowed: an imaging pipeline's output folder`);
    for (const d of dirs) {
      const dir = path.join(real, d);
      const inPlane = new Set((await readdir(dir)).filter((n) => !n.startsWith('.')));
      if (!looksLikePlane(inPlane)) fail(`plane folder ${JSON.stringify(toPosix(path.join(p, d)))} has no F.npy with iscell.npy; allowed: every plane holds F.npy and iscell.npy`);
      for (const n of PLANE_FILES) if (inPlane.has(n)) await member(dir, n, toPosix(path.join(p, d, n)));
    }
  }
  return { format, files, relFiles: files.map((f) => toPosix(path.relative(rootReal, f))) };
}
